package runreport

import (
	"context"
	"math"
	"sort"

	"github.com/trussfleet/trussfleet/internal/ranking"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/store"
)

// NoLine names the line of bridges the inventory gives none.
const NoLine = "(no line)"

// Corridors reads a run's network view by line: each line's bridges in chainage order and,
// for each category, its weakest links (screening/network). rows is the run's priority list
// (store.Ranked), passed in so that a caller that has it reads it once. Lines are in name
// order, bridges without a line under NoLine last.
func Corridors(ctx context.Context, db *store.DB, runID int64, rows []ranking.Row) ([]network.Corridor, error) {
	cats, err := db.RunCategoryResults(ctx, runID)
	if err != nil {
		return nil, err
	}
	return CorridorsOf(rows, cats), nil
}

// CorridorsOf groups priority-list rows by line into corridors, with each bridge's stored
// category outcomes (by bridge id; a bridge without any is not rated by category).
func CorridorsOf(rows []ranking.Row, cats map[string][]store.CategoryResult) []network.Corridor {
	byLine := map[string][]network.Stop{}
	for _, r := range rows {
		line := r.Line
		if line == "" {
			line = NoLine
		}
		s := network.Stop{BridgeID: r.BridgeID, Name: r.Name, ChainageKm: r.ChainageKm,
			Highest: r.Categories, Rated: r.Status == "done" && r.Categories != nil}
		for _, c := range cats[r.BridgeID] {
			if c.Status == "carried" {
				continue
			}
			if s.Limits == nil {
				s.Limits = map[string]network.CategoryRating{}
			}
			cr := network.CategoryRating{Category: c.Category, Pass: c.Status == "passes", Member: c.Member, Limit: network.Limit(c.LimitBy)}
			cr.RF = math.NaN()
			if c.RF.Valid {
				cr.RF = c.RF.Float64
			}
			s.Limits[c.Category] = cr
		}
		byLine[line] = append(byLine[line], s)
	}
	names := make([]string, 0, len(byLine))
	for n := range byLine {
		names = append(names, n)
	}
	sort.Slice(names, func(i, j int) bool {
		if (names[i] == NoLine) != (names[j] == NoLine) {
			return names[j] == NoLine
		}
		return names[i] < names[j]
	})
	out := make([]network.Corridor, len(names))
	for i, n := range names {
		out[i] = network.NewCorridor(n, byLine[n])
	}
	return out
}
