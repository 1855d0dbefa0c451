package screening

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// TestCutWagonsChangeNoRating: the network view of bridges of several forms (a simple Pratt,
// whose lines change sign at most once and take the long trains; a K-truss; a Pratt
// continuous over two spans, whose lines change sign twice and take the unit trains at
// every count), one with a floor system, is the same with the network trains cut to the
// wagons that can matter (network.WagonsThatMatter) as with the full trains of WagonsMax
// wagons (the reference): every category's RF, member and limit, and every member's E.
func TestCutWagonsChangeNoRating(t *testing.T) {
	var trains []*traffic.Train
	for _, spec := range []string{"northmoor-freight-today", "eastfell-multiple-unit", "northmoor-freight-proposed"} {
		tr, err := traffic.ParseSpec(spec, configs.Trains())
		if err != nil {
			t.Fatal(err)
		}
		trains = append(trains, tr)
	}
	ex, _ := NewScenario("existing", trains[:2])
	pr, _ := NewScenario("proposed", trains[1:])
	s := &Settings{Existing: ex, Proposed: pr, Dynamic: traffic.Dynamic{Kind: traffic.Phi3}, Method: rating.WorkingStress,
		Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2}}
	var err error
	if s.Network, err = NewNetworkTrains(); err != nil {
		t.Fatal(err)
	}
	s.ShareTrains()
	var bridges []Bridge
	for i, p := range []truss.Params{
		{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		{Type: "k-truss", SpanM: 72, Panels: 8, DepthM: 10},
		{Type: "pratt", SpanM: 40, Panels: 8, DepthM: 6, Spans: 2},
		{Type: "warren", SpanM: 9, Panels: 2, DepthM: 2},
	} {
		tr, err := truss.Build(p)
		if err != nil {
			t.Fatal(err)
		}
		mem := map[string]rating.Member{}
		for _, l := range tr.Labels() {
			mem[l] = rating.Member{CapacityTension: 2500 + 40*float64(len(l)), CapacityCompression: 2000}
		}
		b := Bridge{ID: p.Type, Truss: p, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 20, Members: mem}
		if i == 0 {
			b.TrussSpacingM, b.Floor = 5, FloorSystem{Rate: true}
		}
		bridges = append(bridges, b)
	}
	defer func() { cutWagons = true }()
	for _, b := range bridges {
		var results [2]*NetworkResult
		for k, cut := range []bool{false, true} {
			cutWagons = cut
			var w Screener
			r := w.Screen(b, s)
			if r.Err != nil {
				t.Fatalf("%s: %v", b.ID, r.Err)
			}
			results[k] = r.Network
		}
		full, cut := results[0], results[1]
		same := func(a, b float64) bool {
			return (math.IsNaN(a) && math.IsNaN(b)) || a == b || math.Abs(a-b) <= 1e-9*(1+math.Abs(a))
		}
		if !same(full.ERating, cut.ERating) || len(full.MemberE) != len(cut.MemberE) || len(full.Categories) != len(cut.Categories) {
			t.Fatalf("%s: E %v and %v, %d and %d members", b.ID, full.ERating, cut.ERating, len(full.MemberE), len(cut.MemberE))
		}
		for i := range full.MemberE {
			if !same(full.MemberE[i], cut.MemberE[i]) {
				t.Errorf("%s, member %d: E %v with the full trains, %v cut", b.ID, i, full.MemberE[i], cut.MemberE[i])
			}
		}
		for c, f := range full.Categories {
			g := cut.Categories[c]
			if !same(f.RF, g.RF) || f.Member != g.Member || f.Limit != g.Limit || f.Carried != g.Carried {
				t.Errorf("%s, %s: %+v with the full trains, %+v cut", b.ID, f.Category, f, g)
			}
		}
	}
}
