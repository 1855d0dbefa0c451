package screening_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// TestFloorSystemRated: a Pratt truss of 8 panels of 6 m, trusses 5 m apart, one centred track
// with stringer lines 1.5 m apart, under one axle of P. A stringer line takes P/2: its largest
// moment (P/2)·6/4 (PL/4, handbook); a floor beam takes the reaction P, each stringer line P/2
// at (5 - 1.5)/2 = 1.75 m from its truss: moment (P/2)·1.75 (statics). With capacities set so
// that the proposed axle exceeds the stringer, the stringer governs the bridge.
func TestFloorSystemRated(t *testing.T) {
	const P = 400.0
	b := screening.Bridge{ID: "F-1", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 10, TrussSpacingM: 5,
		Floor: screening.FloorSystem{Rate: true, StringerSpacingM: 1.5, StringerDeadKNPerM: 2, FloorBeamDeadKNPerM: 1},
		Members: map[string]rating.Member{
			"S1-4:M": {CapacityTension: 250},
			"FB4:M":  {CapacityTension: 1e4},
			"L2-L3":  {CapacityTension: 1e5, CapacityCompression: 1e5},
		}}
	res := screening.ScreenBridge(b, settings(t, axle("existing", 100), axle("proposed", P)))
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	byLabel := map[string]screening.MemberResult{}
	for _, m := range res.Members {
		byLabel[m.Label] = m
	}
	s := byLabel["S1-4:M"]
	if s.Kind != "stringer" || s.Effect != "moment" {
		t.Fatalf("S1-4:M kind %q effect %q", s.Kind, s.Effect)
	}
	near := func(a, b float64) bool { return math.Abs(a-b) < 1e-9*(1+math.Abs(b)) }
	if want := P / 2 * 6 / 4; !near(s.Proposed.Max.Value, want) { // PL/4 on half the axle
		t.Errorf("stringer moment %v, want %v", s.Proposed.Max.Value, want)
	}
	if want := 2.0 * 36 / 8; !near(s.Dead, want) { // qp²/8
		t.Errorf("stringer dead moment %v, want %v", s.Dead, want)
	}
	rf := (250 - s.Dead) / s.Proposed.Max.Value // working-stress rating equation, no allowance
	if !near(s.Assessment.WorstPr.RF, rf) || !s.Assessment.Has(rating.Exceeds) {
		t.Errorf("stringer RF %v flags %v, want %v and exceeds", s.Assessment.WorstPr.RF, s.Assessment.Flags, rf)
	}
	fb := byLabel["FB4:M"]
	if want := P / 2 * 1.75; fb.Kind != "floor-beam" || !near(fb.Proposed.Max.Value, want) {
		t.Errorf("floor-beam moment %v (%s), want %v", fb.Proposed.Max.Value, fb.Kind, want)
	}
	if fbv := byLabel["FB0:V"]; !near(fbv.Proposed.Max.Value, P/2) { // end floor beam: R = P, V = R/2
		t.Errorf("end floor-beam shear %v, want %v", fbv.Proposed.Max.Value, P/2)
	}
	if res.Summary.Worst < 0 || res.Members[res.Summary.Worst].Label != "S1-4:M" {
		t.Errorf("worst %d, want the stringer S1-4:M", res.Summary.Worst)
	}
	if res.Floor == nil || res.Floor.FloorBeamsNotRated != 0 {
		t.Errorf("floor notes %+v", res.Floor)
	}
	// A floor label that the system lacks fails the bridge with its reason.
	b.Members = map[string]rating.Member{"S1-9:M": {CapacityTension: 1}}
	if res := screening.ScreenBridge(b, settings(t, axle("e", 1), axle("p", 1))); res.Err == nil {
		t.Error("S1-9 on 8 panels must fail")
	}
	// Without the truss spacing the floor beams are counted as not rated.
	b.Members, b.TrussSpacingM = nil, 0
	res = screening.ScreenBridge(b, settings(t, axle("e", 1), axle("p", 1)))
	if res.Err != nil || res.Floor == nil || res.Floor.FloorBeamsNotRated != 9 {
		t.Errorf("err %v notes %+v, want 9 floor beams not rated", res.Err, res.Floor)
	}
}
