package network_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/network"
	"pgregory.net/rapid"
)

// TestFewerWagonsSameEnvelope: over random influence lines of any sign pattern (jumps at the
// bearings included) and spans from a few metres to 200 m, the trains cut to
// WagonsThatMatter wagons give every line the envelope of the full trains, the unit train of
// 1 to WagonsMax wagons and the long train of WagonsMax (the envelope package's exact sweep
// of the full trains is the reference).
func TestFewerWagonsSameEnvelope(t *testing.T) {
	geoms := network.Geometries()
	proptest.Check(t, func(rt *rapid.T) {
		n := rapid.IntRange(2, 12).Draw(rt, "points")
		span := rapid.Float64Range(4, 200).Draw(rt, "span")
		x := make([]float64, n)
		for k := range x {
			x[k] = span * float64(k) / float64(n-1)
		}
		var ords [][]float64
		for range rapid.IntRange(1, 3).Draw(rt, "lines") {
			eta := make([]float64, n)
			for k := range eta {
				eta[k] = rapid.Float64Range(-2, 2).Draw(rt, "eta")
			}
			ords = append(ords, eta)
		}
		g := geoms[rapid.IntRange(0, len(geoms)-1).Draw(rt, "geometry")]
		w := network.WagonsThatMatter(span, g.LengthM)
		for _, c := range []struct {
			name      string
			full, cut bool
		}{{"unit", false, false}, {"long", true, true}} {
			fullTrain := g.Unit
			if c.full {
				fullTrain = g.Long
			}
			want, err := envelope.Compute(x, ords, fullTrain, envelope.Options{})
			if err != nil {
				rt.Fatal(err)
			}
			got, err := envelope.Compute(x, ords, g.Wagons(w, c.cut), envelope.Options{})
			if err != nil {
				rt.Fatal(err)
			}
			for i := range want {
				for _, v := range [][2]float64{{want[i].Max.Value, got[i].Max.Value}, {want[i].Min.Value, got[i].Min.Value}} {
					if math.Abs(v[0]-v[1]) > 1e-9*(1+math.Abs(v[0])) {
						rt.Fatalf("%s train, %d of %g m wagons over %g m, line %d: full %v, cut %v", c.name, w, g.LengthM, span, i, v[0], v[1])
					}
				}
			}
		}
	})
	// The count: a 60 m span and 15 m wagons need 4 + 2; a span beyond the longest train
	// keeps them all.
	if got := network.WagonsThatMatter(60, 15); got != 6 {
		t.Errorf("60 m span, 15 m wagons: %d wagons, want 6", got)
	}
	if got := network.WagonsThatMatter(1e4, 15); got != network.WagonsMax {
		t.Errorf("10 km span: %d wagons, want %d", got, network.WagonsMax)
	}
}
