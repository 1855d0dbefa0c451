package envelope

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/screening/truss/trusstest"
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
// a 96 m, 16-panel Pratt truss: the sparse sweep agrees with the dense one for every member
// and with the brute force (fine stepping, every cut length ending on a vertex or zero
// crossing) for every seventh. Lines by the method of sections (common practice).
func TestCooperOnPrattSparse(t *testing.T) {
	x, labels, ord := prattLines(96, 11, 16)
	cooperSparseAgrees(t, x, labels, ord, 7, true)
}

// TestCooperOnContinuousTrussSparse: Cooper E80 over a Howe truss continuous over three 64 m
// spans (lines by the stiffness method, screening/analysis; kinks at every panel point,
// several sign changes, the rounding noise of computed lines): the sparse sweep against the
// dense one for every member, and the brute force must not beat it on three members (its
// stepping may fall short of a stationary point there, so it bounds from one side only).
func TestCooperOnContinuousTrussSparse(t *testing.T) {
	lines, ord := trusstest.InfluenceLines(t, truss.Params{Type: "howe", SpanM: 64, Panels: 12, DepthM: 8, Spans: 3})
	labels := make([]string, len(lines.Members))
	for i, m := range lines.Members {
		labels[i] = m.Label
	}
	cooperSparseAgrees(t, lines.X, labels, ord, 30, false)
}

// cooperSparseAgrees checks Cooper E80's sparse sweep over the lines against the dense sweep
// (shortcutAgrees) and, on every every-th member, against the brute force: equal to 1e-6 of
// the force scale where twoSided, else not beaten by it beyond 1e-9.
func cooperSparseAgrees(t *testing.T, x []float64, labels []string, ord [][]float64, every int, twoSided bool) {
	t.Helper()
	tr := traffic.Cooper(80)
	shortcutAgrees(t, x, ord, tr, plainSweeps{denseCurved: true})
	l, ld := prepared(t, x, ord, tr)
	var c Calculator
	got, err := c.Envelope(l, ld, Options{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < len(ord); i += every {
		scale := forceScale(x, ord[i], tr)
		for _, s := range senses(got[i]) {
			brute := bruteTrain(x, ord[i], tr, s.sense)
			if (twoSided && math.Abs(brute-s.e.Value) > 1e-6*scale) || s.sense*(brute-s.e.Value) > 1e-9*scale {
				t.Fatalf("%s sense %v: brute force %v, sparse sweep %v", labels[i], s.sense, brute, s.e.Value)
			}
		}
	}
}
