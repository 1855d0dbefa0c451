package envelope

import (
	"fmt"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

// Edge cases of the rake windows (windows.go) and of the sparse sweep of trains with
// distributed parts (curved.go), drawn to make events coincide. References: the older exact sweeps (count by count,
// dense), the brute force of reference_test.go (bruteTrain: the force from its definition,
// sum of P eta plus integrals of q eta, over finely stepped and critical placements), and
// hand sums where stated.

// reviewGrid are step lengths drawn from a small set, so that panel lengths, axle spacings,
// vehicle lengths and the span coincide often (events at equal positions).
var reviewGrid = []float64{0.5, 1, 1.5, 2, 2.5, 3, 4, 5, 6}

// genReviewLines draws 1 to 3 lines on 2 to 7 points, with steps from reviewGrid or
// arbitrary, an origin far from zero at times, lines that are zero over stretches and lines
// with several sign changes; jumps at the bearings when jumps.
//
// With dyadic, free draws are rounded to 1/1024 m, so that sums of them are exact in floating
// point and coincidences are exact; without it, coincidences hold to within rounding only
// (where the two exact sweeps may then differ is pinned down by
// TestEdgeWindowsThresholdRounding and TestEdgeWindowsBearingTolerance).
func genReviewLines(t *rapid.T, jumps, dyadic bool) (x []float64, ord [][]float64) {
	n := rapid.IntRange(2, 7).Draw(t, "points")
	x0 := rapid.SampledFrom([]float64{0, -3, -17.5, 4.25, 1000, -2500.5}).Draw(t, "x0")
	grid := rapid.Bool().Draw(t, "grid steps")
	x = append(x, x0)
	for k := 1; k < n; k++ {
		dx := rapid.SampledFrom(reviewGrid).Draw(t, "dx")
		if !grid {
			dx = roundIf(dyadic, rapid.Float64Range(0.3, 9).Draw(t, "dx free"))
		}
		x = append(x, x[k-1]+dx)
	}
	for range rapid.IntRange(1, 3).Draw(t, "members") {
		o := make([]float64, n)
		style := rapid.SampledFrom([]string{"random", "zero stretch", "alternating", "constant"}).Draw(t, "style")
		for k := range o {
			switch style {
			case "random":
				o[k] = rapid.Float64Range(-2, 2).Draw(t, "eta")
			case "zero stretch":
				if rapid.Bool().Draw(t, "zero here") {
					o[k] = 0
				} else {
					o[k] = rapid.Float64Range(-2, 2).Draw(t, "eta")
				}
			case "alternating":
				o[k] = float64(1-2*(k%2)) * rapid.Float64Range(0.1, 2).Draw(t, "eta")
			case "constant":
				o[k] = 1
			}
		}
		if !jumps {
			o[0], o[n-1] = 0, 0
		}
		ord = append(ord, o)
	}
	return x, ord
}

// genReviewVehicle draws a vehicle of 1 to 4 axles, often with an axle at offset 0 or at the
// vehicle's length, spacings from reviewGrid, lengths from very short to longer than a span;
// asymmetric loads mostly.
func genReviewVehicle(t *rapid.T, span float64, dyadic bool) traffic.Vehicle {
	var L float64
	switch rapid.IntRange(0, 3).Draw(t, "length kind") {
	case 0:
		L = rapid.SampledFrom(reviewGrid).Draw(t, "L grid")
	case 1:
		L = roundIf(dyadic, rapid.Float64Range(0.2, 1).Draw(t, "L short"))
	case 2:
		L = span * rapid.SampledFrom([]float64{0.5, 1, 1.5, 2, 3}).Draw(t, "L span multiple")
	default:
		L = roundIf(dyadic, rapid.Float64Range(1, 3*span+1).Draw(t, "L free"))
	}
	v := traffic.Vehicle{Name: "wagon", LengthM: L}
	na := rapid.IntRange(1, 4).Draw(t, "axles")
	var at []float64
	for k := range na {
		var a float64
		switch rapid.IntRange(0, 3).Draw(t, "at kind") {
		case 0:
			a = 0
		case 1:
			a = L
		case 2:
			a = math.Min(L, rapid.SampledFrom(reviewGrid).Draw(t, "at grid"))
		default:
			a = math.Min(L, roundIf(dyadic, rapid.Float64Range(0, L).Draw(t, "at free")))
		}
		_ = k
		at = append(at, a)
	}
	sortFloats(at)
	for _, a := range at {
		v.Axles = append(v.Axles, traffic.Axle{AtM: a, LoadKN: rapid.SampledFrom([]float64{50, 100, 225, 37.5}).Draw(t, "P")})
	}
	return v
}

func roundIf(dyadic bool, v float64) float64 {
	if !dyadic {
		return v
	}
	return math.Max(1.0/1024, math.Round(v*1024)/1024)
}

func sortFloats(a []float64) {
	for i := 1; i < len(a); i++ {
		for j := i; j > 0 && a[j] < a[j-1]; j-- {
			a[j], a[j-1] = a[j-1], a[j]
		}
	}
}

// reviewTouch is the number of vehicles whose axles can stand on the span at once, as
// rakeWindows counts it.
func reviewTouch(v traffic.Vehicle, span float64) int {
	aMin, aMax := v.Axles[0].AtM, v.Axles[len(v.Axles)-1].AtM
	return int(math.Floor((span+aMax-aMin)/v.LengthM)) + 1
}

// bruteAgrees checks a member's extremes against the brute force: the brute force must not
// beat them (beyond 1e-9 of the force scale). It steps the front and may miss a stationary
// point between events, so it may fall short; that the sweep's value is reached is checked
// by its placement (shortcutAgrees, placementGives).
func bruteAgrees(t *rapid.T, x, eta []float64, tr *traffic.Train, e Extremes) {
	scale := forceScale(x, eta, tr)
	for _, s := range senses(e) {
		brute := bruteTrain(x, eta, tr, s.sense)
		if s.sense*(brute-s.e.Value) > 1e-9*scale {
			t.Fatalf("sense %v: brute force %v beats %v (%+v)", s.sense, brute, s.e.Value, s.e.Placement)
		}
	}
}

// TestEdgeWindowsEdges: rakes swept by windows against the count-by-count sweeps and the
// brute force, on lines with and without jumps at the bearings, with asymmetric vehicles,
// axles at 0 or at the vehicle's length, coincident spacings, vehicles very short or longer
// than the span, origins far from 0, and n exactly at the windows' threshold or just above.
// Vehicles may have two axles at one offset (TestEdgeWindowsSymmetryMultiplicity). Lengths
// are dyadic, so coincidences are exact: where they hold only to within rounding, the
// windows and the count sweeps may take an axle at a bearing differently, each correctly to
// within rounding (TestEdgeWindowsThresholdRounding, TestEdgeWindowsBearingTolerance).
func TestEdgeWindowsEdges(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genReviewLines(t, rapid.Bool().Draw(t, "jumps"), true)
		span := x[len(x)-1] - x[0]
		v := genReviewVehicle(t, span, true)
		n := reviewTouch(v, span) + rapid.IntRange(0, 1).Draw(t, "spare")
		if n > 40 {
			t.Skip("too many vehicles for the count sweeps")
		}
		tr := &traffic.Train{Name: "rake", Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: n}}}
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		l, ld := prepared(t, x, ord, tr)
		if !ld.rakeWindows(l) {
			t.Fatalf("rakeWindows refused a rake of 1 to %d (touch %d)", n, reviewTouch(v, span))
		}
		shortcutAgrees(t, x, ord, tr, plainSweeps{countSweeps: true})
		var c Calculator
		got, err := c.Envelope(l, ld, Options{}, nil)
		if err != nil {
			t.Fatal(err)
		}
		for i := range got {
			for _, e := range []Extreme{got[i].Max, got[i].Min} {
				if e.Loaded && (e.Count < 1 || e.Count > n) {
					t.Fatalf("member %d: placement with %d vehicles, allowed 1 to %d", i, e.Count, n)
				}
			}
		}
		if n <= 8 && len(v.Axles)*n <= 16 {
			bruteAgrees(t, x, ord[0], tr, got[0])
		}
	})
}

// TestEdgeWindowsRightToLeft: a strongly asymmetric vehicle (one heavy axle at the front,
// a light one at the back) over a line that rises steeply near the left bearing only: the
// right-to-left placements govern; values against the count sweeps, the brute force, and
// the placement's direction and value against the reference response.
func TestEdgeWindowsRightToLeft(t *testing.T) {
	x := []float64{-7, -6, 3}
	ord := [][]float64{{0.5, 2, 0}, {0, -1, 0}}
	v := traffic.Vehicle{Name: "wagon", LengthM: 4, Axles: []traffic.Axle{{AtM: 0, LoadKN: 300}, {AtM: 3, LoadKN: 10}}}
	tr := &traffic.Train{Name: "rake", Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: reviewTouch(v, 10)}}}
	shortcutAgrees(t, x, ord, tr, plainSweeps{countSweeps: true})
	l, ld := prepared(t, x, ord, tr)
	if !ld.rakeWindows(l) || ld.symmetricUnit() {
		t.Fatal("expected windows over both directions")
	}
	var c Calculator
	got, _ := c.Envelope(l, ld, Options{}, nil)
	for i, eta := range ord {
		scale := forceScale(x, eta, tr)
		for _, s := range senses(got[i]) {
			if b := bruteTrain(x, eta, tr, s.sense); math.Abs(b-s.e.Value) > 1e-6*scale {
				t.Fatalf("member %d sense %v: brute %v, windows %v", i, s.sense, b, s.e.Value)
			}
		}
	}
}

// TestEdgeWindowsThresholdRounding: a rake at rakeWindows' threshold where the span is a
// whole number of vehicle lengths only to within rounding. Vehicle 3.3 m long, one 100 kN
// axle at its front; lines on x = 0, 3.3, 6.6, 3*3.3 (= 9.899999999999999 in floating point);
// one line of constant ordinate 1 (jumps at both bearings). Rakes of 1 to 3 vehicles. The
// windows would take the axles at 0 and at 9.899999999999999 as both on the bridge, which a
// rake of four does; so rakeWindows counts the vehicles within that rounding and leaves this
// rake to the count sweeps. By hand: at most three axles of a rake of three stand on the span
// (3.3 m apart), 3 x 100 x 1 = 300 kN, with a rake of at most 3; the brute force agrees.
func TestEdgeWindowsThresholdRounding(t *testing.T) {
	L := 3.3
	x := []float64{0, L, 2 * L, 3 * L}
	ord := [][]float64{{1, 1, 1, 1}}
	v := traffic.Vehicle{Name: "wagon", LengthM: L, Axles: []traffic.Axle{{AtM: 0, LoadKN: 100}}}
	tr := &traffic.Train{Name: "rake", Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: 3}}}
	l, ld := prepared(t, x, ord, tr)
	if ld.rakeWindows(l) {
		t.Error("the windows take a rake of 1 to 3 that a fourth vehicle within rounding would exceed")
	}
	var a Calculator
	got, err := a.Envelope(l, ld, Options{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if b := bruteTrain(x, ord[0], tr, 1); math.Abs(b-300) > 1e-9 {
		t.Fatalf("brute force %v, by hand 300", b)
	}
	if e := got[0].Max; math.Abs(e.Value-300) > 1e-9 || e.Count > 3 {
		t.Errorf("%v with %d vehicles (rake of at most 3); by hand and brute force 300", e.Value, e.Count)
	}
	shortcutAgrees(t, x, ord, tr, plainSweeps{countSweeps: true})
}

// genReviewPartsTrain draws a train with distributed parts: Cooper E80 (cut trailing load),
// a locomotive and a cut part starting at various offsets (also 0, at the front, and at an
// axle), or whole parts, also reaching ahead indefinitely; lines have no jumps (where the
// sparse sweep runs).
func genReviewPartsTrain(t *rapid.T, span float64) *traffic.Train {
	kind := rapid.SampledFrom([]string{"cooper", "cut", "cut at front", "whole", "whole ahead", "cut only"}).Draw(t, "train kind")
	if kind == "cooper" {
		return traffic.Cooper(rapid.SampledFrom([]float64{80, 60}).Draw(t, "E"))
	}
	tr := &traffic.Train{Name: kind}
	if kind != "cut only" {
		v := genReviewVehicle(t, span, rapid.Bool().Draw(t, "dyadic vehicle"))
		lo := rapid.IntRange(1, 2).Draw(t, "min")
		tr.Consist = []traffic.Group{{Vehicle: v, Min: lo, Max: lo + rapid.IntRange(0, 2).Draw(t, "extra")}}
	}
	q := rapid.SampledFrom([]float64{10, 58.4, 100}).Draw(t, "q")
	from := rapid.SampledFrom([]float64{0, 0.5, 1, 3, 6, 12.5}).Draw(t, "from")
	switch kind {
	case "cut", "cut only":
		tr.Parts = []traffic.Part{{FromM: from, ToM: math.Inf(1), QKNPerM: q, Mode: traffic.CutUnfavourable}}
	case "cut at front":
		tr.Parts = []traffic.Part{{FromM: 0, ToM: math.Inf(1), QKNPerM: q, Mode: traffic.CutUnfavourable}}
	case "whole":
		tr.Parts = []traffic.Part{{FromM: from, ToM: from + rapid.SampledFrom(reviewGrid).Draw(t, "part length"), QKNPerM: q, Mode: traffic.Whole}}
	case "whole ahead":
		tr.Parts = []traffic.Part{{FromM: math.Inf(-1), ToM: from, QKNPerM: q, Mode: traffic.Whole}}
	}
	return tr
}

// TestEdgeSparseEdges: trains with distributed parts swept sparsely against the dense
// sweep and the brute force, on lines without jumps that are zero over stretches, change
// sign several times, or sit far from the origin.
func TestEdgeSparseEdges(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genReviewLines(t, false, rapid.Bool().Draw(t, "dyadic"))
		span := x[len(x)-1] - x[0]
		tr := genReviewPartsTrain(t, span)
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		if len(tr.Parts) > 0 && tr.Parts[0].FromM > 9*(span+1) {
			t.Skip("the reference response clamps such a part wrongly (TestEdgeReferenceCutClamp)")
		}
		shortcutAgrees(t, x, ord, tr, plainSweeps{denseCurved: true})
		if len(tr.Consist) == 0 || tr.Consist[len(tr.Consist)-1].Max*len(tr.Consist[len(tr.Consist)-1].Vehicle.Axles) <= 12 || tr.Name == "Cooper E80" {
			if rapid.IntRange(0, 3).Draw(t, "brute") == 0 {
				l, ld := prepared(t, x, ord, tr)
				var c Calculator
				got, err := c.Envelope(l, ld, Options{}, nil)
				if err != nil {
					t.Fatal(err)
				}
				bruteAgrees(t, x, ord[0], tr, got[0])
			}
		}
	})
}

// TestEdgeCooperOnRandomLines: Cooper E80 over random lines (2 to 9 points, spans up to
// about 70 m, several sign changes): sparse against dense and brute force.
func TestEdgeCooperOnRandomLines(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(2, 9).Draw(t, "points")
		x := []float64{rapid.Float64Range(-20, 20).Draw(t, "x0")}
		for k := 1; k < n; k++ {
			x = append(x, x[k-1]+rapid.Float64Range(1, 9).Draw(t, "dx"))
		}
		o := make([]float64, n)
		for k := 1; k+1 < n; k++ {
			o[k] = rapid.Float64Range(-2, 2).Draw(t, "eta")
		}
		ord := [][]float64{o}
		tr := traffic.Cooper(80)
		if tr.Parts[0].FromM > 9*(x[n-1]-x[0]+1) {
			t.Skip("the reference response clamps such a part wrongly (TestEdgeReferenceCutClamp)")
		}
		shortcutAgrees(t, x, ord, tr, plainSweeps{denseCurved: true})
		if rapid.IntRange(0, 4).Draw(t, "brute") == 0 {
			l, ld := prepared(t, x, ord, tr)
			var c Calculator
			got, _ := c.Envelope(l, ld, Options{}, nil)
			bruteAgrees(t, x, o, tr, got[0])
		}
	})
}

// TestEdgeSparseDroppedKink: a real slope change smaller than rounding noise at a vertex
// beside a very short panel would, if left out of a member's kinks, leave a curvature after a
// distributed part has passed the span, and the force would drift with the square of the
// distance the sweep goes on (findKinks judges noise by the panels beside each vertex, and
// makes a member's slope changes sum to zero).
// Line: x = 0, 1e-6, 5, 10 m, ordinates 0, 1, e2, 0 with e2 chosen so that the slope changes
// by +0.9e-6 /m at x = 5 (threshold 1e-6 /m here). Train: one 200 m vehicle, 100 kN axles at
// 0 and 200 m, and a whole part of 100 kN/m from its front on. By the definition (hand): the
// largest force is the part over the whole span (100 x area) plus the rear axle at x = 1e-6
// (100 x 1): about 100 x 5.0 + 100 = 600 kN; the brute force and the dense sweep agree.
func TestEdgeSparseDroppedKink(t *testing.T) {
	x := []float64{0, 1e-6, 5, 10}
	d := 0.9e-6
	s1 := 1 / (5 - 1e-6)
	// slope change at 5: -e2/5 - (e2-1) s1 = d
	e2 := (s1 - d) / (s1 + 1.0/5)
	ord := [][]float64{{0, 1, e2, 0}}
	veh := traffic.Vehicle{Name: "wagon", LengthM: 200, Axles: []traffic.Axle{{AtM: 200, LoadKN: 100}}}
	tr := &traffic.Train{Name: "part", Consist: []traffic.Group{{Vehicle: veh, Min: 1, Max: 1}},
		Parts: []traffic.Part{{FromM: 0, ToM: math.Inf(1), QKNPerM: 100, Mode: traffic.Whole}}}
	l, ld := prepared(t, x, ord, tr)
	var a, b Calculator
	got, _ := a.Envelope(l, ld, Options{}, nil)
	want, _ := b.envelope(l, ld, Options{}, nil, plainSweeps{denseCurved: true})
	hand := 100*integralRef(x, ord[0], 0, 10, identity) + 100*1
	brute := bruteTrain(x, ord[0], tr, 1)
	scale := forceScale(x, ord[0], tr)
	if math.Abs(brute-hand) > 1e-6*scale || math.Abs(want[0].Max.Value-hand) > 1e-6*scale {
		t.Fatalf("references disagree: hand %v brute %v dense %v", hand, brute, want[0].Max.Value)
	}
	if g := got[0].Max.Value; math.Abs(g-hand) > 1e-6*scale {
		t.Errorf("sparse sweep %v (%+v); hand %v, brute force %v, dense %v", g, got[0].Max.Placement, hand, brute, want[0].Max.Value)
	}
}

// TestEdgeCutSignChanges: a cut part alone (Cooper's trailing load without engines) over a
// line that changes sign four times: sparse against dense (shortcutAgrees, which also
// reproduces each placement's value), the brute force (must not beat it), and by hand for
// member 0's compression: the line's ordinates 0, 1, -1, 0.5, -2, 1.5, 0 at 3 m spacing cross
// zero at 4.5, 8, 9.6 and 13.714 m; the part over [4.5, 13.714] takes the two negative lobes
// and the positive one between: 10 x (-1 x 3.5/2 + 0.5 x 1.6/2 - 2 x 4.1143/2) = 10 x
// (-1.75 + 0.4 - 4.1142857) = -54.642857 kN (trapezoids, triangles' areas; by hand). The
// brute force steps the front and misses this placement (its front on a zero crossing) by
// about 2e-3 kN, which is its own limit, not the sweep's.
func TestEdgeCutSignChanges(t *testing.T) {
	x := []float64{0, 3, 6, 9, 12, 15, 18}
	ord := [][]float64{{0, 1, -1, 0.5, -2, 1.5, 0}, {0, 0, -1, 0, 0, 1, 0}}
	hand := 10 * (-1.75 + 0.4 - 2*(12.0/7+12-9.6)/2)
	for _, from := range []float64{0, 3, 4.5} {
		tr := &traffic.Train{Name: fmt.Sprint("cut from ", from), Parts: []traffic.Part{{FromM: from, ToM: math.Inf(1), QKNPerM: 10, Mode: traffic.CutUnfavourable}}}
		shortcutAgrees(t, x, ord, tr, plainSweeps{denseCurved: true})
		l, ld := prepared(t, x, ord, tr)
		var c Calculator
		got, _ := c.Envelope(l, ld, Options{}, nil)
		if math.Abs(got[0].Min.Value-hand) > 1e-9*math.Abs(hand) {
			t.Fatalf("%s: member 0 compression %v, by hand %v", tr.Name, got[0].Min.Value, hand)
		}
		for i, eta := range ord {
			for _, s := range senses(got[i]) {
				if b := bruteTrain(x, eta, tr, s.sense); s.sense*(b-s.e.Value) > 1e-9*forceScale(x, eta, tr) {
					t.Fatalf("%s member %d sense %v: brute %v beats sparse %v", tr.Name, i, s.sense, b, s.e.Value)
				}
			}
		}
	}
}

// TestEdgeWindowsBearingTolerance: an axle a few 1e-12 m beyond a bearing where the line
// jumps stands off the bridge (the windows take an axle as on a bearing only within the
// rounding of their phase arithmetic, about 1e-14 of the lengths). Line: x = 0, 6; ordinates
// 1, 1 (jumps at both bearings). Vehicle 0.5 m long, two 50 kN axles at 0 and 0.5 - 3.6e-12
// m, so each vehicle's rear axle stands 3.6e-12 m ahead of the next vehicle's front axle.
// Rakes of 1 to 13 (rakeWindows' threshold) and 1 to 14. By hand: axles come in pairs
// 3.6e-12 m apart, pairs 0.5 m apart; the closed span [0, 6] holds at most 13 pairs' first
// axles and 12 pairs' second ones (the 13th pair's second axle would stand at 6 + 3.6e-12),
// so at most 25 axles: 25 x 50 x 1 = 1250 kN. The count sweeps and the brute force agree.
func TestEdgeWindowsBearingTolerance(t *testing.T) {
	x := []float64{0, 6}
	ord := [][]float64{{1, 1}}
	v := traffic.Vehicle{Name: "wagon", LengthM: 0.5, Axles: []traffic.Axle{{AtM: 0, LoadKN: 50}, {AtM: 0.5 - 3.6e-12, LoadKN: 50}}}
	for _, n := range []int{13, 14} {
		tr := &traffic.Train{Name: "rake", Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: n}}}
		l, ld := prepared(t, x, ord, tr)
		if !ld.rakeWindows(l) {
			t.Fatalf("n = %d: windows not used", n)
		}
		var a, b Calculator
		got, _ := a.Envelope(l, ld, Options{}, nil)
		want, _ := b.envelope(l, ld, Options{}, nil, plainSweeps{countSweeps: true})
		brute := bruteTrain(x, ord[0], tr, 1)
		if e := got[0].Max; math.Abs(e.Value-1250) > 1e-9 || e.Count > n {
			t.Errorf("n = %d: windows %v with %d vehicles (at most %d); by hand 1250, count sweeps %v, brute force %v", n, e.Value, e.Count, n, want[0].Max.Value, brute)
		}
	}
}

// TestEdgeReferenceCutClamp: the brute-force reference responseRef (reference_test.go) cuts a
// part's infinite extent to the distances behind the front that can reach the bridge; a cut
// part that starts further back than the span is long (Cooper's trailing load, 33.2 m behind
// the front, over a 0.6 m span) adds nothing. Line: x = -17.5, -17.2, -16.9, ordinates 0, 1,
// 0. Cooper E80 with its second engine's 80 kip (355.86 kN) driver at x = -17.2 (front at
// 6.8792, driver 79 ft = 24.0792 m behind) and the trailing load cut at zero: by hand only
// that axle stands on the 0.6 m span (the next ones are 5 ft = 1.524 m away), 355.86 kN
// (Cooper's axle loads and spacings from memory, as traffic.Cooper has them).
func TestEdgeReferenceCutClamp(t *testing.T) {
	x := []float64{-17.5, -17.2, -16.9}
	eta := []float64{0, 1, 0}
	tr := traffic.Cooper(80)
	axle := 80 * traffic.KNPerKip
	got := responseRef(x, eta, tr, placedRef{LeftToRight, -17.2 + 79*traffic.MPerFt, 2, 0}, 1)
	if math.Abs(got-axle) > 1e-6*axle {
		t.Errorf("responseRef %v, by hand %v (one driver at the peak, no trailing load)", got, axle)
	}
}

// TestEdgeWindowsSymmetryMultiplicity: a vehicle is its own mirror image only if its axles
// match one to one: one with two 50 kN axles at its front (offset 0) and one at its rear
// (offset L) is not, and the windows must sweep both directions. Its mirror image has one
// axle at the front and two at the rear: running right to left, a rake puts two axles, not
// one, at its rear end. Line: x = 0, 1, ..., 5; ordinates 0, -1, 1.5, -1, 1, 0. Vehicle 0.5 m
// long, rakes of 1 to 12 (rakeWindows' threshold). The count sweeps (both directions) and the
// brute force give the reference.
func TestEdgeWindowsSymmetryMultiplicity(t *testing.T) {
	x := []float64{0, 1, 2, 3, 4, 5}
	ord := [][]float64{{0, -1, 1.5, -1, 1, 0}}
	v := traffic.Vehicle{Name: "wagon", LengthM: 0.5, Axles: []traffic.Axle{{AtM: 0, LoadKN: 50}, {AtM: 0, LoadKN: 50}, {AtM: 0.5, LoadKN: 50}}}
	tr := &traffic.Train{Name: "rake", Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: reviewTouch(v, 5)}}}
	l, ld := prepared(t, x, ord, tr)
	if !ld.rakeWindows(l) {
		t.Fatal("windows not used")
	}
	if ld.symmetricUnit() {
		t.Errorf("a vehicle with axles 50, 50 at 0 and 50 at 0.5 m (of 0.5 m) is taken as symmetric")
	}
	var a, b Calculator
	got, _ := a.Envelope(l, ld, Options{}, nil)
	want, _ := b.envelope(l, ld, Options{}, nil, plainSweeps{countSweeps: true})
	scale := forceScale(x, ord[0], tr)
	for _, s := range []struct {
		sense     float64
		got, want Extreme
	}{{1, got[0].Max, want[0].Max}, {-1, got[0].Min, want[0].Min}} {
		brute := bruteTrain(x, ord[0], tr, s.sense)
		if math.Abs(s.got.Value-s.want.Value) > 1e-9*scale || math.Abs(s.got.Value-brute) > 1e-6*scale {
			t.Errorf("sense %v: windows %v (%+v); count sweeps %v (%+v), brute force %v", s.sense, s.got.Value, s.got.Placement, s.want.Value, s.want.Placement, brute)
		}
	}
}
