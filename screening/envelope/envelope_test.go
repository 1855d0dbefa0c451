package envelope

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

func TestClosedForms(t *testing.T) {
	const L = 24.0
	x, mid := simpleSpanMoment(L, L/2, 12)
	cases := []struct {
		name   string
		train  *traffic.Train
		want   float64
		source string
	}{
		// one axle: load times the largest ordinate, L/4 at midspan (statics)
		{"one axle", axleTrain("P", nil, []float64{100}), 100 * L / 4, "P L/4"},
		// two equal axles P at spacing s <= L/2 on the midspan moment line: one axle at midspan,
		// the other s away at ordinate L/4 - s/2, so M = P L/4 + P (L/4 - s/2) = P (L - s)/2
		{"two axles s=3", axleTrain("2P", []float64{3}, []float64{100, 100}), 100 * (L - 3) / 2, "P(L-s)/2"},
		{"two axles s=7.3", axleTrain("2P", []float64{7.3}, []float64{100, 100}), 100 * (L - 7.3) / 2, "P(L-s)/2"},
		// a long uniform load covers the whole line: q times its area L²/8 (statics)
		{"long uniform", traffic.NewUniform(20, 0, math.Inf(1)), 20 * L * L / 8, "q L²/8"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			res, err := Compute(x, [][]float64{mid}, c.train, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if got := res[0].Max.Value; !near(got, c.want, 1e-9) {
				t.Errorf("max %v, want %v (%s)", got, c.want, c.source)
			}
			if got := res[0].Min.Value; got != 0 || res[0].Min.Loaded {
				t.Errorf("min %v on an all-positive line, want 0 unloaded", got)
			}
		})
	}
}

// TestLM71SimpleSpanMidspan checks Load Model 71 (values from memory: 4 x 250 kN at 1.6 m,
// 80 kN/m beyond 0.8 m from the outer axles where unfavourable) on the midspan moment of a
// 20 m simple span, worked by hand (influence-line method, common practice): the triangle
// peaks at 5 m with slopes 1/2. With two axles on each side of midspan the axle sum of
// ordinates is 20 - (sum of distances to midspan)/2 = 16.8 wherever the group stands; the
// 6.4 m window free of distributed load covers least area at its extreme positions, from
// 7.6 m to 14.0 m, area (100 - 7.6²)/4 + (100 - 6²)/4 = 26.56 of the total 50. So
// M = 250 x 16.8 + 80 x (50 - 26.56) = 4200 + 1875.2 = 6075.2 kN m (three axles on one side
// give less: the axle sum falls 250 kN m per m while the distributed part gains at most 64).
func TestLM71SimpleSpanMidspan(t *testing.T) {
	x, mid := simpleSpanMoment(20, 10, 10)
	res, err := Compute(x, [][]float64{mid}, traffic.LM71(1), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if got := res[0].Max.Value; !near(got, 6075.2, 1e-9) {
		t.Errorf("LM71 midspan moment %v kN m, want 6075.2 (hand calculation above)", got)
	}
	p := res[0].Max.Placement
	// The reported placement must reproduce the value (brute-force reference).
	if got := responseRef(x, mid, traffic.LM71(1), placedRef{p.Direction, p.HeadM, p.Count, p.TrailingM}, 1); !near(got, 6075.2, 1e-9) {
		t.Errorf("placement %+v gives %v", p, got)
	}
	// alpha scales everything (EN 1991-2, from memory)
	res, _ = Compute(x, [][]float64{mid}, traffic.LM71(1.33), Options{Share: 0.5})
	if got := res[0].Max.Value; !near(got, 0.5*1.33*6075.2, 1e-9) {
		t.Errorf("LM71 alpha 1.33, share 0.5: %v, want %v", got, 0.5*1.33*6075.2)
	}
}

// TestPrattDiagonalVariableUniform: under a uniform load of variable length a Pratt
// diagonal's largest tension comes from loading one side of its zero crossing and its largest
// compression from the other side, even where that side is shorter than the minimum length
// (the train entering); a chord's from full-length loading (common practice).
func TestPrattDiagonalVariableUniform(t *testing.T) {
	const L, h, n = 40.0, 6.0, 8
	x, labels, ord := prattLines(L, h, n)
	var diag, chord []float64
	for i, lab := range labels {
		if lab == "diagonal" && diag == nil {
			diag = ord[i] // panel 2: x from 5 to 10
		}
		if lab == "bottom" && i == n/2 {
			chord = ord[i]
		}
	}
	p := L / n
	sin := h / math.Hypot(h, p)
	// panel shear of panel 2: -5/40 at x = 5, 30/40 at x = 10; zero crossing at
	// 5 + 5 x 0.125/0.875 = 5.714 m
	xc := 5 + 5*0.125/0.875
	negArea := -0.125 * xc / 2 / sin
	posArea := 0.75 * (L - xc) / 2 / sin
	const q = 20.0
	tr := traffic.NewUniform(q, 12, 48)
	res, err := Compute(x, [][]float64{diag, chord}, tr, Options{})
	if err != nil {
		t.Fatal(err)
	}
	d := res[0]
	if !near(d.Max.Value, q*posArea, 1e-9) || !near(d.Max.LoadedFromM, xc, 1e-9) || d.Max.LoadedToM != L {
		t.Errorf("diagonal tension %v over [%v, %v], want %v over [%v, %v]", d.Max.Value, d.Max.LoadedFromM, d.Max.LoadedToM, q*posArea, xc, L)
	}
	// compression: [0, 5.714], shorter than the 12 m minimum, allowed because it touches the bearing
	if !near(d.Min.Value, q*negArea, 1e-9) || d.Min.LoadedFromM != 0 || !near(d.Min.LoadedToM, xc, 1e-9) {
		t.Errorf("diagonal compression %v over [%v, %v], want %v over [0, %v]", d.Min.Value, d.Min.LoadedFromM, d.Min.LoadedToM, q*negArea, xc)
	}
	// Without the bearing exception no interval of 12 m or more could do it: every one from
	// the bearing reaches the positive part. Check that the exact answer beats those.
	best12 := q * integralRef(x, diag, 0, 12, identity)
	if !(d.Min.Value < best12) {
		t.Errorf("compression %v should exceed the 12 m loading's %v", d.Min.Value, best12)
	}
	// chord: full-length loading, q times the whole area (span 40 <= 48)
	pos, neg := analysis.Areas(x, chord)
	if c := res[1]; !near(c.Max.Value, q*(pos+neg), 1e-9) || c.Max.LoadedFromM != 0 || c.Max.LoadedToM != L {
		t.Errorf("chord %v over [%v, %v], want %v over the whole span", c.Max.Value, c.Max.LoadedFromM, c.Max.LoadedToM, q*(pos+neg))
	}
	// a shorter maximum length: the best 30 m stretch of a chord line is no longer the whole
	res, _ = Compute(x, [][]float64{chord}, traffic.NewUniform(q, 0, 30), Options{})
	if got := res[0].Max; !(got.Value < q*(pos+neg)) || got.LoadedToM-got.LoadedFromM > 30+1e-9 {
		t.Errorf("chord, max 30 m: %v over [%v, %v]", got.Value, got.LoadedFromM, got.LoadedToM)
	}
}

func TestOptionsFactor(t *testing.T) {
	x, mid := simpleSpanMoment(20, 10, 4)
	dyn, _ := traffic.ParseDynamic("phi2")
	res, _ := Compute(x, [][]float64{mid}, axleTrain("P", nil, []float64{100}), Options{Share: 0.5, Dynamic: dyn})
	// 100 kN x 5 m, half to this truss, Phi2 at L = 20 m: 1.44/(sqrt(20)-0.2)+0.82 (from memory)
	want := 500 * 0.5 * (1.44/(math.Sqrt(20)-0.2) + 0.82)
	if !near(res[0].Max.Value, want, 1e-12) {
		t.Errorf("%v, want %v", res[0].Max.Value, want)
	}
}

func TestMerge(t *testing.T) {
	x, mid := simpleSpanMoment(20, 10, 4)
	a, _ := Compute(x, [][]float64{mid}, axleTrain("light", nil, []float64{100}), Options{})
	b, _ := Compute(x, [][]float64{mid}, axleTrain("heavy", nil, []float64{200}), Options{})
	Merge(a, b)
	if a[0].Max.Train != "heavy" || !near(a[0].Max.Value, 1000, 1e-12) {
		t.Errorf("merged %+v", a[0].Max)
	}
}

func TestNewLinesErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		x    []float64
		ord  [][]float64
	}{
		{"one point", []float64{0}, [][]float64{{1}}},
		{"not ascending", []float64{0, 2, 2}, [][]float64{{0, 1, 0}}},
		{"wrong length", []float64{0, 1, 2}, [][]float64{{0, 1}}},
		{"no members", []float64{0, 1}, nil},
		{"nan", []float64{0, 1}, [][]float64{{0, math.NaN()}}},
	} {
		if _, err := NewLines(c.x, c.ord); err == nil {
			t.Errorf("%s: accepted", c.name)
		}
	}
}
