package screening_test

import (
	"fmt"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// floorNetworkBridge is categoryBridge (trusses that carry D4, RF >= 1.02 in every category
// D4 dominates) with its floor system rated: trusses 5 m apart, one centred track on two
// stringer lines 1.5 m apart, 2 kN/m of dead load per stringer line, and the stringers of
// panel 4 (S1-4) given an end-shear capacity that keeps RF 1.01 under C4's wagons, below the
// trusses'. It returns the bridge, its settings and the stringer's dead shear and 1 + I.
func floorNetworkBridge(t *testing.T) (screening.Bridge, *screening.Settings, float64, float64) {
	t.Helper()
	b, s, _, _, _ := categoryBridge(t)
	b.TrussSpacingM = 5
	b.Floor = screening.FloorSystem{Rate: true, StringerSpacingM: 1.5, StringerDeadKNPerM: 2, FloorBeamDeadKNPerM: 1}
	const panel = 6.0
	dead := 2.0 * panel / 2 // a simple span's end shear under q: q p / 2 (statics)
	// EN 1991-2 Table 6.2 (from memory): a stringer's determinant length is its span + 3 m.
	impact := s.Dynamic.Factor(panel + 3)
	c4, _ := network.ByName("C4")
	members := map[string]rating.Member{}
	for l, m := range b.Members {
		members[l] = m
	}
	members["S1-4:V"] = rating.Member{CapacityTension: dead + 1.01*stringerShear(c4.AxleLoadKN())*impact}
	b.Members = members
	return b, s, dead, impact
}

// stringerShear is the largest end shear of one stringer line of a 6 m panel under the
// reference wagons of axle load p (kN): the line takes half of each axle (the track centred
// on two stringer lines), and the end shear's influence line of a simple span falls from 1 at
// the support to 0 at the far end (statics, handbook). The wagons' axles stand 1.8 m apart in
// a bogie and 3.0 m apart across a coupling (1.5 m from each buffer), the bogies of one wagon
// at least 10 m - 6.6 m = 3.4 m apart: the largest sum of ordinates is an axle at the support
// with the bogie's other axle 1.8 m and the next wagon's first axle 4.8 m behind it,
// 1 + 4.2/6 + 1.2/6 = 1.9 (the next axle, 6.6 m behind, is off the span).
func stringerShear(p float64) float64 {
	return p / 2 * (1 + (6-1.8)/6 + (6-4.8)/6)
}

// TestFloorLimitsCategories: with the floor rated and its stringer weaker than the trusses,
// the stringer limits the categories it is weakest in, by the axle load (its 6 m span sees one
// bogie group whatever the wagon's length: DOMAIN.md, the floor system, common practice); its
// category RF is the working-stress rating equation RF = (C - D) / (L (1 + I)) (DOMAIN.md,
// common practice) with L the closed form above; the bridge no longer carries D4 but C4.
func TestFloorLimitsCategories(t *testing.T) {
	b, s, dead, impact := floorNetworkBridge(t)
	res := screening.ScreenBridge(b, s)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	trussOnly := b
	trussOnly.Floor, trussOnly.TrussSpacingM = screening.FloorSystem{}, 0
	trussOnly.Members = map[string]rating.Member{}
	for l, m := range b.Members {
		if l != "S1-4:V" {
			trussOnly.Members[l] = m
		}
	}
	tr := screening.ScreenBridge(trussOnly, s)
	if tr.Err != nil {
		t.Fatal(tr.Err)
	}
	if len(res.Network.MemberE) != len(res.Members) {
		t.Fatalf("%d member E ratings for %d results", len(res.Network.MemberE), len(res.Members))
	}
	near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-9*math.Abs(b) }
	c := b.Members["S1-4:V"].CapacityTension
	for k, cr := range res.Network.Categories {
		cat := network.Categories[k]
		rf := (c - dead) / (stringerShear(cat.AxleLoadKN()) * impact) // rating equation, closed-form shear
		tc := tr.Network.Categories[k]
		if rf < tc.RF {
			if cr.Member != "S1-4:V" || cr.Limit != network.LimitAxleLoad || !near(cr.RF, rf) {
				t.Errorf("%s: limited by %s (%s) at RF %v, want S1-4:V (axle load) at %v", cr.Category, cr.Member, cr.Limit, cr.RF, rf)
			}
		} else if cr.Member != tc.Member || cr.RF != tc.RF {
			t.Errorf("%s: limited by %s at RF %v, want the trusses' %s at %v", cr.Category, cr.Member, cr.RF, tc.Member, tc.RF)
		}
		if cat.Name == "C4" && (cr.Member != "S1-4:V" || !near(cr.RF, 1.01)) {
			t.Errorf("C4: limited by %s at RF %v, want the stringer at 1.01 (its capacity's choice)", cr.Member, cr.RF)
		}
	}
	if len(tr.Network.Highest) != 1 || tr.Network.Highest[0] != "D4" {
		t.Fatalf("trusses alone: highest %v, want [D4]", tr.Network.Highest)
	}
	// The stringer carries 20 t axles (RF 1.01) and not 22.5 t (RF 1.01 x 20 / 22.5 < 1):
	// of what D4 dominates, the categories of 20 t axles or less remain, C4 the highest.
	if len(res.Network.Highest) != 1 || res.Network.Highest[0] != "C4" {
		t.Errorf("highest categories %v, want [C4] (limited by the stringer)", res.Network.Highest)
	}
}

// screenUnderE80 screens the bridge with Cooper E80 as its proposed traffic.
func screenUnderE80(t *testing.T, b screening.Bridge, s *screening.Settings) screening.Result {
	t.Helper()
	pr, err := screening.NewScenario("proposed", []*traffic.Train{traffic.Cooper(80)})
	if err != nil {
		t.Fatal(err)
	}
	s.Proposed = pr
	res := screening.ScreenBridge(b, s)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	return res
}

// TestFloorERating: the bridge's E rating is its stringer's, 80 x the stringer's RF under
// Cooper E80 (AREMA practice, from memory: the E rating is 80 RF), here against the RF of the
// same bridge screened with Cooper E80 as its proposed traffic, and each floor element's
// E rating sits at its index in the results.
func TestFloorERating(t *testing.T) {
	b, s, _, _ := floorNetworkBridge(t)
	res := screenUnderE80(t, b, s)
	if len(res.Network.MemberE) != len(res.Members) {
		t.Fatalf("%d member E ratings for %d results", len(res.Network.MemberE), len(res.Members))
	}
	low, at, floorRated := math.Inf(1), "", false
	for i, m := range res.Members {
		e := res.Network.MemberE[i]
		if !m.Assessment.HasPr {
			if !math.IsNaN(e) {
				t.Errorf("%s: E rating %v without a rating", m.Label, e)
			}
			continue
		}
		floorRated = floorRated || m.Effect != ""
		if e != 80*m.Assessment.WorstPr.RF { // exact: the definition of the E rating
			t.Errorf("%s: E rating %v, 80 x RF under E80 = %v", m.Label, e, 80*m.Assessment.WorstPr.RF)
		}
		if e < low {
			low, at = e, m.Label
		}
	}
	if !floorRated {
		t.Fatal("no floor element rated")
	}
	if at != "S1-4:V" || res.Network.ERating != low || res.Network.EMember != at {
		t.Errorf("bridge E rating %v (%s), want the stringer S1-4:V's, worst %v (%s)", res.Network.ERating, res.Network.EMember, low, at)
	}
}

// BenchmarkFloorNetwork screens one bridge (a 12-panel Pratt, 72 m, with capacities on a
// stringer and a floor beam) with the network view, its floor system not rated and rated:
// the difference is the floor's scenario rating and its network trains.
func BenchmarkFloorNetwork(b *testing.B) {
	s := &screening.Settings{Method: rating.WorkingStress, Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2}}
	var err error
	if s.Existing, err = screening.NewScenario("existing", []*traffic.Train{traffic.Cooper(60)}); err != nil {
		b.Fatal(err)
	}
	if s.Proposed, err = screening.NewScenario("proposed", []*traffic.Train{traffic.Cooper(80)}); err != nil {
		b.Fatal(err)
	}
	if s.Dynamic, err = traffic.ParseDynamic("phi3"); err != nil {
		b.Fatal(err)
	}
	if s.Network, err = screening.NewNetworkTrains(); err != nil {
		b.Fatal(err)
	}
	for _, withFloor := range []bool{false, true} {
		br := screening.Bridge{ID: "B", Truss: truss.Params{Type: "pratt", SpanM: 72, Panels: 12, DepthM: 9},
			TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 20, TrussSpacingM: 5,
			Members: map[string]rating.Member{"L5-L6": {CapacityTension: 8000, CapacityCompression: 8000}}}
		if withFloor {
			br.Floor = screening.FloorSystem{Rate: true}
			br.Members["S1-3:M"] = rating.Member{CapacityTension: 900}
			br.Members["FB4:M"] = rating.Member{CapacityTension: 1500}
		}
		b.Run(fmt.Sprintf("floor=%v", withFloor), func(b *testing.B) {
			var w screening.Screener
			for b.Loop() {
				if r := w.Screen(br, s); r.Err != nil {
					b.Fatal(r.Err)
				}
			}
		})
	}
}
