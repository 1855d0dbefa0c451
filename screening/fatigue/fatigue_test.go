package fatigue

import (
	"math"
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// byRange sums cycle counts by range (ranges rounded to 1e-9 so that equal ranges meet).
func byRange(cs []Cycle) map[float64]float64 {
	out := map[float64]float64{}
	for _, c := range cs {
		out[math.Round(c.Range*1e9)/1e9] += c.Count
	}
	return out
}

func TestRainflowASTMExample(t *testing.T) {
	// ASTM E1049, the rainflow example history (recalled in DOMAIN.md, from memory):
	// -2, 1, -3, 5, -1, 3, -4, 4, -2 gives range 9: 1/2, 8: 1, 6: 1/2, 4: 1 1/2, 3: 1/2.
	hist := []float64{-2, 1, -3, 5, -1, 3, -4, 4, -2}
	got, _ := Rainflow(hist, nil, nil)
	want := map[float64]float64{9: 0.5, 8: 1, 6: 0.5, 4: 1.5, 3: 0.5}
	if g := byRange(got); !mapsEqual(g, want) {
		t.Fatalf("rainflow of the ASTM example: got %v, want %v", g, want)
	}
}

func mapsEqual(a, b map[float64]float64) bool {
	if len(a) != len(b) {
		return false
	}
	for k, v := range a {
		if math.Abs(b[k]-v) > 1e-12 {
			return false
		}
	}
	return true
}

func axleTrain(name string, spacingM float64, loads ...float64) *traffic.Train {
	v := traffic.Vehicle{Name: name, LengthM: spacingM*float64(len(loads)-1) + 1}
	for k, w := range loads {
		v.Axles = append(v.Axles, traffic.Axle{AtM: float64(k) * spacingM, LoadKN: w})
	}
	return &traffic.Train{Name: name, Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: 1}}}
}

// prepared is the line and the train prepared, failing t on an error.
func prepared(t interface{ Fatal(...any) }, x, eta []float64, tr *traffic.Train) (*Line, *Train) {
	l, err := NewLine(x, eta)
	if err != nil {
		t.Fatal(err)
	}
	p, err := PrepareTrain(tr)
	if err != nil {
		t.Fatal(err)
	}
	return l, p
}

func passageOf(t *testing.T, x, eta []float64, tr *traffic.Train, dir Direction) ([]float64, []Cycle) {
	t.Helper()
	l, p := prepared(t, x, eta, tr)
	var c Calculator
	h := c.History(l, p, dir, nil)
	tp := Turning(h, TurningTol(h), nil)
	cy, _ := Rainflow(tp, nil, nil)
	return tp, cy
}

func TestPassagesOverATriangle(t *testing.T) {
	// A triangular influence line, base 8 m, peak 1 at 4 m (a simple span's midspan moment line
	// scaled to 1; common practice).
	x, eta := []float64{0, 4, 8}, []float64{0, 1, 0}
	cases := []struct {
		name    string
		train   *traffic.Train
		turning []float64
		cycles  map[float64]float64
		source  string
	}{
		{name: "one axle", train: axleTrain("one", 1, 250), turning: []float64{0, 250, 0},
			cycles: map[float64]float64{250: 1},
			source: "by hand: the force rises to P eta = 250 kN and falls back; two half cycles of 250 kN make one"},
		{name: "two axles 6 m apart", train: axleTrain("two", 6, 100, 100),
			turning: []float64{0, 100, 50, 100, 0},
			cycles:  map[float64]float64{50: 1, 100: 1},
			// by hand, front at s: first axle at s, second at s - 6.
			// s = 4: first axle on the peak, F = 100; s = 6: first at 6 (eta 0.5), second
			// entering, F = 50; 6 to 8: one rises as the other falls, F stays 50; s = 10:
			// second on the peak, F = 100; s = 14: empty. Rainflow of 0, 100, 50, 100, 0:
			// one cycle 50 (100-50-100), two half cycles 100 (0-100, 100-0).
			source: "by hand"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for _, dir := range []Direction{LeftToRight, RightToLeft} {
				tp, cy := passageOf(t, x, eta, c.train, dir)
				if !slices.EqualFunc(tp, c.turning, func(a, b float64) bool { return math.Abs(a-b) < 1e-9 }) {
					t.Fatalf("%s: turning points %v, want %v (%s)", dir, tp, c.turning, c.source)
				}
				if g := byRange(cy); !mapsEqual(g, c.cycles) {
					t.Fatalf("%s: cycles %v, want %v (%s)", dir, g, c.cycles, c.source)
				}
			}
		})
	}
}

func TestCurveKnees(t *testing.T) {
	c, err := NewCurve(71, 1)
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name       string
		rangeMPa   float64
		wantCycles float64
		source     string
	}{
		{"category", 71, 2e6, "EN 1993-1-9 (from memory): the category is the range at 2e6 cycles"},
		{"constant-amplitude limit", c.LimitMPa(), 5e6, "EN 1993-1-9 (from memory): slope 3 to 5e6 cycles"},
		{"cut-off", c.CutOffMPa(), 1e8, "EN 1993-1-9 (from memory): slope 5 to 1e8 cycles"},
		{"twice the category", 142, 2e6 / 8, "slope 3: N = 2e6 (71/142)^3"},
		{"below the cut-off", 28, math.Inf(1), "EN 1993-1-9 (from memory): no damage below the cut-off"},
	}
	for _, k := range cases {
		if got := c.Cycles(k.rangeMPa); math.Abs(got-k.wantCycles) > 1e-9*k.wantCycles && got != k.wantCycles {
			t.Errorf("%s: N(%v MPa) = %v, want %v (%s)", k.name, k.rangeMPa, got, k.wantCycles, k.source)
		}
	}
	// DOMAIN.md, from memory: category 71 has dD = 52.3 MPa and dL = 28.7 MPa.
	if math.Abs(c.LimitMPa()-52.3) > 0.05 || math.Abs(c.CutOffMPa()-28.7) > 0.05 {
		t.Errorf("category 71: limit %v, cut-off %v MPa, want 52.3 and 28.7 (from memory)", c.LimitMPa(), c.CutOffMPa())
	}
	// Both lines meet at the knees (the curve is continuous): just above and below the limit.
	d := c.LimitMPa()
	if a, b := c.Cycles(d*(1+1e-12)), c.Cycles(d*(1-1e-12)); math.Abs(a-b) > 1e-9*a {
		t.Errorf("the curve jumps at the constant-amplitude limit: %v and %v", a, b)
	}
	// gamma_Mf multiplies the range: category 71 with 1.35 reaches 2e6 cycles at 71/1.35 MPa.
	g, _ := NewCurve(71, 1.35)
	if got := g.Cycles(71 / 1.35); math.Abs(got-2e6) > 1e-6*2e6 {
		t.Errorf("gamma_Mf 1.35: N(71/1.35) = %v, want 2e6 (EN 1993-1-9 (from memory): the partial factor divides the strength)", got)
	}
}

func TestMinerTwoLevels(t *testing.T) {
	// Miner's sum by hand, category 71, gamma_Mf 1:
	// 1,000 cycles of 100 MPa: N = 2e6 (71/100)^3 = 715,822, so 1.39700e-3;
	// 100,000 cycles of 40 MPa (between dL = 28.73 and dD = 52.313 MPa):
	// N = 5e6 (52.313/40)^5 = 1.91306e7, so 5.22723e-3. Sum 6.62422e-3.
	c, _ := NewCurve(71, 1)
	got := c.Damage([]Cycle{{Range: 100, Count: 1000}, {Range: 40, Count: 1e5}, {Range: 20, Count: 1e9}}, 1)
	if want := 6.62422e-3; math.Abs(got-want) > 1e-5*want {
		t.Fatalf("Miner's sum %v, want %v (by hand; the 20 MPa cycles are below the cut-off)", got, want)
	}
	// The scale takes kN to MPa: 100 kN over 1,000 mm² is 100 MPa.
	if a, b := c.Damage([]Cycle{{Range: 100e3, Count: 1}}, 1e-3), c.Damage([]Cycle{{Range: 100, Count: 1}}, 1); a != b {
		t.Fatalf("scaled damage %v, want %v", a, b)
	}
}

func TestDynamicFactor(t *testing.T) {
	cases := []struct {
		name        string
		v, lphi, n0 float64
		want        float64
		source      string
	}{
		{"standing still", 0, 20, 4, 1, "EN 1991-2 Annex C (from memory): K = 0 and alpha = 0 give no increment"},
		// by hand: K = 20/(2 20 4) = 0.125, phi' = 0.125/(1 - 0.125 + 0.125^4) = 0.142817;
		// alpha = 20/22, phi'' = alpha 0.56 e^-4 = 0.0093243 (the second term is 0 at
		// Lphi n0 = 80); 1 + (0.142817 + 0.0093243/2)/2 = 1.073740.
		{"20 m/s over 20 m at 4 Hz", 20, 20, 4, 1.073740, "EN 1991-2 Annex C (from memory), by hand"},
		// K = 40/(2 10 1) = 2 >= 0.76: phi' = 1.325; alpha = 1;
		// phi'' = 0.56 e^-1 + 0.5 (10/80 - 1) e^-0.25 = 0.206013 - 0.340746 < 0: 0.
		{"resonant", 40, 10, 1, 1 + 1.325/2, "EN 1991-2 Annex C (from memory), by hand"},
	}
	for _, c := range cases {
		got, err := DynamicFactor(c.v, c.lphi, c.n0)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-c.want) > 2e-6 {
			t.Errorf("%s: %v, want %v (%s)", c.name, got, c.want, c.source)
		}
	}
	// EN 1991-2 Figure 6.10 (from memory): the two lower-bound formulas nearly meet at 20 m.
	if a, b := LowerFrequency(20), 23.58*math.Pow(20, -0.592); math.Abs(a-b) > 0.05 {
		t.Errorf("lower frequency bounds at 20 m: %v and %v", a, b)
	}
	if _, err := DynamicFactor(-1, 20, 4); err == nil {
		t.Error("a negative speed was accepted")
	}
}

func TestRefusesEnvelopeLoads(t *testing.T) {
	lm71, _, err := traffic.Builtin("lm71:alpha=1")
	if err != nil {
		t.Fatal(err)
	}
	for _, tr := range []*traffic.Train{lm71, traffic.NewUniform(20, 0, 30)} {
		if _, err := PrepareTrain(tr); err == nil {
			t.Errorf("train %s was accepted as a passage", tr.Name)
		}
	}
}
