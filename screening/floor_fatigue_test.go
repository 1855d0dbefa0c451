package screening_test

import (
	"math"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// floorFatiguePlan is fatiguePlan's plan with trains given as train files (SI).
func floorFatiguePlan(ex, pr string) screening.Plan {
	p := fatiguePlan(1, 1)
	ref := func(name, src string) screening.TrainRef {
		return screening.TrainRef{Asked: name, Name: name, Source: "name: " + name + "\nunits: si\n" + src, FileName: name + ".yaml"}
	}
	e, r := ref("ex", ex), ref("pr", pr)
	p.Existing, p.Proposed = []screening.TrainRef{e}, []screening.TrainRef{r}
	p.Fatigue.Existing = []screening.FatigueTraffic{{Train: e, PerYear: 1000}}
	p.Fatigue.Proposed = []screening.FatigueTraffic{{Train: r, PerYear: 1000}}
	return p
}

// oneAxle and twoAxles are train files: one axle of 400 kN; two of 200 kN 4 m apart.
const (
	oneAxle  = "vehicles:\n  - id: a\n    length: 2\n    axles:\n      - {at: 1, load: 400}\nconsist:\n  - {vehicle: a, count: 1}\n"
	twoAxles = "vehicles:\n  - id: a\n    length: 6\n    axles:\n      - {at: 1, load: 200}\n      - {at: 5, load: 200}\nconsist:\n  - {vehicle: a, count: 1}\n"
)

// floorBridge is a 48 m Pratt of 8 panels of 6 m, trusses 5.5 m apart, one centred track with
// stringer lines 1.5 m apart (2 m and 3.5 m from truss A), its floor rated.
func floorBridge(members map[string]rating.Member) screening.Bridge {
	return screening.Bridge{ID: "FF-1", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 10, TrussSpacingM: 5.5, YearBuilt: 1926,
		Floor:   screening.FloorSystem{Rate: true, StringerSpacingM: 1.5},
		Members: members}
}

func screenFloorFatigue(t *testing.T, b screening.Bridge, p screening.Plan) screening.Result {
	t.Helper()
	s, err := p.Settings()
	if err != nil {
		t.Fatal(err)
	}
	res := screening.ScreenBridge(b, s)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	return res
}

// cat71 is the Miner damage of n cycles of range r (MPa) on EN 1993-1-9's category 71 curve
// (from memory): N = 2e6 (71/r)^3 down to the constant-amplitude limit 52.3 MPa.
func cat71(n, r float64) float64 { return n / (2e6 * math.Pow(71/r, 3)) }

// TestStringerFatigueOneAxle: one axle P crossing a simply supported stringer of span L gives
// its mid-span moment one rise to P L / 4 and back (textbook: the mid-span moment influence
// line is a triangle of height L/4): one cycle of range (P/2) L / 4 / W on a stringer line,
// which carries half the axle. P = 400 kN, L = 6 m, W = 3e6 mm³: 300 kN·m / 3e6 mm³ =
// 300e6 N·mm / 3e6 mm³ = 100 MPa, times the fatigue dynamic factor 1.2 = 120 MPa (by hand).
func TestStringerFatigueOneAxle(t *testing.T) {
	el := rating.Member{CapacityTension: 1e4, SectionModulusMM3: 3e6, FatigueCategory: "71"}
	res := screenFloorFatigue(t, floorBridge(map[string]rating.Member{"S1-3:M": el}), floorFatiguePlan(oneAxle, oneAxle))
	m := memberNamed(res, "S1-3:M")
	f := m.Fatigue
	if f == nil || f.Status != fatigue.Damaged || f.SectionModulusMM3 != 3e6 || f.AreaMM2 != 0 {
		t.Fatalf("S1-3:M fatigue %+v", f)
	}
	if math.Abs(f.MaxRangeProposedMPa-120) > 1e-9 {
		t.Errorf("largest range %v MPa, want 120 (P L / 4 / W by hand)", f.MaxRangeProposedMPa)
	}
	// The strength check's moment is the same P L / 4 on one line (PL/4, handbook).
	if math.Abs(m.Proposed.Max.Value-300) > 1e-9 {
		t.Errorf("strength moment %v kN·m, want 300", m.Proposed.Max.Value)
	}
	// One cycle a passage, 1000 passages a year (both directions alike).
	if want := cat71(1000, 120); math.Abs(f.PerYearProposed-want) > 1e-12*want {
		t.Errorf("damage a year %v, want %v (1000 cycles of 120 MPa, category 71)", f.PerYearProposed, want)
	}
	// The passage itself: the line's history rises to P L/4 and falls back, one cycle.
	fl, err := floor.System{PanelX: []float64{0, 6, 12, 18}, TrussSpacingM: 5.5}.FatigueLine("S1-3", floor.DefaultLengths)
	if err != nil {
		t.Fatal(err)
	}
	if fl.SectionM != 3 || fl.Shares[0] != 0.5 || fl.DeterminantM != 9 { // p/2; half the axle; p + 3 m (EN 1991-2 Table 6.2, from memory)
		t.Errorf("stringer line %+v", fl)
	}
	line, _ := fatigue.NewLine(fl.X, fl.Eta)
	s, _ := floorFatiguePlan(oneAxle, oneAxle).Settings()
	var c fatigue.Calculator
	var cycles []fatigue.Cycle
	curve, _ := fatigue.NewCurve(71, 1)
	_, err = c.Check(fatigue.Member{Line: line, Curve: curve, SectionModulusMM3: 3e6},
		fatigue.Bridge{SpanM: 48, Shares: fl.Shares}, &s.Fatigue.Settings, s.Fatigue.Existing, s.Fatigue.Proposed,
		func(proposed bool, p fatigue.Passage) {
			if proposed && p.Direction == fatigue.LeftToRight {
				for _, cy := range p.Cycles {
					cycles = append(cycles, fatigue.Cycle{Range: cy.Range * p.MPaPerKN, Count: cy.Count})
				}
			}
		})
	if err != nil {
		t.Fatal(err)
	}
	total := 0.0
	for _, cy := range cycles {
		total += cy.Count
		if math.Abs(cy.Range-120) > 1e-9 {
			t.Errorf("cycle of %v MPa, want 120", cy.Range)
		}
	}
	if total != 1 {
		t.Errorf("%v cycles a passage, want 1", total)
	}
}

// TestStringerFatigueTwoAxles: two axles of P = 200 kN, a = 4 m apart, cross a stringer of
// L = 6 m (closer than the panel). Worked by hand on the mid-span triangle (height 1.5 m, slope
// 0.5 each side), per unit on the line, front at s: the first axle alone rises to 1.5 P at
// s = 3 and falls to 1.0 P at s = 4; from s = 4 to 6 the first falls as the second rises at
// the same slope, a plateau of 1.0 P; once the first has left (s = 6) the second alone rises
// to 1.5 P at s = 7 and falls to 0 at s = 10. History 0, 1.5 P, 1.0 P, 1.5 P, 0: rainflow (ASTM E1049)
// gives one cycle of 1.5 P and one of 0.5 P. On one stringer line (half the axle) over W =
// 3e6 mm³ with the dynamic factor 1.2: 0.5 x 300 kN·m = 150 kN·m -> 60 MPa, and 0.5 x 100 kN·m
// = 50 kN·m -> 20 MPa, below the cut-off of category 71 (28.7 MPa, EN 1993-1-9 from memory),
// so a passage does cat71(1, 60) of damage.
func TestStringerFatigueTwoAxles(t *testing.T) {
	el := rating.Member{CapacityTension: 1e4, SectionModulusMM3: 3e6, FatigueCategory: "71"}
	res := screenFloorFatigue(t, floorBridge(map[string]rating.Member{"S1-5:M": el}), floorFatiguePlan(oneAxle, twoAxles))
	f := memberNamed(res, "S1-5:M").Fatigue
	if math.Abs(f.MaxRangeProposedMPa-60) > 1e-9 {
		t.Errorf("largest range %v MPa, want 60 (by hand)", f.MaxRangeProposedMPa)
	}
	if want := cat71(1000, 60); math.Abs(f.PerYearProposed-want) > 1e-12*want {
		t.Errorf("damage a year %v, want %v (1000 cycles of 60 MPa; 20 MPa below the cut-off)", f.PerYearProposed, want)
	}
}

// TestFloorBeamFatigue: an inner floor beam's moment history under a train peaks at the
// strength check's largest live moment for the same train (two computations of one effect:
// the passage walk and the exact envelope), and that equals statics: two axles of 200 kN 4 m
// apart on the reaction triangle (height 1 over two panels of 6 m) give at most R = 200 (1 +
// 2/6) = 266.67 kN (an axle at the floor beam); each stringer line brings R/2 at (b - s)/2 =
// (5.5 - 1.5)/2 = 2 m from its truss, so M = (R/2) x 2 m = 266.67 kN·m (statics).
func TestFloorBeamFatigue(t *testing.T) {
	const W = 5e6
	el := rating.Member{CapacityTension: 1e4, SectionModulusMM3: W, FatigueCategory: "71"}
	res := screenFloorFatigue(t, floorBridge(map[string]rating.Member{"FB4:M": el}), floorFatiguePlan(oneAxle, twoAxles))
	m := memberNamed(res, "FB4:M")
	// The history starts and ends at zero and never goes negative, so its largest range is its
	// peak: peak moment = range x W / (dynamic factor x 1e6).
	peak := m.Fatigue.MaxRangeProposedMPa * W / (1.2 * 1e6)
	want := 200 * (1 + 2.0/6) * 0.5 * 2 // statics, by hand
	if math.Abs(peak-m.Proposed.Max.Value) > 1e-9*want || math.Abs(peak-want) > 1e-9*want {
		t.Errorf("history peak %v kN·m, strength envelope %v, statics %v", peak, m.Proposed.Max.Value, want)
	}
	// The end floor beam takes the end cross girder's determinant length (3.6 m, EN 1991-2
	// Table 6.2, from memory), an inner one twice its span.
	sys := floor.System{PanelX: []float64{0, 6, 12}, TrussSpacingM: 5.5, StringerSpacingM: 1.5}
	for _, c := range []struct {
		el   string
		lphi float64
	}{{"FB0", 3.6}, {"FB1", 11}} {
		fl, err := sys.FatigueLine(c.el, floor.DefaultLengths)
		if err != nil || fl.DeterminantM != c.lphi || fl.SectionM != 2 {
			t.Errorf("%s: %+v, %v; want determinant length %v, section 2 m from truss A", c.el, fl, err, c.lphi)
		}
	}
}

// TestFloorFatigueSummary: floor elements with a section modulus and a category are checked,
// the other moment results count as no data as members do, shear results are not checked;
// the shortest life may be a floor element's.
func TestFloorFatigueSummary(t *testing.T) {
	el := rating.Member{CapacityTension: 1e4, SectionModulusMM3: 2.5e6, FatigueCategory: "riveted"}
	b := floorBridge(map[string]rating.Member{
		"S1-2:M": el, "S1-3:M": el, "FB4:M": {CapacityTension: 1e4, SectionModulusMM3: 6e6, FatigueCategory: "71"},
		"S1-4:M": {CapacityTension: 1e4, FatigueCategory: "71"},  // no section modulus: no data
		"S1-5:M": {CapacityTension: 1e4, SectionModulusMM3: 3e6}, // no category: no data
		"L2-L3":  {CapacityTension: 1e4, CapacityCompression: 1e4, AreaMM2: 9000, FatigueCategory: "71"},
	})
	res := screenFloorFatigue(t, b, floorFatiguePlan(oneAxle, twoAxles))
	truss, moments := 0, 0
	for _, m := range res.Members {
		_, eff, isFloor := floor.ResultEffect(m.Label)
		switch {
		case !isFloor:
			truss++
		case eff == floor.Moment:
			moments++
			if m.Fatigue == nil {
				t.Errorf("%s has no fatigue outcome", m.Label)
			}
		case m.Fatigue != nil:
			t.Errorf("%s: shear checked for fatigue", m.Label)
		}
	}
	// 8 panels, one track: 8 stringers and 9 floor beams, each one moment result.
	if moments != 17 {
		t.Fatalf("%d moment results, want 17", moments)
	}
	sum := res.Fatigue
	if sum.Checked != 4 || sum.NoData != truss-1+moments-3 {
		t.Errorf("checked %d, no data %d; want 4 and %d", sum.Checked, sum.NoData, truss-1+moments-3)
	}
	// The stringers of W = 2.5e6 mm³ take the most stress: the shortest life is theirs.
	if sum.Shortest < 0 || !strings.HasPrefix(res.Members[sum.Shortest].Label, "S1-") {
		t.Errorf("shortest life at %d, want a stringer", sum.Shortest)
	}
}

// TestStringerFatigueAtSpeed: a train at a known speed takes the fatigue dynamic factor of
// EN 1991-2 Annex C (from memory) at the stringer's own determinant length, p + 3 m = 9 m
// (Table 6.2, from memory), not the truss span. Written out here: v = 80 km/h, n0 = 80 / 9 Hz
// (the lower bound for 4 <= L <= 20 m), K = v / (2 L n0), phi' = K / (1 - K + K^4),
// phi” = 0.56 e^-(L/10)^2 + 0.5 (L n0 / 80 - 1) e^-(L/20)^2 (alpha = 1 above 22 m/s),
// factor 1 + (phi' + phi”/2) / 2, about 1.1429 (by hand). The range is 100 MPa times it.
func TestStringerFatigueAtSpeed(t *testing.T) {
	el := rating.Member{CapacityTension: 1e4, SectionModulusMM3: 3e6, FatigueCategory: "71"}
	p := floorFatiguePlan(oneAxle, oneAxle)
	p.Fatigue.Proposed[0].SpeedKmh = 80
	res := screenFloorFatigue(t, floorBridge(map[string]rating.Member{"S1-3:M": el}), p)
	v, L := 80/3.6, 9.0
	n0 := 80 / L
	k := v / (2 * L * n0)
	phi1 := k / (1 - k + k*k*k*k)
	phi2 := 0.56*math.Exp(-(L/10)*(L/10)) + 0.5*(L*n0/80-1)*math.Exp(-(L/20)*(L/20))
	factor := 1 + (phi1+phi2/2)/2
	if math.Abs(factor-1.1429) > 1e-4 {
		t.Fatalf("hand factor %v", factor)
	}
	if got := memberNamed(res, "S1-3:M").Fatigue.MaxRangeProposedMPa; math.Abs(got-100*factor) > 1e-9 {
		t.Errorf("range at speed %v MPa, want %v (100 MPa x %v)", got, 100*factor, factor)
	}
}
