package fatigue

import (
	"fmt"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

func genLine(t *rapid.T) (x, eta []float64) {
	n := rapid.IntRange(2, 7).Draw(t, "points")
	x = []float64{rapid.Float64Range(-5, 5).Draw(t, "x0")}
	for k := 1; k < n; k++ {
		x = append(x, x[k-1]+rapid.Float64Range(0.5, 8).Draw(t, "dx"))
	}
	jumps := rapid.Bool().Draw(t, "jumps")
	eta = make([]float64, n)
	for k := range eta {
		if (k == 0 || k == n-1) && !jumps {
			continue
		}
		eta[k] = rapid.Float64Range(-2, 2).Draw(t, "eta")
	}
	return x, eta
}

// genPassageTrain draws a train of fixed count with finite parts applied whole, the trains a
// passage takes.
func genPassageTrain(t *rapid.T) *traffic.Train {
	tr := &traffic.Train{Name: "drawn"}
	for k := range rapid.IntRange(1, 3).Draw(t, "vehicles") {
		v := traffic.Vehicle{Name: fmt.Sprint("v", k), LengthM: rapid.Float64Range(1.5, 12).Draw(t, "length")}
		at := 0.0
		for range rapid.IntRange(1, 3).Draw(t, "axles") {
			// Axles closer than a micrometre stand together (a gap of 1e-15 m is no train's,
			// and positions that close fall within the sweep's rounding).
			gap := rapid.Float64Range(0, 4).Draw(t, "gap")
			if gap < 1e-6 {
				gap = 0
			}
			at = min(at+gap, v.LengthM)
			v.Axles = append(v.Axles, traffic.Axle{AtM: at, LoadKN: rapid.Float64Range(10, 300).Draw(t, "load")})
		}
		n := rapid.IntRange(1, 3).Draw(t, "count")
		tr.Consist = append(tr.Consist, traffic.Group{Vehicle: v, Min: n, Max: n})
	}
	if rapid.Bool().Draw(t, "part") {
		from := rapid.Float64Range(-5, 20).Draw(t, "from")
		tr.Parts = append(tr.Parts, traffic.Part{FromM: from, ToM: from + rapid.Float64Range(0.5, 30).Draw(t, "part length"),
			QKNPerM: rapid.Float64Range(5, 150).Draw(t, "q"), Mode: traffic.Whole})
	}
	return tr
}

// forceAt is the brute force: the member force with the train's front at s (left to right),
// summing every axle and integrating every part over the line directly (analysis.Interpolate;
// the integral by the trapezium rule over the line's pieces, exact for a linear piece).
func forceAt(x, eta []float64, tr *traffic.Train, s float64) float64 {
	f := 0.0
	for _, a := range tr.Axles(tr.Consist[len(tr.Consist)-1].Max) {
		f += a.LoadKN * analysis.Interpolate(x, eta, s-a.AtM)
	}
	for _, p := range tr.Parts {
		a, b := max(s-p.ToM, x[0]), min(s-p.FromM, x[len(x)-1])
		if a >= b {
			continue
		}
		pts := []float64{a}
		for _, xv := range x {
			if xv > a && xv < b {
				pts = append(pts, xv)
			}
		}
		pts = append(pts, b)
		for k := 1; k < len(pts); k++ {
			f += p.QKNPerM * (analysis.Interpolate(x, eta, pts[k-1]) + analysis.Interpolate(x, eta, pts[k])) / 2 * (pts[k] - pts[k-1])
		}
	}
	return f
}

func scaleOf(x, eta []float64, tr *traffic.Train) float64 {
	w := 0.0
	for _, a := range tr.Axles(tr.Consist[len(tr.Consist)-1].Max) {
		w += a.LoadKN
	}
	for _, p := range tr.Parts {
		w += p.QKNPerM * (p.ToM - p.FromM)
	}
	e := 0.0
	for _, v := range eta {
		e = max(e, math.Abs(v))
	}
	return max(w*e, 1)
}

// The history's extremes over both directions are the envelope's (screening/envelope, an
// independent sweep with its own brute-force tests), and every point of the history away from
// a jump is the brute-force force at its position, and the brute force at random positions
// never leaves the range of the history's neighbouring points.
func TestHistoryAgreesWithEnvelopeAndBruteForce(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, eta := genLine(t)
		tr := genPassageTrain(t)
		l, p := prepared(t, x, eta, tr)
		env, err := envelope.Compute(x, [][]float64{eta}, tr, envelope.Options{})
		if err != nil {
			t.Fatal(err)
		}
		tol := 1e-9 * scaleOf(x, eta, tr)
		var c Calculator
		hi, lo := 0.0, 0.0
		for _, dir := range []Direction{LeftToRight, RightToLeft} {
			h := c.History(l, p, dir, nil)
			if h[0].Value != 0 || math.Abs(h[len(h)-1].Value) > tol {
				t.Fatalf("%s: history does not start and end empty: %v", dir, h)
			}
			xd, ed := x, eta
			if dir == RightToLeft {
				xd, ed = mirror(x, eta)
			}
			for k, pt := range h {
				hi, lo = max(hi, pt.Value), min(lo, pt.Value)
				// A jump's two values stand at one position, or at two a rounding apart.
				near := func(j int) bool { return math.Abs(h[j].HeadM-pt.HeadM) <= 1e-9*(1+math.Abs(pt.HeadM)) }
				nearJump := (k > 0 && near(k-1)) || (k+1 < len(h) && near(k+1))
				if !nearJump {
					if want := forceAt(xd, ed, tr, pt.HeadM); math.Abs(want-pt.Value) > tol {
						t.Fatalf("%s: point %d at %v: history %v, brute force %v", dir, k, pt.HeadM, pt.Value, want)
					}
				}
				if k == 0 {
					continue
				}
				// Between two points the force is monotonic: any position in between lies
				// within their values.
				a := h[k-1]
				// An interval a rounding long (two events that differ only by rounding, an
				// axle reaching a bearing with a jump) has no inside to probe: the brute
				// force may count the axle on the bridge where the history, a rounding
				// before, does not.
				if pt.HeadM-a.HeadM > 1e-9*(1+math.Abs(pt.HeadM)) {
					// kept off the ends, where a jump at a bearing lies a rounding away
					s := a.HeadM + (0.001+0.998*rapid.Float64Range(0, 1).Draw(t, "between"))*(pt.HeadM-a.HeadM)
					if s > a.HeadM && s < pt.HeadM {
						f := forceAt(xd, ed, tr, s)
						if f > max(a.Value, pt.Value)+tol || f < min(a.Value, pt.Value)-tol {
							t.Fatalf("%s: force %v at %v outside its points' values %v and %v", dir, f, s, a.Value, pt.Value)
						}
					}
				}
			}
		}
		// screening/envelope: the largest tension and compression over both directions.
		if math.Abs(hi-env[0].Max.Value) > tol || math.Abs(lo-env[0].Min.Value) > tol {
			t.Fatalf("history extremes %v, %v; envelope %v, %v", hi, lo, env[0].Max.Value, env[0].Min.Value)
		}
	})
}

func mirror(x, eta []float64) ([]float64, []float64) {
	n := len(x)
	mx, me := make([]float64, n), make([]float64, n)
	for j := range x {
		mx[j] = x[0] + x[n-1] - x[n-1-j]
		me[j] = eta[n-1-j]
	}
	return mx, me
}

// TestSteadyCountsAreLinear: a passage of a train with many identical vehicles has the
// damage of steady's two shorter trains extended linearly (the shortcut Check takes), on any
// line and train: the reference counts the real train's whole history (Turning, Rainflow).
func TestSteadyCountsAreLinear(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, eta := genLine(t)
		tr := genPassageTrain(t)
		span := x[len(x)-1] - x[0]
		// enough vehicles that the shortcut applies, and a few more
		n := steadyCount(t, tr, span)
		p := withVehicles(t, tr, n+rapid.IntRange(2, 8).Draw(t, "extra vehicles"))
		l, err := NewLine(x, eta)
		if err != nil {
			t.Fatal(err)
		}
		if p.steady(span) >= p.count {
			t.Fatalf("steady count %d not below the train's %d", p.steady(span), p.count)
		}
		curve, _ := NewCurve(71, 1)
		// ranges up to about 150 MPa: on both slopes of the curve
		scale := 150 / max(scaleOf(x, eta, tr), 1e-9)
		var c Calculator
		for _, dir := range []Direction{LeftToRight, RightToLeft} {
			c.Forget()
			got := c.passage(l, p, dir, span).damage(curve, scale)
			h := c.History(l, p, dir, nil)
			cycles, _, _ := RainflowRepeated(Turning(h, PassageTol(l, p), nil), nil, nil, nil)
			want := curve.Damage(cycles, scale)
			// Within 1e-8: identical vehicles give maxima equal but for rounding, and the
			// repeating run starts at the first of them, which may be another vehicle's in
			// the shorter trains than in the whole one; the pairing of such near-ties moves a
			// damage by some 1e-10 of itself, which the extension over the extra vehicles
			// multiplies (seen: 3.8e-9 with 6 extra, a few in 10,000 draws).
			if math.Abs(got-want) > 1e-8*max(want, 1e-12) {
				t.Fatalf("%s, %d vehicles (steady %d): shortcut damage %v, whole history %v", dir, p.count, p.steady(span), got, want)
			}
		}
	})
}
