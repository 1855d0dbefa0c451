package floor

import (
	"io/fs"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

func axles(name string, loads, spacings []float64) *traffic.Train {
	v := traffic.Vehicle{Name: name}
	at := 0.0
	for i, p := range loads {
		if i > 0 {
			at += spacings[i-1]
		}
		v.Axles = append(v.Axles, traffic.Axle{AtM: at, LoadKN: p})
	}
	v.LengthM = at + 0.5
	return &traffic.Train{Name: name, Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: 1}}}
}

func TestMaxMomentClosedForms(t *testing.T) {
	cases := []struct {
		name   string
		train  *traffic.Train
		span   float64
		want   float64
		source string
	}{
		{"one axle", axles("p", []float64{100}, nil), 6, 100 * 6 / 4.0, "simple beam, load at mid-span: M = PL/4 (handbook beam formula)"},
		{"two axles, formula governs", axles("pp", []float64{100, 100}, []float64{1.8}), 6,
			100 * (6 - 0.9) * (6 - 0.9) / (2 * 6), "two equal loads a apart: M = P(L - a/2)²/(2L) under one load a/4 from mid-span (textbook, from memory)"},
		{"two axles far apart, one alone governs", axles("pp", []float64{100, 100}, []float64{5}), 6,
			100 * 6 / 4.0, "P(L - a/2)²/(2L) = 102 < PL/4 = 150 when a > (2 - √2)L: one load alone (textbook, from memory)"},
		{"uniform over the span", &traffic.Train{Name: "q", Uniform: &traffic.Uniform{QKNPerM: 80, MaxM: math.Inf(1)}}, 5,
			80 * 25 / 8.0, "uniform load: M = qL²/8 (handbook beam formula)"},
		{"three equal axles close", axles("ppp", []float64{100, 100, 100}, []float64{1, 1}), 8,
			// Resultant under the middle axle: the middle one at mid-span, M = 1.5P·L/2 - P·1.
			150*4 - 100*1, "three equal loads, middle load at mid-span (statics by hand)"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p, err := MaxMoment(c.train, c.span)
			if err != nil {
				t.Fatal(err)
			}
			// source: see c.source
			if math.Abs(p.Value-c.want) > 1e-9*c.want {
				t.Fatalf("M = %.9g, want %.9g (%s)", p.Value, c.want, c.source)
			}
		})
	}
}

// TestTwoAxlesPosition checks the classical position: the larger moment stands under one axle
// placed a/4 from mid-span (textbook, from memory).
func TestTwoAxlesPosition(t *testing.T) {
	L, a := 7.0, 2.0
	p, err := MaxMoment(axles("pp", []float64{120, 120}, []float64{a}), L)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(p.SectionM - L/2); math.Abs(d-a/4) > 1e-9 {
		t.Fatalf("section %.9g m: %.9g from mid-span, want a/4 = %g (textbook, from memory)", p.SectionM, d, a/4)
	}
}

// momentLines is the bending-moment influence line of a simple span at section xi: a
// triangle of height xi(L - xi)/L (handbook).
func momentLine(L, xi float64) (x []float64, eta []float64) {
	if xi <= 0 || xi >= L {
		return []float64{0, L}, []float64{0, 0}
	}
	return []float64{0, xi, L}, []float64{0, xi * (L - xi) / L, 0}
}

// envelopeAt is the exact largest moment at one section, from the envelope package (an
// independent exact method that places the train over the section's influence line).
func envelopeAt(t testing.TB, tr *traffic.Train, L, xi float64) float64 {
	x, eta := momentLine(L, xi)
	res, err := envelope.Compute(x, [][]float64{eta}, tr, envelope.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return res[0].Max.Value
}

func demoTrains(t testing.TB) []*traffic.Train {
	var out []*traffic.Train
	for _, spec := range []string{"cooper:e=80", "cooper-alt:e=80", "lm71:alpha=1", "sw0:alpha=1", "sw2", "unloaded"} {
		tr, ok, err := traffic.Builtin(spec)
		if !ok || err != nil {
			t.Fatalf("built-in %s: %v %v", spec, ok, err)
		}
		out = append(out, tr)
	}
	files, err := fs.Glob(configs.Trains(), "*.yaml")
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		b, err := fs.ReadFile(configs.Trains(), f)
		if err != nil {
			t.Fatal(err)
		}
		tr, err := traffic.ParseTrainFile(f, b)
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, tr)
	}
	return out
}

// TestMaxMomentAgainstSections checks the absolute maximum against the exact envelope at a
// fine grid of sections (no section may beat it) and at the section it names (which must
// reproduce it): Cooper E80 (AREMA, values from memory), the other built-in models and the
// demo trains, on panel lengths of old trusses.
func TestMaxMomentAgainstSections(t *testing.T) {
	for _, tr := range demoTrains(t) {
		for _, L := range []float64{2.5, 4.2, 5.5, 6.1, 7.62, 9.0, 12.5} {
			p, err := MaxMoment(tr, L)
			if err != nil {
				t.Fatal(err)
			}
			tol := 1e-9 * max(p.Value, 1)
			// Brute force over sections (each section exact by the envelope package).
			best := 0.0
			for k := 1; k < 400; k++ {
				best = max(best, envelopeAt(t, tr, L, L*float64(k)/400))
			}
			if best > p.Value+tol {
				t.Errorf("%s on %g m: a section gives %.9g > absolute maximum %.9g", tr.Name, L, best, p.Value)
			}
			if best < p.Value*(1-2e-3) {
				t.Errorf("%s on %g m: sections reach only %.9g, absolute maximum %.9g (grid of L/400 should come within 0.2 %%)", tr.Name, L, best, p.Value)
			}
			if at := envelopeAt(t, tr, L, p.SectionM); math.Abs(at-p.Value) > 1e-7*max(p.Value, 1) {
				t.Errorf("%s on %g m: envelope at the named section %.6g m gives %.9g, reported %.9g", tr.Name, L, p.SectionM, at, p.Value)
			}
		}
	}
}

// bruteMoment is a brute force over train positions and sections with the moment summed
// from the influence line (trapezoidal sums for distributed parts, exact for linear pieces
// cut at the train's part ends): it never exceeds the exact maximum.
func bruteMoment(ft flatTrain, L float64, nx, ns int) float64 {
	best := 0.0
	lo := -ft.lenM - L
	for _, p := range ft.parts {
		if !math.IsInf(p.to, 0) {
			lo = min(lo, -p.to-L)
		}
	}
	hi := ft.lenM + 2*L
	for _, p := range ft.parts {
		if !math.IsInf(p.to, 0) {
			hi = max(hi, p.to+2*L)
		}
	}
	for i := 0; i <= ns; i++ {
		s := lo + (hi-lo)*float64(i)/float64(ns)
		for k := 1; k < nx; k++ {
			xi := L * float64(k) / float64(nx)
			eta := func(x float64) float64 {
				if x <= 0 || x >= L {
					return 0
				}
				if x <= xi {
					return x * (L - xi) / L
				}
				return xi * (L - x) / L
			}
			m := 0.0
			for _, a := range ft.axles {
				m += a.LoadKN * eta(s-a.AtM)
			}
			for _, p := range ft.parts {
				a, b := max(s-p.to, 0), min(s-p.from, L)
				if b <= a {
					continue
				}
				// the line is linear on [a, xi] and [xi, b]: trapezoids are exact there
				pts := []float64{a, b}
				if xi > a && xi < b {
					pts = []float64{a, xi, b}
				}
				for j := 0; j+1 < len(pts); j++ {
					m += p.q * (eta(pts[j]) + eta(pts[j+1])) / 2 * (pts[j+1] - pts[j])
				}
			}
			best = max(best, m)
		}
	}
	return best
}

// drawAxles draws a group of 1 to most axles of 10 to 300 kN, 0.5 to 5 m apart.
func drawAxles(rt *rapid.T, most int) *traffic.Train {
	n := rapid.IntRange(1, most).Draw(rt, "axles")
	loads := make([]float64, n)
	sp := make([]float64, max(n-1, 0))
	for i := range loads {
		loads[i] = rapid.Float64Range(10, 300).Draw(rt, "load")
	}
	for i := range sp {
		sp[i] = rapid.Float64Range(0.5, 5).Draw(rt, "spacing")
	}
	return axles("random", loads, sp)
}

// TestMaxMomentRapid: for random axle groups and spans, the exact maximum is never beaten by
// a brute force over positions and sections, and the envelope at its section reproduces it.
func TestMaxMomentRapid(t *testing.T) {
	proptest.Check(t, func(rt *rapid.T) {
		tr := drawAxles(rt, 6)
		if rapid.Bool().Draw(rt, "part") {
			from := rapid.Float64Range(-3, 10).Draw(rt, "from")
			tr.Parts = []traffic.Part{{FromM: from, ToM: from + rapid.Float64Range(0.5, 8).Draw(rt, "len"), QKNPerM: rapid.Float64Range(5, 150).Draw(rt, "q")}}
		}
		L := rapid.Float64Range(1.5, 12).Draw(rt, "span")
		p, err := MaxMoment(tr, L)
		if err != nil {
			rt.Fatal(err)
		}
		brute := bruteMoment(flatten(tr, L), L, 60, 600)
		if brute > p.Value*(1+1e-9)+1e-9 {
			rt.Fatalf("brute force %.9g beats exact %.9g", brute, p.Value)
		}
		if at := envelopeAt(t, tr, L, p.SectionM); math.Abs(at-p.Value) > 1e-7*max(p.Value, 1) {
			rt.Fatalf("envelope at section %.6g gives %.9g, reported %.9g", p.SectionM, at, p.Value)
		}
	})
}

// TestMaxMomentBruteForceCooper: Cooper E80 (AREMA, values from memory), the other built-in
// models and the demo trains on stringer spans, against a brute force over train positions
// (steps of 2 cm) and sections (span/100), the moment summed from the section's influence
// line: never above the exact maximum, and within 0.5 % of it at that resolution.
func TestMaxMomentBruteForceCooper(t *testing.T) {
	for _, tr := range demoTrains(t) {
		for _, L := range []float64{4.5, 6.1, 7.6} {
			p, err := MaxMoment(tr, L)
			if err != nil {
				t.Fatal(err)
			}
			ft := flatten(tr, L)
			ns := int((ft.lenM + 3*L) / 0.02)
			if ns > 20000 || ns <= 0 {
				ns = 20000
			}
			brute := bruteMoment(ft, L, 100, ns)
			if brute > p.Value*(1+1e-9)+1e-9 {
				t.Errorf("%s on %g m: brute force %.6g beats exact %.6g", tr.Name, L, brute, p.Value)
			}
			if brute < p.Value*(1-5e-3) {
				t.Errorf("%s on %g m: brute force reaches only %.6g of exact %.6g", tr.Name, L, brute, p.Value)
			}
		}
	}
}
