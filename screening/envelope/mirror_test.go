package envelope

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/truss"
	"pgregory.net/rapid"
)

// TestMirroredSweepsEqualBothSweeps: over a truss that is its own mirror image, the
// right-to-left extremes taken from the mirror members' left-to-right sweeps equal sweeping
// right to left (to 1e-9 of the force scale, the mirror tolerance), and their placements
// reproduce them. References: the same event sweep run in both directions (bothSweeps), and
// the force at the reported placement summed independently (responseRef); the brute force
// over both directions and every count bounds them from above.
func TestMirroredSweepsEqualBothSweeps(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genSymmetric(t)
		tr := genTrain(t)
		if tr.Uniform != nil {
			t.Skip("a uniform load is placed by interval, not swept by direction")
		}
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		l, ld := prepared(t, x, ord, tr)
		if l.mirror == nil {
			t.Fatalf("symmetric lines %v on %v: no mirror found", ord, x)
		}
		var mirrored, both Calculator
		got, err := mirrored.Envelope(l, ld, Options{}, nil)
		if err != nil {
			t.Fatal(err)
		}
		want, err := both.envelope(l, ld, Options{}, nil, plainSweeps{bothSweeps: true})
		if err != nil {
			t.Fatal(err)
		}
		for i, eta := range ord {
			scale := forceScale(x, eta, tr)
			for _, c := range []struct {
				sense     float64
				got, want Extreme
			}{{1, got[i].Max, want[i].Max}, {-1, got[i].Min, want[i].Min}} {
				if math.Abs(c.got.Value-c.want.Value) > 1e-9*scale {
					t.Fatalf("member %d sense %v: mirrored %v, both directions swept %v", i, c.sense, c.got.Value, c.want.Value)
				}
				if brute := bruteTrain(x, eta, tr, c.sense); c.sense*(brute-c.got.Value) > 1e-9*scale {
					t.Fatalf("member %d sense %v: brute force %v beats mirrored %v", i, c.sense, brute, c.got.Value)
				}
				p := c.got.Placement
				if !p.Loaded {
					continue
				}
				if r, ok := placementGives(x, eta, tr, p, c.sense, c.got.Value, 1e-7*scale); !ok {
					t.Fatalf("member %d sense %v: placement %+v gives %v, reported %v", i, c.sense, p, r, c.got.Value)
				}
			}
		}
	})
}

// TestMirrorFound: mirrorOf pairs a symmetric truss's members and refuses a truss that is
// not symmetric (common practice: a truss symmetric about mid-span has mirror members whose
// influence lines are each other's mirror images).
func TestMirrorFound(t *testing.T) {
	x := []float64{0, 4, 8, 12}
	a := []float64{0, 0.75, 0.5, 0}  // a left diagonal's shape
	b := []float64{0, 0.5, 0.75, 0}  // its mirror
	c := []float64{0, -0.5, -0.5, 0} // symmetric in itself
	z := []float64{0, 0, 0, 0}       // a zero-force member
	l, err := NewLines(x, [][]float64{a, c, b, z})
	if err != nil {
		t.Fatal(err)
	}
	want := []int32{2, 1, 0, 3}
	for i, j := range want {
		if l.mirror == nil || l.mirror[i] != j {
			t.Fatalf("mirror = %v, want %v", l.mirror, want)
		}
	}
	for _, tc := range []struct {
		name string
		x    []float64
		ord  [][]float64
	}{
		{"unmatched line", x, [][]float64{a, c}},
		{"unequal panels", []float64{0, 4, 8, 13}, [][]float64{a, b}},
		{"mirror beyond the tolerance", x, [][]float64{a, {0, 0.5, 0.75 + 1e-6, 0}}},
	} {
		l, err := NewLines(tc.x, tc.ord)
		if err != nil {
			t.Fatal(err)
		}
		if l.mirror != nil {
			t.Errorf("%s: mirror %v, want none", tc.name, l.mirror)
		}
	}
}

// TestParametricTrussesAreMirrored: every parametric truss type is symmetric about
// mid-span (common practice for simply supported truss spans), so its computed lines find
// their mirror and one direction's sweep serves both.
func TestParametricTrussesAreMirrored(t *testing.T) {
	for _, p := range []truss.Params{
		{Type: "pratt", SpanM: 60, Panels: 12, DepthM: 7.5},
		{Type: "pratt", SpanM: 48.2, Panels: 14, DepthM: 6.1},
		{Type: "pratt", SpanM: 40, Panels: 8, DepthM: 6, Deck: "deck"},
		{Type: "howe", SpanM: 50, Panels: 10, DepthM: 6},
		{Type: "howe", SpanM: 36, Panels: 6, DepthM: 5, EndPosts: "vertical"},
		{Type: "warren", SpanM: 50, Panels: 10, DepthM: 6},
		{Type: "warren", SpanM: 50, Panels: 7, DepthM: 6},
		{Type: "warren-verticals", SpanM: 50, Panels: 8, DepthM: 6},
	} {
		l := builtLines(t, p)
		if l.mirror == nil {
			t.Errorf("%+v: no mirror found", p)
		}
	}
}
