package envelope

import (
	"cmp"
	"math"
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/screening/truss/trusstest"
	"pgregory.net/rapid"
)

// genRake draws a rake of 1 to n identical vehicles, 1 to 4 axles each, sometimes symmetric
// (as reference wagons are), with n enough for every window the lines can feel or, now and
// then, one fewer (then the count sweeps run).
func genRake(t *rapid.T, spanM float64) *traffic.Train {
	v := genVehicle(t, "wagon")
	if rapid.Bool().Draw(t, "symmetric") {
		var mirrored []traffic.Axle
		for _, a := range v.Axles {
			mirrored = append(mirrored, traffic.Axle{AtM: v.LengthM - a.AtM, LoadKN: a.LoadKN})
		}
		v.Axles = append(v.Axles, mirrored...)
		slices.SortFunc(v.Axles, func(a, b traffic.Axle) int { return cmp.Compare(a.AtM, b.AtM) })
	}
	aMin, aMax := v.Axles[0].AtM, v.Axles[len(v.Axles)-1].AtM
	n := int(math.Floor((spanM+aMax-aMin)/v.LengthM)) + 1 + rapid.IntRange(-1, 3).Draw(t, "spare")
	return &traffic.Train{Name: "rake", Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: max(n, 1)}}}
}

// TestWindowsEqualCountSweeps: a rake of identical vehicles swept by windows of an endless
// train (windows.go) gives every member the extremes of the sweeps count by count (the
// reference: the event sweep, itself checked against the brute force), on lines with and
// without jumps at the bearings, and each placement reproduces its value by the independent
// reference response.
func TestWindowsEqualCountSweeps(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genLines(t)
		tr := genRake(t, x[len(x)-1]-x[0])
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		shortcutAgrees(t, x, ord, tr, plainSweeps{countSweeps: true})
	})
}

// TestWindowsOnContinuousTrusses: rakes of four-axle bogie wagons (10 m and 14 m, axles
// 1.5 m from the ends and 1.8 m apart in a bogie, symmetric: one direction swept) and of an
// asymmetric wagon (13.5 m; axles of 200, 200, 120, 120 kN at 1.2, 3.0, 11.0, 12.3 m: both
// directions) over trusses continuous over two and three spans, whose lines kink at every
// panel point and change sign twice or more, and over a simple Pratt: the windows give every
// member the extremes of the count-by-count sweeps (the reference), with placements that
// reproduce their values. Lines by the stiffness method
// (screening/analysis, itself checked against the method of sections and the force method).
func TestWindowsOnContinuousTrusses(t *testing.T) {
	for _, p := range []truss.Params{
		{Type: "howe", SpanM: 64, Panels: 12, DepthM: 8, Spans: 3},
		{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6, Spans: 2},
		{Type: "pratt", SpanM: 60, Panels: 10, DepthM: 8},
	} {
		lines, ord := trusstest.InfluenceLines(t, p)
		span := lines.X[len(lines.X)-1] - lines.X[0]
		bogie := func(L float64) traffic.Vehicle {
			return traffic.Vehicle{Name: "wagon", LengthM: L, Axles: []traffic.Axle{{AtM: 1.5, LoadKN: 225}, {AtM: 3.3, LoadKN: 225}, {AtM: L - 3.3, LoadKN: 225}, {AtM: L - 1.5, LoadKN: 225}}}
		}
		odd := traffic.Vehicle{Name: "wagon", LengthM: 13.5, Axles: []traffic.Axle{{AtM: 1.2, LoadKN: 200}, {AtM: 3.0, LoadKN: 200}, {AtM: 11.0, LoadKN: 120}, {AtM: 12.3, LoadKN: 120}}}
		for k, v := range []traffic.Vehicle{bogie(10), bogie(14), odd} {
			rake := &traffic.Train{Name: "rake", Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: int(math.Ceil(span/v.LengthM)) + 2}}}
			l, ld := prepared(t, lines.X, ord, rake)
			if !ld.rakeWindows(l) || ld.symmetricUnit() != (k < 2) {
				t.Fatalf("wagon %d: windows %v, symmetric %v", k, ld.rakeWindows(l), ld.symmetricUnit())
			}
			shortcutAgrees(t, lines.X, ord, rake, plainSweeps{countSweeps: true})
		}
	}
}
