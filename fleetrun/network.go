package fleetrun

import (
	"math"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/store"
)

// memberE is member i's Cooper E rating, NaN (NULL) where the run did not ask for the
// network view or the member (a truss member or a rated floor element) is not rated under
// Cooper E80.
func memberE(r screening.Result, i int) float64 {
	if r.Network == nil || i >= len(r.Network.MemberE) {
		return math.NaN()
	}
	return r.Network.MemberE[i]
}

// categoryResults encodes the results' category_results rows, one a line category of each
// result rated by it, result i under set setIDs[i].
func (e *resultEncoder) categoryResults(results []screening.Result, setIDs []int64) []byte {
	e.copy.Begin()
	for i, r := range results {
		e.categoryRows(setIDs[i], r)
	}
	return e.copy.End()
}

// categoryRows encodes a result's category_results rows (none without the network view).
func (e *resultEncoder) categoryRows(setID int64, r screening.Result) {
	if r.Network == nil {
		return
	}
	for _, c := range r.Network.Categories {
		status := "fails"
		switch {
		case c.Carried:
			status = "carried"
		case c.Pass:
			status = "passes"
		}
		e.cr = store.CategoryResult{SetID: setID, Category: c.Category, Status: status, RF: finite(c.RF),
			Member: c.Member, LimitBy: string(c.Limit)}
		e.copy.CategoryResult(&e.cr)
	}
}
