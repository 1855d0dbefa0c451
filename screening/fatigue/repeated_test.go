package fatigue

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"pgregory.net/rapid"
)

// TestReversalIsOneCycle: one axle of 100 kN over a line that changes sign (a diagonal's:
// -0.25 at 4 m, +0.5 at 8 m, a 12 m span) takes the force 0, -25, +50, 0: one stress cycle of
// max - min = 75 kN a passage, as is common practice for a single load over a reversing
// influence line (worked by hand). Rainflow on the passage alone counts half cycles of 25,
// 75 and 50 instead (ASTM E1049's three-point method, by hand): at slope 3 two thirds of the
// damage, 0.5 (25^3 + 75^3 + 50^3) / 75^3 = 0.667.
func TestReversalIsOneCycle(t *testing.T) {
	x, eta := []float64{0, 4, 8, 12}, []float64{0, -0.25, 0.5, 0}
	for _, dir := range []Direction{LeftToRight, RightToLeft} {
		l, p := prepared(t, x, eta, axleTrain("one", 1, 100))
		var c Calculator
		pc := c.passage(l, p, dir, 12)
		if g := byRange(pc.a); !mapsEqual(g, map[float64]float64{75: 1}) {
			t.Errorf("%s: cycles %v, want one of 75 kN", dir, g)
		}
		alone, _ := Rainflow([]float64{0, -25, 50, 0}, nil, nil)
		if g := byRange(alone); !mapsEqual(g, map[float64]float64{25: 0.5, 75: 0.5, 50: 0.5}) {
			t.Errorf("the passage alone: cycles %v, want halves of 25, 75 and 50", g)
		}
	}
}

// TestRepeatedIsTheLongRun: the cycles RainflowRepeated gives a passage are those each
// passage adds to a long run of passages one after another (the bridge empty between them),
// counted by the three-point method (Rainflow) over the whole run: an independent
// formulation of repeated loading. Compared by damage at slopes 3 and 5 (sum of count times
// range^m), the run of K passages less the run of K - 1, for K = 4.
func TestRepeatedIsTheLongRun(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 8).Draw(t, "inner points")
		p := []float64{0}
		for range n {
			p = append(p, float64(rapid.IntRange(-20, 20).Draw(t, "value")))
		}
		p = append(p, 0)
		tp := turningOf(p)
		run := func(k int) []float64 {
			var h []float64
			for range k {
				h = append(h, tp...)
			}
			return turningOf(h)
		}
		damage := func(cs []Cycle, m float64) float64 {
			d := 0.0
			for _, c := range cs {
				d += c.Count * math.Pow(c.Range, m)
			}
			return d
		}
		got, _, _ := RainflowRepeated(tp, nil, nil, nil)
		long, _ := Rainflow(run(4), nil, nil)
		shorter, _ := Rainflow(run(3), nil, nil)
		for _, m := range []float64{3, 5} {
			want := damage(long, m) - damage(shorter, m)
			if g := damage(got, m); math.Abs(g-want) > 1e-9*max(1, want) {
				t.Fatalf("passage %v (turning %v), slope %v: repeated %v, per passage of a long run %v", p, tp, m, g, want)
			}
		}
	})
}

// turningOf keeps the peaks and valleys of a sequence (no tolerance).
func turningOf(v []float64) []float64 {
	h := make([]Point, len(v))
	for k, x := range v {
		h[k] = Point{HeadM: float64(k), Value: x}
	}
	return Turning(h, 0, nil)
}
