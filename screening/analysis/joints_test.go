package analysis_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// TestDeadLoadSplit checks the dead joint loads against the method of joints and sections,
// written here: a Pratt truss with vertical end posts, span 48 m, 8 panels of 6 m, depth 6 m,
// a dead load q per metre split into the deck part q - w at the bottom (deck) chord's joints
// and the truss's own weight w, half at each chord's joints, by tributary length.
//
// Left reaction R = q·48/2 (symmetry). Cut panel 3 (between x = 12 and 18): its shear V is R
// less every joint load at x <= 12, on either chord. Joint U2 (vertical equilibrium, the
// diagonal U2-L3 carrying V): N(L2-U2) = -(V + P(U2)). Moment about U2 of the left part:
// N(L2-L3) = M(12)/6, M(12) = 12 R - sum P_i (12 - x_i). The vertical changes with the
// split by P(U2) = 6 w/2; the chord does not, as the top joints stand over the bottom ones.
func TestDeadLoadSplit(t *testing.T) {
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6, EndPosts: truss.VerticalPosts})
	if err != nil {
		t.Fatal(err)
	}
	const q = 30.0
	for _, w := range []float64{0, 8, 30} {
		loads := analysis.DeadJointLoads(tr, w)
		var total float64
		for j, p := range loads {
			total += p
			// tributary lengths: 3 m at the ends of each chord, 6 m inside
			trib := 6.0
			if x := tr.Joints[j].X; x == 0 || x == 48 {
				trib = 3
			}
			if math.Abs(p-w/2*trib) > 1e-9 {
				t.Errorf("w %g: joint %s load %g, want %g", w, tr.Joints[j].Name, p, w/2*trib)
			}
		}
		if math.Abs(total-w*48) > 1e-9 { // all of the weight reaches the joints
			t.Errorf("w %g: joint loads sum to %g, want %g", w, total, w*48)
		}
		// the deck part at the bottom joints, by tributary length
		for j, jt := range tr.Joints {
			if jt.Y == 0 {
				trib := 6.0
				if jt.X == 0 || jt.X == 48 {
					trib = 3
				}
				loads[j] += (q - w) * trib
			}
		}
		forces, err := analysis.DeadForces(tr, analysis.Options{}, loads)
		if err != nil {
			t.Fatal(err)
		}
		// method of joints and sections, by hand
		r := q * 48 / 2
		v, m := r, 12*r
		var pU2 float64
		for j, jt := range tr.Joints {
			if jt.X <= 12 {
				v -= loads[j]
				m -= loads[j] * (12 - jt.X)
			}
			if jt.Name == "U2" {
				pU2 = loads[j]
			}
		}
		want := map[string]float64{"L2-U2": -(v + pU2), "L2-L3": m / 6}
		for label, f := range want {
			if got := forces[tr.Member(label)]; math.Abs(got-f) > 1e-9*(1+math.Abs(f)) {
				t.Errorf("w %g: %s = %g, want %g (method of joints/sections)", w, label, got, f)
			}
		}
		// closed forms: the chord as for a uniform load, M(12) = q·12·36/2 = 216 q; the vertical
		// -(V + P(U2)) with V = q·(24 - 15) = 9 q and P(U2) = 3 w
		if got := forces[tr.Member("L2-L3")]; math.Abs(got-216*q/6) > 1e-9*216*q {
			t.Errorf("w %g: chord %g, want %g for every split", w, got, 216*q/6)
		}
		if got := forces[tr.Member("L2-U2")]; math.Abs(got+9*q+3*w) > 1e-9*9*q {
			t.Errorf("w %g: vertical %g, want %g", w, got, -9*q-3*w)
		}
	}
}
