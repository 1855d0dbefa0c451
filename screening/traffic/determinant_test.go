package traffic

import (
	"math"
	"testing"
)

func TestDeterminantLength(t *testing.T) {
	cases := []struct {
		name  string
		spans []float64
		want  float64
	}{
		// from memory: EN 1991-2 Table 6.2: one span, L_phi = L
		{"one span", []float64{48}, 48},
		// from memory: EN 1991-2 Table 6.2: two spans, 1.2 x mean = 1.2 x 45 = 54
		{"two spans", []float64{40, 50}, 54},
		// from memory: three spans, 1.3 x mean = 1.3 x 40 = 52
		{"three spans", []float64{40, 40, 40}, 52},
		// from memory: never less than the longest span: 1.2 x 35 = 42 < 60
		{"one long span", []float64{10, 60}, 60},
		// from memory: five or more spans, 1.5 x mean
		{"six spans", []float64{20, 20, 20, 20, 20, 20}, 30},
	}
	for _, c := range cases {
		if got := DeterminantLengthM(c.spans); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s: %g, want %g", c.name, got, c.want)
		}
	}
	// The dynamic factor of a two-span truss uses the determinant length: Phi2 at 54 m
	// (from memory: EN 1991-2 6.4.5.2, 1.44/(sqrt(54) - 0.2) + 0.82).
	d := DynamicFor(Dynamic{Kind: Phi2}, []float64{40, 50})
	if got, want := d.Factor(90), 1.44/(math.Sqrt(54)-0.2)+0.82; math.Abs(got-want) > 1e-12 {
		t.Errorf("Phi2 of two spans: %g, want %g", got, want)
	}
	// AREMA takes the span loaded: for unequal spans the shorter, whose allowance is the
	// larger (16 + 600/(L - 30) percent falls with L, from memory: AREMA chapter 15).
	if got := (Dynamic{Kind: AREMASteel}).LengthFor([]float64{40, 50}); got != 40 {
		t.Errorf("AREMA length of spans 40 and 50 m: %g", got)
	}
	if d := DynamicFor(Dynamic{Kind: Phi2, LengthM: 12}, []float64{40, 50}); d.LengthM != 12 {
		t.Errorf("a stated length was replaced: %g", d.LengthM)
	}
}
