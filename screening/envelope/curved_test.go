package envelope

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

// TestSparseEqualsDense: the sweep that brings each member up to date only at its own events
// (sweepSparse) gives the extremes of the sweep that moves every member at every event, for
// trains with parts applied whole or cut at the unfavourable length, on lines with and without
// jumps at the bearings (where the dense sweep runs both). Reference: the dense event sweep
// (plainSweeps.denseCurved), itself checked against the brute force in property_test.go;
// placements are checked by reproducing their value with the independent reference response.
func TestSparseEqualsDense(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genLines(t)
		tr := genTrain(t)
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		shortcutAgrees(t, x, ord, tr, plainSweeps{denseCurved: true})
	})
}

// TestCooperOnPrattSparse: Cooper E80 (its trailing load cut at the unfavourable length) over
// a 96 m, 16-panel Pratt truss: the sparse sweep agrees with the dense one and with the brute
// force (fine stepping, every cut length ending on a vertex or zero crossing) for every
// member. Lines by the method of sections (common practice).
func TestCooperOnPrattSparse(t *testing.T) {
	x, labels, ord := prattLines(96, 11, 16)
	tr := traffic.Cooper(80)
	shortcutAgrees(t, x, ord, tr, plainSweeps{denseCurved: true})
	l, ld := prepared(t, x, ord, tr)
	var c Calculator
	got, err := c.Envelope(l, ld, Options{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < len(ord); i += 7 { // the brute force is slow: every seventh member
		scale := forceScale(x, ord[i], tr)
		for _, s := range senses(got[i]) {
			if brute := bruteTrain(x, ord[i], tr, s.sense); math.Abs(brute-s.e.Value) > 1e-6*scale {
				t.Fatalf("%s sense %v: brute force %v, sparse sweep %v", labels[i], s.sense, brute, s.e.Value)
			}
		}
	}
}
