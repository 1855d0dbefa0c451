package envelope

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

func TestExactNeverBeatenAndReproduced(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genLines(t)
		tr := genTrain(t)
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		res, err := Compute(x, ord, tr, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for i, eta := range ord {
			scale := forceScale(x, eta, tr)
			for _, c := range senses(res[i]) {
				var brute float64
				if tr.Uniform != nil {
					brute = bruteUniform(x, eta, *tr.Uniform, c.sense)
				} else {
					brute = bruteTrain(x, eta, tr, c.sense)
				}
				tol := 1e-9 * scale
				if c.sense*(brute-c.e.Value) > tol {
					t.Fatalf("member %d sense %v: brute force %v beats exact %v (%+v)", i, c.sense, brute, c.e.Value, c.e.Placement)
				}
				if c.sense*c.e.Value < 0 {
					t.Fatalf("member %d sense %v: extreme %v has the wrong sign", i, c.sense, c.e.Value)
				}
				if !c.e.Loaded {
					if c.e.Value != 0 {
						t.Fatalf("member %d: unloaded extreme %v", i, c.e.Value)
					}
					continue
				}
				var got float64
				p := c.e.Placement
				if tr.Uniform != nil {
					if l := p.LoadedToM - p.LoadedFromM; l > tr.Uniform.MaxM+1e-9 || (l < tr.Uniform.MinM-1e-9 && p.LoadedFromM > x[0] && p.LoadedToM < x[len(x)-1]) {
						t.Fatalf("member %d: infeasible interval [%v, %v]", i, p.LoadedFromM, p.LoadedToM)
					}
					got = tr.Uniform.QKNPerM * integralRef(x, eta, p.LoadedFromM, p.LoadedToM, identity)
				} else {
					var ok bool
					if got, ok = placementGives(x, eta, tr, p, c.sense, c.e.Value, 1e-7*scale); ok {
						continue
					}
				}
				// a limit placement stands 1e-9 span off a jump: its value may differ by the slope times that
				if math.Abs(got-c.e.Value) > 1e-7*scale {
					t.Fatalf("member %d sense %v: placement %+v gives %v, reported %v", i, c.sense, p, got, c.e.Value)
				}
			}
		}
	})
}

// TestLongConsistReduction: a consist whose counts all exceed those the sweep needs (short
// span, long wagons) must give the brute force's extremes over every count, with placements
// that reproduce them on the train actually counted.
func TestLongConsistReduction(t *testing.T) {
	x := []float64{0, 3, 6, 9, 12}
	ord := [][]float64{{0, -0.4, 0.7, 0.3, 0}, {0, 0.5, 1, 0.5, 0}, {1, 0.2, -0.3, 0.1, -0.6}}
	loco := traffic.Vehicle{Name: "loco", LengthM: 9, Axles: []traffic.Axle{{AtM: 1.5, LoadKN: 20}, {AtM: 7.5, LoadKN: 20}}}
	wagon := traffic.Vehicle{Name: "wagon", LengthM: 7, Axles: []traffic.Axle{{AtM: 1, LoadKN: 90}, {AtM: 2.6, LoadKN: 180}, {AtM: 6.1, LoadKN: 300}}}
	for _, counts := range [][2]int{{6, 9}, {1, 12}, {4, 4}} {
		tr := &traffic.Train{Name: "long", Consist: []traffic.Group{{Vehicle: loco, Min: 1, Max: 1}, {Vehicle: wagon, Min: counts[0], Max: counts[1]}}}
		res, err := Compute(x, ord, tr, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for i, eta := range ord {
			for _, c := range senses(res[i]) {
				brute := bruteTrain(x, eta, tr, c.sense)
				if math.Abs(brute-c.e.Value) > 1e-6 {
					t.Errorf("counts %v member %d sense %v: exact %v, brute force %v", counts, i, c.sense, c.e.Value, brute)
				}
				p := c.e.Placement
				if !p.Loaded {
					continue
				}
				if p.Count < counts[0] || p.Count > counts[1] {
					t.Errorf("counts %v: reported count %d", counts, p.Count)
				}
				if got := responseRef(x, eta, tr, placedRef{p.Direction, p.HeadM, p.Count, 0}, c.sense); math.Abs(got-c.e.Value) > 1e-5 {
					t.Errorf("counts %v member %d: placement %+v gives %v, reported %v", counts, i, p, got, c.e.Value)
				}
			}
		}
	}
}
