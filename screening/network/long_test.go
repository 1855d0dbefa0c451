package network_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/screening/truss/trusstest"
	"pgregory.net/rapid"
)

// TestLongTrainEqualsRakes: on random trusses of every type (trusstest.RandomParams), where
// LongSuffices holds, the envelope of the long reference train is, member by member, that of
// 1 to WagonsMax wagons swept at every count that matters (the envelope package's exact sweep
// of the variable consist is the reference: an independent formulation of the same loading).
func TestLongTrainEqualsRakes(t *testing.T) {
	geoms := network.Geometries()
	proptest.Check(t, func(rt *rapid.T) {
		p := trusstest.RandomParams(rt)
		tr, err := truss.Build(p)
		if err != nil {
			rt.Skip(err)
		}
		lines, err := analysis.InfluenceLines(tr, analysis.Options{})
		if err != nil {
			rt.Skip(err)
		}
		ords := make([][]float64, len(lines.Members))
		for i, m := range lines.Members {
			ords[i] = m.Ordinates
		}
		if !network.LongSuffices(ords) {
			rt.Skip("a line changes sign twice")
		}
		g := geoms[rapid.IntRange(0, len(geoms)-1).Draw(rt, "geometry")]
		rakes, err := envelope.Compute(lines.X, ords, g.Unit, envelope.Options{})
		if err != nil {
			rt.Fatal(err)
		}
		long, err := envelope.Compute(lines.X, ords, g.Long, envelope.Options{})
		if err != nil {
			rt.Fatal(err)
		}
		for i := range rakes {
			// Within 1e-9 of the member's largest force: a sweep of the long train adds
			// rounding over its many positions (a line of one sign shows a compression of
			// 1e-9 of its tension), and an extreme below 1e-9 kN is reported as none.
			scale := 1 + max(math.Abs(rakes[i].Max.Value), math.Abs(rakes[i].Min.Value), math.Abs(long[i].Max.Value), math.Abs(long[i].Min.Value))
			for _, c := range [][2]float64{{rakes[i].Max.Value, long[i].Max.Value}, {rakes[i].Min.Value, long[i].Min.Value}} {
				if math.Abs(c[0]-c[1]) > 1e-9*scale {
					rt.Fatalf("%s, %s: rakes %v, long train %v", p.Type, lines.Members[i].Label, c[0], c[1])
				}
			}
		}
	})
}

// TestLongTrainNeedsOneSignChange: a line positive in its middle and negative at both ends
// (two sign changes) is loaded best by a short rake over its middle; the long train must load
// a negative end as well, so LongSuffices refuses it (worked here: a unit triangle over 20 to
// 40 m between negative ends, on a 60 m span, and the 10 m wagons of C4).
func TestLongTrainNeedsOneSignChange(t *testing.T) {
	x := []float64{0, 10, 20, 30, 40, 50, 60}
	eta := [][]float64{{0, -1, 0, 1, 0, -1, 0}}
	if network.LongSuffices(eta) {
		t.Fatal("LongSuffices accepts a line with two sign changes")
	}
	c4, _ := network.ByName("C4")
	var g network.Geometry
	for _, geo := range network.Geometries() {
		if math.Abs(geo.LengthM-c4.WagonLengthM()) < 1e-9 {
			g = geo
		}
	}
	rakes, err := envelope.Compute(x, eta, g.Unit, envelope.Options{})
	if err != nil {
		t.Fatal(err)
	}
	long, err := envelope.Compute(x, eta, g.Long, envelope.Options{})
	if err != nil {
		t.Fatal(err)
	}
	// One 10 m wagon centred on x = 30 m puts its axles (1.5, 3.3, 6.7, 8.5 m behind its
	// front) at 26.5, 28.3, 31.7, 33.5 m: 0.65 + 0.83 + 0.83 + 0.65 = 2.96 (linear
	// interpolation on the triangle), so the rakes reach at least that; the long train cannot
	// avoid the negative ends, so it does less.
	if !(rakes[0].Max.Value >= 2.96-1e-9) || !(long[0].Max.Value < rakes[0].Max.Value-0.1) {
		t.Errorf("largest effect: rakes %v (want >= 2.96), long train %v (want clearly less)", rakes[0].Max.Value, long[0].Max.Value)
	}
}
