package fatigue

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"pgregory.net/rapid"
)

// A member whose line is c times another's (read either way) has, counting the other's
// passages (CountedAs), the check of its own line: the same status, and damages and ranges
// equal to rounding (the brute force here is the member's own passages, History-exact).
func TestCountedAsIsTheOwnLine(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, eta := genLine(t)
		tr := genPassageTrain(t)
		base, p := prepared(t, x, eta, tr)
		if base.maxAbs == 0 {
			return // a line of zeros is no multiple of anything
		}
		c := rapid.Float64Range(0.2, 3).Draw(t, "factor")
		if rapid.Bool().Draw(t, "negative") {
			c = -c
		}
		mirrored := rapid.Bool().Draw(t, "mirror")
		ox, oeta := x, make([]float64, len(eta))
		for k := range eta {
			oeta[k] = c * eta[k]
		}
		if mirrored {
			ox, oeta = mirror(x, oeta)
		}
		own, err := NewLine(ox, oeta)
		if err != nil {
			t.Fatal(err)
		}
		counted, ok := own.CountedAs(base)
		if !ok {
			t.Fatalf("a line %v times another's (mirror %v) is not counted as it", c, mirrored)
		}
		span := x[len(x)-1] - x[0]
		curve, _ := NewCurve(71, 1.15)
		// ranges up to about 150 MPa: on both slopes of the curve and below the cut-off
		area := scaleOf(x, eta, tr) * 1000 / rapid.Float64Range(20, 150).Draw(t, "largest range")
		s := checkSettings()
		ex := []Traffic{{Train: p, PerYear: 1000, Directions: []Direction{LeftToRight}}}
		pr := []Traffic{{Train: p, PerYear: 1000}}
		b := Bridge{SpanM: span, Shares: []float64{1}}
		var calc Calculator
		// the base line's passages first, as screening counts them
		if _, err := calc.Check(Member{Line: base, AreaMM2: area, Curve: curve}, b, s, ex, pr, nil); err != nil {
			t.Fatal(err)
		}
		got, err := calc.Check(Member{Line: counted, AreaMM2: area, Curve: curve}, b, s, ex, pr, nil)
		if err != nil {
			t.Fatal(err)
		}
		var fresh Calculator
		want, err := fresh.Check(Member{Line: own, AreaMM2: area, Curve: curve}, b, s, ex, pr, nil)
		if err != nil {
			t.Fatal(err)
		}
		// Rainflow may pair two points that tie to rounding either way (the two lines'
		// histories differ by rounding), which moves a damage by about 1e-9 of itself: once
		// 1.4e-9 in some ten thousand draws, counting each passage as one of a repeating run.
		// A line drawn with ordinates of 1e-150 or less has only rounding for ranges: below
		// 1e-9 MPa two ranges are alike (such ranges do no damage: both damages are 0).
		near := func(name string, g, w, floor float64) {
			if d := math.Abs(g - w); d > 1e-8*math.Abs(w) && d > floor {
				t.Fatalf("%s: counted as the other line %v, own line %v (factor %v, mirror %v)", name, g, w, c, mirrored)
			}
		}
		near("existing damage", got.PerYearExisting, want.PerYearExisting, 0)
		near("proposed damage", got.PerYearProposed, want.PerYearProposed, 0)
		near("existing range", got.MaxRangeExistingMPa, want.MaxRangeExistingMPa, 1e-9)
		near("proposed range", got.MaxRangeProposedMPa, want.MaxRangeProposedMPa, 1e-9)
		if got.Status != want.Status && math.Abs(got.MaxRangeProposedMPa*1.15/curve.CutOffMPa()-1) > 1e-9 {
			t.Fatalf("status %s counted as the other line, %s own", got.Status, want.Status)
		}
	})
}

// Lines that are no multiple of each other are not counted as each other.
func TestCountedAsRefusesOtherLines(t *testing.T) {
	l1, _ := NewLine([]float64{0, 5, 10, 15}, []float64{0, 1, 0.5, 0})
	l2, _ := NewLine([]float64{0, 5, 10, 15}, []float64{0, 1, 0.6, 0})    // not proportional
	l3, _ := NewLine([]float64{0, 5, 10, 15}, []float64{0, -2, -1, 0})    // -2 times l1
	l4, _ := NewLine([]float64{0, 5, 10, 15}, []float64{0, 0.25, 0.5, 0}) // 0.5 times l1 mirrored
	if _, ok := l2.CountedAs(l1); ok {
		t.Error("a line with another shape was counted as l1")
	}
	if m, ok := l3.CountedAs(l1); !ok || math.Abs(m.factor+2) > 1e-12 {
		t.Errorf("-2 times l1: %v, %+v", ok, m)
	}
	if m, ok := l4.CountedAs(l1); !ok || math.Abs(m.factor-0.5) > 1e-12 || m.base.dir[0] != l1.dir[1] {
		t.Errorf("0.5 times l1 mirrored: %v, %+v", ok, m)
	}
}
