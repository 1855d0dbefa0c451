package report

import (
	"fmt"
	"io"
	"math"

	"github.com/trussfleet/trussfleet/screening"
)

// OtherTruss is a member's stored outcome on the main truss that does not govern it, where
// both trusses were screened: its name and its lowest rating factor under each scenario (nil:
// none).
type OtherTruss struct {
	Truss                  string
	RFExisting, RFProposed *float64
}

// trussDiffers is the least difference of two trusses' proposed RF that the page shows: the
// RF are printed to two decimals.
const trussDiffers = 0.005

// trussRow is a row of the bridge page's table of members whose trusses differ.
type trussRow struct {
	Label, A, B, Governs string
}

// trussRows lists, most severe first, the members whose proposed RF on trusses A and B
// differ by trussDiffers or more, or that have one on one truss only.
func trussRows(members []Member) []trussRow {
	var out []trussRow
	for _, i := range severityOrder(members) {
		m := members[i]
		o := m.Other
		if o == nil || m.Truss == "" {
			continue
		}
		gov, other := m.RFProposed, o.RFProposed
		if gov == nil && other == nil {
			continue
		}
		if gov != nil && other != nil && math.Abs(*gov-*other) < trussDiffers {
			continue
		}
		r := trussRow{Label: m.Label, A: rfText(gov), B: rfText(other), Governs: m.Truss}
		if m.Truss == screening.TrussB {
			r.A, r.B = r.B, r.A
		}
		out = append(out, r)
	}
	return out
}

// explainOther tells the member's proposed and existing RF on the truss that does not govern.
func explainOther(w io.Writer, m Member) {
	if o := m.Other; o != nil {
		fmt.Fprintf(w, "  on truss %s, which does not govern: RF existing %s, proposed %s\n", o.Truss, rfText(o.RFExisting), rfText(o.RFProposed))
	}
}
