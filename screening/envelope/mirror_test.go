package envelope

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
	"pgregory.net/rapid"
)

// genSymmetric draws the influence lines of a truss that is its own mirror image: panel
// points symmetric about mid-span, and with each drawn line also its mirror image (as a
// symmetric truss's mirror members have), perturbed by rounding-sized noise as computed lines
// are; some lines are symmetric themselves (a member at mid-span).
func genSymmetric(t *rapid.T) (x []float64, ord [][]float64) {
	half := rapid.IntRange(1, 4).Draw(t, "half panels")
	odd := rapid.Bool().Draw(t, "odd panels")
	var dx []float64
	for range half {
		dx = append(dx, rapid.Float64Range(0.5, 8).Draw(t, "dx"))
	}
	steps := append([]float64{}, dx...)
	if odd {
		steps = append(steps, rapid.Float64Range(0.5, 8).Draw(t, "middle dx"))
	}
	for k := len(dx) - 1; k >= 0; k-- {
		steps = append(steps, dx[k])
	}
	x = []float64{rapid.Float64Range(-5, 5).Draw(t, "x0")}
	for _, d := range steps {
		x = append(x, x[len(x)-1]+d)
	}
	n := len(x)
	jumps := rapid.Bool().Draw(t, "jumps")
	noise := func() float64 { return rapid.Float64Range(-1e-14, 1e-14).Draw(t, "noise") }
	for range rapid.IntRange(1, 3).Draw(t, "pairs") {
		o := make([]float64, n)
		for k := range o {
			if (k == 0 || k == n-1) && !jumps {
				continue
			}
			o[k] = rapid.Float64Range(-2, 2).Draw(t, "eta")
		}
		mo := make([]float64, n)
		for k := range o {
			mo[k] = o[n-1-k] * (1 + noise())
		}
		if rapid.Bool().Draw(t, "self-symmetric") {
			so := make([]float64, n)
			for k := range o {
				so[k] = (o[k] + o[n-1-k]) / 2
			}
			ord = append(ord, so)
			continue
		}
		ord = append(ord, o, mo)
	}
	return x, ord
}

// TestMirroredSweepsEqualBothSweeps: over a truss that is its own mirror image, the
// right-to-left extremes taken from the mirror members' left-to-right sweeps equal sweeping
// right to left (to 1e-9 of the force scale, the mirror tolerance), and their placements
// reproduce them. References: the same event sweep run in both directions (bothSweeps), and
// the force at the reported placement summed independently (responseRef); the brute force
// over both directions and every count bounds them from above.
func TestMirroredSweepsEqualBothSweeps(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		x, ord := genSymmetric(t)
		tr := genTrain(t)
		if tr.Uniform != nil {
			t.Skip("a uniform load is placed by interval, not swept by direction")
		}
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		l, err := NewLines(x, ord)
		if err != nil {
			t.Fatal(err)
		}
		if l.mirror == nil {
			t.Fatalf("symmetric lines %v on %v: no mirror found", ord, x)
		}
		ld, err := Prepare(tr)
		if err != nil {
			t.Fatal(err)
		}
		var mirrored Calculator
		both := Calculator{bothSweeps: true}
		got := mirrored.Envelope(l, ld, Options{}, nil)
		want := both.Envelope(l, ld, Options{}, nil)
		for i, eta := range ord {
			scale := 1.0
			for _, e := range eta {
				scale = max(scale, math.Abs(e))
			}
			scale *= loadScale(tr, x[len(x)-1]-x[0])
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
				r := responseRef(x, eta, tr, placedRef{p.Direction, p.HeadM, p.Count, p.TrailingM}, c.sense)
				if math.Abs(r-c.got.Value) > 1e-7*scale {
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

// builtLines are the computed influence lines of a parametric truss.
func builtLines(t testing.TB, p truss.Params) *Lines {
	tr, err := truss.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	ls, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var ord [][]float64
	for _, m := range ls.Members {
		ord = append(ord, m.Ordinates)
	}
	l, err := NewLines(ls.X, ord)
	if err != nil {
		t.Fatal(err)
	}
	return l
}
