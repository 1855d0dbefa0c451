package report

import (
	"fmt"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/screening/truss/trusstest"
)

// The loads drawn on an influence line must be the loads that caused the extreme: placed as
// the drawing places them, superposition (sum of P·eta plus q·∫eta, DOMAIN.md) must give the
// force the envelope found. The envelope's own search is checked against brute force in its
// package; this checks the report's reading of the placement convention.
func TestPlacementReproducesEnvelope(t *testing.T) {
	trusses := []truss.Params{
		{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		{Type: "warren", SpanM: 31.5, Panels: 7, DepthM: 4.5},
		{Type: "howe", SpanM: 24, Panels: 6, DepthM: 4, Deck: truss.DeckTop},
	}
	specs := []string{
		"lm71", "sw0", "sw2", "cooper:e=80", "cooper-alt:e=80", "uniform:q=20,min=12,max=48", "unloaded",
		"northmoor-freight-today", "northmoor-freight-proposed", "eastfell-multiple-unit",
	}
	const share = 0.5
	for _, p := range trusses {
		lines, ords := trusstest.InfluenceLines(t, p)
		for _, spec := range specs {
			train := parseTrain(t, spec)
			ex, err := envelope.Compute(lines.X, ords, train, envelope.Options{Share: share})
			if err != nil {
				t.Fatal(err)
			}
			for i, m := range lines.Members {
				for _, c := range []struct {
					sense string
					sign  float64
					e     envelope.Extreme
				}{{"tension", 1, ex[i].Max}, {"compression", -1, ex[i].Min}} {
					if !c.e.Loaded {
						continue
					}
					ob := placeTrain(train, c.e.Placement, p.SpanM*float64(max(p.Spans, 1)), lines.X, m.Ordinates, c.sign)
					got := share * ob.effect(lines.X, m.Ordinates)
					// Tolerance: rounding of the sweep, relative to the force (common practice).
					if tol := 1e-6 * math.Max(1, math.Abs(c.e.Value)); math.Abs(got-c.e.Value) > tol {
						t.Errorf("%s %s, %s %s %s: drawn loads give %.6f kN, envelope %.6f kN (placement %+v)",
							p.Type, spec, m.Label, c.sense, c.e.Direction, got, c.e.Value, c.e.Placement)
					}
				}
			}
		}
	}
}

func TestSignIntervalsAndIntegral(t *testing.T) {
	// A line through (0,0), (1,1), (2,−1), (3,0): zero at x = 1.5 by similar triangles.
	xs := []float64{0, 1, 2, 3}
	eta := []float64{0, 1, -1, 0}
	pos := signIntervals(xs, eta, 1)
	neg := signIntervals(xs, eta, -1)
	if len(pos) != 1 || math.Abs(pos[0][0]) > 1e-12 || math.Abs(pos[0][1]-1.5) > 1e-12 {
		t.Errorf("positive stretches %v, want [[0 1.5]]", pos)
	}
	if len(neg) != 1 || math.Abs(neg[0][0]-1.5) > 1e-12 || math.Abs(neg[0][1]-3) > 1e-12 {
		t.Errorf("negative stretches %v, want [[1.5 3]]", neg)
	}
	cases := []struct {
		name string
		a, b float64
		want float64 // areas of triangles and trapezoids, worked by hand
	}{
		{"whole line", -5, 10, 0},
		{"first triangle", 0, 1, 0.5},
		{"to the crossing", 0, 1.5, 0.75},
		{"crossing to the end", 1.5, 3, -0.75},
		{"inside one segment", 0.25, 0.75, 0.25}, // mean ordinate 0.5 over 0.5 m
		{"empty", 2, 2, 0},
	}
	for _, c := range cases {
		if got := integral(xs, eta, c.a, c.b); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s: integral over [%v, %v] = %v, want %v", c.name, c.a, c.b, got, c.want)
		}
	}
}

// A placement stored with only the force, the train and the head (as a store may keep it) is
// completed by recomputing the one train on the one line; a train whose definition has
// changed is recognised by its different force.
func TestPlacementOfCompletesStoredExtreme(t *testing.T) {
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	if err != nil {
		t.Fatal(err)
	}
	lines, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, spec := range []string{"northmoor-freight-proposed", "cooper:e=80"} {
		train := parseTrain(t, spec)
		for _, m := range lines.Members {
			ex, err := envelope.Compute(lines.X, [][]float64{m.Ordinates}, train, envelope.Options{Share: 0.5})
			if err != nil {
				t.Fatal(err)
			}
			full := ex[0].Max
			if !full.Loaded {
				continue
			}
			stored := envelope.Extreme{Value: full.Value, Train: full.Train, Placement: envelope.Placement{Loaded: true, HeadM: full.HeadM, Direction: full.Direction}}
			got, ok := placementOf(train, stored, lines.X, m.Ordinates, 0.5, 1)
			if !ok {
				t.Fatalf("%s %s: placement not recovered", spec, m.Label)
			}
			ob := placeTrain(train, got.Placement, 48, lines.X, m.Ordinates, 1)
			// Superposition (DOMAIN.md): the drawn loads give the stored force.
			if f := 0.5 * ob.effect(lines.X, m.Ordinates); math.Abs(f-full.Value) > 1e-6*math.Max(1, full.Value) {
				t.Errorf("%s %s: drawn loads give %v kN, stored %v kN", spec, m.Label, f, full.Value)
			}
			if _, ok := placementOf(train.Scaled(1.1), stored, lines.X, m.Ordinates, 0.5, 1); ok {
				t.Errorf("%s %s: a train 10 %% heavier passes for the one the run used", spec, m.Label)
			}
		}
	}
}

// TestSeverityOrder: member lists put the lowest proposed RF first and members without a
// proposed RF (unrated, or not loaded) last, keeping the geometry's order among equals
// (common practice: the worst member is read first).
func TestSeverityOrder(t *testing.T) {
	rf := func(v float64) *float64 { return &v }
	cases := []struct {
		name string
		rfs  []*float64
		want []int
	}{
		// The reported page: an exceeds member (0.94) behind unrated ones in the geometry.
		{"exceeds before unrated", []*float64{nil, nil, rf(1.4), rf(0.94)}, []int{3, 2, 0, 1}},
		{"ties keep the geometry's order", []*float64{rf(1.2), rf(1.1), rf(1.2)}, []int{1, 0, 2}},
		{"none rated", []*float64{nil, nil}, []int{0, 1}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ms := make([]Member, len(c.rfs))
			for i, r := range c.rfs {
				ms[i] = Member{Label: fmt.Sprint(i), RFProposed: r}
			}
			got := severityOrder(ms)
			if fmt.Sprint(got) != fmt.Sprint(c.want) {
				t.Errorf("order %v, want %v", got, c.want)
			}
		})
	}
}
