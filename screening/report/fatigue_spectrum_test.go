package report

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// axles is a train of one vehicle with 100 kN axles at the offsets given (m).
func axles(t *testing.T, name string, at ...float64) *fatigue.Train {
	t.Helper()
	v := traffic.Vehicle{Name: name, LengthM: at[len(at)-1] + 1}
	for _, a := range at {
		v.Axles = append(v.Axles, traffic.Axle{AtM: a, LoadKN: 100})
	}
	tr, err := fatigue.PrepareTrain(&traffic.Train{Name: name, Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: 1}}})
	if err != nil {
		t.Fatal(err)
	}
	return tr
}

// The histogram holds each scenario's cycles a year of every train together: passages a year
// times each passage's cycles, by range.
func TestYearlySpectrumByHand(t *testing.T) {
	// A member whose influence line is a triangle of peak 1 at the middle of a 10 m span
	// (common practice: a bottom chord's line is of this shape, scaled). By hand:
	// - one axle of 100 kN: the force rises to 100 kN and falls back: two half cycles of 100;
	// - two axles 8 m apart: 100 kN with the first at the peak, 40 kN while both stand on
	//   the falling and rising sides (0.2 + 0.2 of 100 kN each), 100 kN with the second at
	//   the peak: the turning points 0, 100, 40, 100, 0, by rainflow (ASTM E1049) one cycle
	//   of 60 and two half cycles of 100.
	// Share 1, factor 1, area 1000/1.05 mm²: 1.05 MPa per kN, so 105 and 63 MPa.
	line, err := fatigue.NewLine([]float64{0, 5, 10}, []float64{0, 1, 0})
	if err != nil {
		t.Fatal(err)
	}
	one, two := axles(t, "one", 0), axles(t, "two", 0, 8)
	curve, _ := fatigue.NewCurve(71, 1)
	s := &fatigue.Settings{GammaMf: 1, RivetedCategoryMPa: 71, DynamicFactor: 1, Year: 2026, DefaultYearBuilt: 1900, HorizonYears: 50, RiseFactor: 2}
	existing := []fatigue.Traffic{{Train: one, PerYear: 1000}, {Train: two, PerYear: 200}}
	proposed := []fatigue.Traffic{{Train: two, PerYear: 500, Directions: []fatigue.Direction{fatigue.LeftToRight}}}
	var kept []keptPassage
	keep := func(proposed bool, p fatigue.Passage) {
		p.History = append([]fatigue.Point(nil), p.History...)
		p.Cycles = append([]fatigue.Cycle(nil), p.Cycles...)
		kept = append(kept, keptPassage{p, proposed})
	}
	var c fatigue.Calculator
	if _, err := c.Check(fatigue.Member{Line: line, AreaMM2: 1000 / 1.05, Curve: curve}, fatigue.Bridge{SpanM: 10, Shares: []float64{1}},
		s, existing, proposed, keep); err != nil {
		t.Fatal(err)
	}
	got := yearlySpectrum(kept, 10)
	// By hand: existing 1000 x 1 + 200 x 1 cycles of 105 MPa and 200 x 1 of 63 MPa (1400 in
	// all: 1000 passages of one cycle, 200 of two); proposed 500 of each (500 passages of two).
	want := [2][]float64{make([]float64, 11), make([]float64, 11)}
	want[0][10], want[0][6] = 1200, 200
	want[1][10], want[1][6] = 500, 500
	for k := range want {
		if len(got[k]) != len(want[k]) {
			t.Fatalf("scenario %d: %d bins, want %d (105 MPa in bins of 10)", k, len(got[k]), len(want[k]))
		}
		total := 0.0
		for i := range want[k] {
			total += got[k][i]
			if math.Abs(got[k][i]-want[k][i]) > 1e-9 {
				t.Errorf("scenario %d, %d to %d MPa: %v cycles a year, want %v (by hand)", k, 10*i, 10*i+10, got[k][i], want[k][i])
			}
		}
		// By hand: passages a year times cycles a passage, summed over the trains.
		if wantTotal := []float64{1000*1 + 200*2, 500 * 2}[k]; math.Abs(total-wantTotal) > 1e-9 {
			t.Errorf("scenario %d: %v cycles a year in all, want %v", k, total, wantTotal)
		}
	}
}
