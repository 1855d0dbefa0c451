package screening_test

import (
	"math"
	"strconv"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// memberNamed is the result of the member with the label (nil: none).
func memberNamed(res screening.Result, label string) *screening.MemberResult {
	for i := range res.Members {
		if res.Members[i].Label == label {
			return &res.Members[i]
		}
	}
	return nil
}

// fatiguePlan is a plan with fatigue: one axle of existing and one of proposed traffic.
func fatiguePlan(exKN, prKN float64) screening.Plan {
	ref := func(name string, kn float64) screening.TrainRef {
		src := "name: " + name + "\nunits: si\nvehicles:\n  - id: a\n    length: 2\n    axles:\n      - {at: 1, load: " +
			strconv.FormatFloat(kn, 'g', -1, 64) + "}\nconsist:\n  - {vehicle: a, count: 1}\n"
		return screening.TrainRef{Asked: name, Name: name, Source: src, FileName: name + ".yaml"}
	}
	ex, pr := ref("ex", exKN), ref("pr", prKN)
	return screening.Plan{Existing: []screening.TrainRef{ex}, Proposed: []screening.TrainRef{pr}, Dynamic: "none",
		Method: "working-stress", Flag: 1, Review: 1.1, Worse: 0.2,
		Fatigue: &screening.FatiguePlan{GammaMf: 1, RivetedCategoryMPa: 71, DynamicFactor: 1.2, Year: 2026, DefaultYearBuilt: 1900,
			HorizonYears: 50, RiseFactor: 1.5,
			Existing: []screening.FatigueTraffic{{Train: ex, PerYear: 1000}},
			Proposed: []screening.FatigueTraffic{{Train: pr, PerYear: 1000}}}}
}

// TestFatigueThroughScreen: the fatigue check runs inside Screen. For the bottom chord L2-L3
// of a 48 m Pratt (8 panels, 6 m deep) a single axle P gives at most 1.5 P and never
// compression (method of sections, as TestSingleAxleClosedForm), so one passage is one cycle
// of 1.5 P x share x dynamic factor / area: the envelope's extreme times the factor over the
// area.
func TestFatigueThroughScreen(t *testing.T) {
	s, err := fatiguePlan(100, 400).Settings()
	if err != nil {
		t.Fatal(err)
	}
	b := screening.Bridge{ID: "F-1", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		TrussShare: 0.5, Tracks: 1, YearBuilt: 1926, Members: map[string]rating.Member{
			"L2-L3": {CapacityTension: 600, CapacityCompression: 600, AreaMM2: 2000, FatigueCategory: "riveted"},
			"L0-L1": {CapacityTension: 600, CapacityCompression: 600, AreaMM2: 2000}, // no category: not checked
		}}
	res := screening.ScreenBridge(b, s)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	m := memberNamed(res, "L2-L3")
	f := m.Fatigue
	// Method of sections: 1.5 x 400 kN x 0.5 x 1.2 / 2000 mm² = 180 MPa.
	want := m.Proposed.Max.Value * 1.2 * 1000 / 2000
	if math.Abs(want-180) > 1e-9 || math.Abs(f.MaxRangeProposedMPa-want) > 1e-9 {
		t.Fatalf("largest proposed range %v MPa, want %v (envelope) = 180 (method of sections)", f.MaxRangeProposedMPa, want)
	}
	// EN 1993-1-9 (from memory), category 71 (riveted): 1000 cycles of 180 MPa a year,
	// 1000 / (2e6 (71/180)^3) = 8.14728e-3; existing 45 MPa, between dL and dD:
	// 1000 / (5e6 (52.313/45)^5) = 9.41964e-5 (by hand).
	if math.Abs(f.PerYearProposed-8.14728e-3) > 1e-8 || math.Abs(f.PerYearExisting-9.41964e-5) > 1e-9 {
		t.Fatalf("yearly damage existing %v, proposed %v; want 9.41964e-5 and 8.14728e-3 (by hand)", f.PerYearExisting, f.PerYearProposed)
	}
	if res.Fatigue.Checked != 1 || res.Fatigue.NoData != len(res.Members)-1 || res.Fatigue.FlagCounts["fatigue-rise"] != 1 {
		t.Fatalf("summary %+v", res.Fatigue)
	}
	// A category that is no EN 1993-1-9 detail category (another code's letter) is not
	// checked: counted as without data, the bridge screened.
	b.Members["L0-L1"] = rating.Member{AreaMM2: 2000, FatigueCategory: "E'"}
	if res := screening.ScreenBridge(b, s); res.Err != nil || res.Fatigue.NoData != len(res.Members)-1 {
		t.Fatalf("another code's category: %v, %+v", res.Err, res.Fatigue)
	}
}

// TestFatigueMirrorMembers: in a symmetric truss a member and its mirror image share their
// passages (the one's right-to-left is the other's left-to-right); Screen's result for the
// mirror member equals the check run on its own line alone (screening/fatigue directly).
func TestFatigueMirrorMembers(t *testing.T) {
	s, err := fatiguePlan(300, 400).Settings()
	if err != nil {
		t.Fatal(err)
	}
	p := truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6}
	m := rating.Member{AreaMM2: 2000, FatigueCategory: "71"}
	b := screening.Bridge{ID: "F-2", Truss: p, TrussShare: 0.5, Tracks: 1, YearBuilt: 1950,
		Members: map[string]rating.Member{"L2-L3": m, "L5-L6": m, "U1-L2": m, "L6-U7": m, "L2-U2": m, "L6-U6": m}}
	res := screening.ScreenBridge(b, s)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	tr, _ := truss.Build(p)
	lines, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	curve, _ := fatigue.NewCurve(71, 1)
	for i, l := range lines.Members {
		if _, ok := b.Members[l.Label]; !ok {
			continue
		}
		line, _ := fatigue.NewLine(lines.X, l.Ordinates)
		var c fatigue.Calculator
		want, err := c.Check(fatigue.Member{Line: line, AreaMM2: 2000, Curve: curve}, fatigue.Bridge{SpanM: 48, YearBuilt: 1950, Shares: []float64{0.5}},
			&s.Fatigue.Settings, s.Fatigue.Existing, s.Fatigue.Proposed, nil)
		if err != nil {
			t.Fatal(err)
		}
		got := res.Members[i].Fatigue
		if math.Abs(got.PerYearProposed-want.PerYearProposed) > 1e-12*want.PerYearProposed || math.Abs(got.PerYearExisting-want.PerYearExisting) > 1e-12*want.PerYearExisting {
			t.Errorf("%s: damage a year %v, %v in Screen; %v, %v on its own line", l.Label, got.PerYearExisting, got.PerYearProposed, want.PerYearExisting, want.PerYearProposed)
		}
	}
}
