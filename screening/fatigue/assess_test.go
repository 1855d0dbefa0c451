package fatigue

import (
	"math"
	"testing"
)

func TestPastYears(t *testing.T) {
	s := Settings{Year: 2026, DefaultYearBuilt: 1900, History: []Period{{FromYear: 1950, Factor: 0.5}, {FromYear: 1990, Factor: 1}}}
	cases := []struct {
		name  string
		built int
		want  float64
	}{
		// by hand: 1901-1990 at 0.5 (89 years, the first period reaching back to the year
		// built) = 44.5, 1990-2026 at 1 = 36: 80.5.
		{"built 1901", 1901, 80.5},
		// by hand: 1960-1990 at 0.5 = 15, then 36: 51.
		{"built 1960", 1960, 51},
		// by hand: 2000-2026 at 1: 26.
		{"built 2000", 2000, 26},
		// not known: the default, 1900: 90 x 0.5 + 36 = 81.
		{"not known", 0, 81},
	}
	for _, c := range cases {
		if got := s.PastYears(c.built); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s: %v years of today's traffic, want %v (by hand)", c.name, got, c.want)
		}
	}
	// No history: today's existing traffic every year since the year built (by definition).
	if got := (&Settings{Year: 2026}).PastYears(1926); got != 100 {
		t.Errorf("no history: %v, want 100", got)
	}
}

func TestParseCategory(t *testing.T) {
	cases := []struct {
		in     string
		want   float64
		ok     bool
		errors bool
	}{{"71", 71, true, false}, {" 90 ", 90, true, false}, {"riveted", 71, true, false}, {"Riveted", 71, true, false},
		{"", 0, false, false}, {"B", 0, false, true}, {"-3", 0, false, true}, {"1e9", 0, false, true}}
	for _, c := range cases {
		got, ok, err := ParseCategory(c.in, 71)
		if got != c.want || ok != c.ok || (err != nil) != c.errors {
			t.Errorf("ParseCategory(%q) = %v, %v, %v", c.in, got, ok, err)
		}
	}
}

func checkSettings() *Settings {
	return &Settings{GammaMf: 1, RivetedCategoryMPa: 71, DynamicFactor: 1, Year: 2026, DefaultYearBuilt: 1900, HorizonYears: 50, RiseFactor: 1.5}
}

func TestCheckOneAxleByHand(t *testing.T) {
	// One 200 kN axle over a triangular line of peak 1 (a member whose force is the axle load at
	// mid-span), share 0.5, area 1,000 mm²: stress range 200 x 0.5 / 1,000 mm² = 100 MPa, one
	// cycle per passage (two half cycles). Category 71: N = 2e6 (71/100)^3 = 715,822 (EN
	// 1993-1-9, from memory), so 1.39700e-6 per passage. 10,000 passages a year: 1.39700e-2.
	// The proposed axle of 250 kN: 125 MPa, N = 2e6 (71/125)^3 = 366,500.9: 2.72851e-2 a year
	// (ratio 1.25^3 = 1.953125). Built 1976, 50 years to 2026: damage to date 0.698501;
	// remaining (1 - 0.698501) / 2.72851e-2 = 11.0500 years, running out in 2037.
	l, _ := NewLine([]float64{0, 5, 10}, []float64{0, 1, 0})
	ex, _ := PrepareTrain(axleTrain("ex", 1, 200))
	pr, _ := PrepareTrain(axleTrain("pr", 1, 250))
	curve, _ := NewCurve(71, 1)
	var c Calculator
	r, err := c.Check(Member{Line: l, AreaMM2: 1000, Curve: curve}, Bridge{SpanM: 10, YearBuilt: 1976, Shares: []float64{0.5}}, checkSettings(),
		[]Traffic{{Train: ex, PerYear: 1e4}}, []Traffic{{Train: pr, PerYear: 1e4}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	near := func(name string, got, want float64) {
		t.Helper()
		if math.Abs(got-want) > 1e-5*math.Abs(want) {
			t.Errorf("%s = %v, want %v (by hand)", name, got, want)
		}
	}
	near("existing damage a year", r.PerYearExisting, 1.39700e-2)
	near("proposed damage a year", r.PerYearProposed, 2.72851e-2)
	near("ratio", r.Ratio, 1.953125)
	near("damage to date", r.ToDate, 0.698501)
	near("remaining years", r.RemainingYears, 11.0500)
	near("largest proposed range", r.MaxRangeProposedMPa, 125)
	if r.EndYear != 2037 || r.Status != Damaged || len(r.Flags) != 2 || r.Flags[0] != FlagLife || r.Flags[1] != FlagRise {
		t.Errorf("end year %d, status %s, flags %v; want 2037, damaged, [fatigue-life fatigue-rise]", r.EndYear, r.Status, r.Flags)
	}
}

func TestRiseOfStressRange(t *testing.T) {
	// DOMAIN.md (from memory, EN 1993-1-9's slopes): a 25 % rise of every stress range
	// multiplies the damage by 1.25^3 = 1.95 where the ranges lie on the slope-3 line and by
	// 1.25^5 = 3.05 where they lie on the slope-5 line (both before and after).
	l, _ := NewLine([]float64{0, 5, 10}, []float64{0, 1, 0})
	curve, _ := NewCurve(71, 1)
	cases := []struct {
		name    string
		axleKN  float64
		want    float64
		section string
	}{
		{"slope 3", 120, math.Pow(1.25, 3), "60 and 75 MPa, above dD = 52.3"},
		{"slope 5", 64, math.Pow(1.25, 5), "32 and 40 MPa, between dL = 28.7 and dD = 52.3"},
	}
	for _, k := range cases {
		ex, _ := PrepareTrain(axleTrain("ex", 1, k.axleKN))
		pr, _ := PrepareTrain(axleTrain("pr", 1, 1.25*k.axleKN))
		var c Calculator
		r, err := c.Check(Member{Line: l, AreaMM2: 1000, Curve: curve}, Bridge{SpanM: 10, YearBuilt: 2000, Shares: []float64{0.5}}, checkSettings(),
			[]Traffic{{Train: ex, PerYear: 100}}, []Traffic{{Train: pr, PerYear: 100}}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.Ratio-k.want) > 1e-9*k.want {
			t.Errorf("%s (%s): ratio %v, want %v", k.name, k.section, r.Ratio, k.want)
		}
	}
}

func TestBelowCutOffAndTracks(t *testing.T) {
	l, _ := NewLine([]float64{0, 5, 10}, []float64{0, 1, 0})
	curve, _ := NewCurve(71, 1)
	small, _ := PrepareTrain(axleTrain("small", 1, 50)) // 25 MPa < dL = 28.7 (EN 1993-1-9, from memory)
	var c Calculator
	r, err := c.Check(Member{Line: l, AreaMM2: 1000, Curve: curve}, Bridge{SpanM: 10, Shares: []float64{0.5}}, checkSettings(),
		[]Traffic{{Train: small, PerYear: 1e6}}, []Traffic{{Train: small, PerYear: 1e6}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Status != BelowCutOff || r.PerYearProposed != 0 || !math.IsInf(r.RemainingYears, 1) || len(r.Flags) != 0 {
		t.Errorf("below the cut-off: %+v", r)
	}
	// Two tracks with shares 0.7 and 0.3: an unassigned train counts on the worse (0.7), one
	// assigned to track 2 on 0.3; damage on the slope-3 line scales with the share cubed.
	tr, _ := PrepareTrain(axleTrain("t", 1, 300))
	b := Bridge{SpanM: 10, Shares: []float64{0.7, 0.3}}
	worst, _ := c.Check(Member{Line: l, AreaMM2: 1000, Curve: curve}, b, checkSettings(), []Traffic{{Train: tr, PerYear: 1}}, []Traffic{{Train: tr, PerYear: 1}}, nil)
	two, _ := c.Check(Member{Line: l, AreaMM2: 1000, Curve: curve}, b, checkSettings(), []Traffic{{Train: tr, PerYear: 1}}, []Traffic{{Train: tr, PerYear: 1, Track: 2}}, nil)
	// 300 x 0.7 = 210 MPa and 300 x 0.3 = 90 MPa, both above dD: ratio (90/210)^3 (slope 3).
	if want := math.Pow(0.3/0.7, 3); math.Abs(two.PerYearProposed/worst.PerYearProposed-want) > 1e-9 {
		t.Errorf("track 2 against the worst track: %v, want %v", two.PerYearProposed/worst.PerYearProposed, want)
	}
	if _, err := c.Check(Member{Line: l, AreaMM2: 1000, Curve: curve}, b, checkSettings(), nil, []Traffic{{Train: tr, PerYear: 1, Track: 3}}, nil); err == nil {
		t.Error("a train on track 3 of a two-track bridge was accepted")
	}
}
