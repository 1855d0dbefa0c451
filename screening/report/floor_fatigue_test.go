package report

import (
	"bytes"
	"fmt"
	"io/fs"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/rating"
)

// withFatigue screens the fixture's bridge b again with a fatigue plan of the demo's freight
// trains, 3000 passages a year each, and puts the outcomes on its page as a run stores them
// (fleetrun, runreport): each member's fatigue result and flags, the plan on the run, the
// floor system on the bridge.
func withFatigue(t *testing.T, f *fixture, b invented) (Run, Bridge, screening.Result) {
	t.Helper()
	ref := func(name string) screening.TrainRef {
		src, err := fs.ReadFile(configs.Trains(), name+".yaml")
		if err != nil {
			t.Fatal(err)
		}
		return screening.TrainRef{Asked: name, Name: name, FileName: name + ".yaml", Source: string(src)}
	}
	plan := &screening.FatiguePlan{GammaMf: 1, RivetedCategoryMPa: 71, DynamicFactor: 1.2, Year: 2031, DefaultYearBuilt: 1900,
		HorizonYears: 50, RiseFactor: 1.5,
		Existing: []screening.FatigueTraffic{{Train: ref("northmoor-freight-today"), PerYear: 3000}},
		Proposed: []screening.FatigueTraffic{{Train: ref("northmoor-freight-proposed"), PerYear: 3000}}}
	set := *f.Settings
	var err error
	if set.Fatigue, err = plan.Settings(); err != nil {
		t.Fatal(err)
	}
	res := screening.ScreenBridge(b.Bridge, &set)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	run, br := f.Run, f.Bridges[b.ID]
	run.Fatigue = plan
	tr, _, err := b.Geometry()
	if err != nil {
		t.Fatal(err)
	}
	sys := b.FloorSystemOf(tr)
	br.Floor = &sys
	byLabel := map[string]*fatigue.Result{}
	for _, m := range res.Members {
		byLabel[m.Label] = m.Fatigue
	}
	for i, m := range br.Members {
		r := byLabel[m.Label]
		if r == nil {
			continue
		}
		fv := func(v float64) *float64 { return &v }
		mf := Fatigue{Status: string(r.Status)}
		if r.Status != fatigue.NoData {
			mf.CategoryMPa, mf.DamageExisting, mf.DamageProposed = fv(r.CategoryMPa), fv(r.PerYearExisting), fv(r.PerYearProposed)
			mf.Ratio, mf.ToDate, mf.RemainingYears, mf.RangeProposedMPa = fv(r.Ratio), fv(r.ToDate), fv(r.RemainingYears), fv(r.MaxRangeProposedMPa)
			if r.SectionModulusMM3 > 0 {
				mf.SectionModulusMM3 = fv(r.SectionModulusMM3)
			} else {
				mf.AreaMM2 = fv(r.AreaMM2)
			}
		}
		br.Members[i].Fatigue = mf
		for _, fl := range r.Flags {
			br.Members[i].Flags = append(br.Members[i].Flags, string(fl))
		}
	}
	return run, br, res
}

// TestFloorFatigueExplained: a stringer with a section modulus and a category shows its
// fatigue check in its explanation and on its page as a truss member does: the check done
// again from the run's plan on the element's moment line (in the bridge's coordinates) gives
// the damage the run computed (on the line from its panel's start: a passage's cycles do not
// depend on where the line stands), the stress basis names the section modulus and the
// mid-span section, and the page draws its fatigue chart. A stringer without the data says
// it was not checked.
func TestFloorFatigueExplained(t *testing.T) {
	b := pratt48(t, "NER-FF", "Fatholt Bridge", 1.5)
	b.TrussSpacingM = 5.5
	b.Floor = screening.FloorSystem{Rate: true, StringerSpacingM: 1.5}
	b.Members["S1-3:M"] = rating.Member{CapacityTension: 1e4, SectionModulusMM3: 2.5e6, FatigueCategory: "71"}
	b.Members["S1-4:M"] = rating.Member{CapacityTension: 1e4}
	b.Members["FB4:M"] = rating.Member{CapacityTension: 1e4, SectionModulusMM3: 6e6, FatigueCategory: "71"}
	f := screenFleet(t, []invented{b})
	run, br, res := withFatigue(t, f, b)
	var stored *fatigue.Result
	for _, m := range res.Members {
		if m.Label == "S1-3:M" {
			stored = m.Fatigue
		}
	}
	if stored == nil || stored.Status != fatigue.Damaged || len(stored.Flags) == 0 {
		t.Fatalf("S1-3:M: %+v, want damaged and flagged (the proposed axles rise)", stored)
	}
	var buf bytes.Buffer
	if err := ExplainIn(&buf, run, br, "S1-3:M", units.SI); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"section modulus W 2500000 mm³", "mid-span, 3.00 m into the panel", "share 0.5", "0.2400 MPa per kN·m", // 0.5 x 1.2 x 1e6 / 2.5e6 (by hand)
		"x 1e6 / W", fmt.Sprintf("damage a year (Miner's sum over the trains) %.4g", stored.PerYearProposed),
		fmt.Sprintf("damage a year (Miner's sum over the trains) %.4g", stored.PerYearExisting), "shear is not checked", "CAUTION",
		"(moment)\n"} { // the rating's sense is the element's effect, not tension
		if !strings.Contains(out, want) {
			t.Errorf("explain lacks %q:\n%s", want, out)
		}
	}
	buf.Reset()
	if err := ExplainIn(&buf, run, br, "S1-4:M", units.SI); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), "no section modulus or no fatigue category for S1-4:M") {
		t.Errorf("S1-4:M explain:\n%s", buf.String())
	}
	// The floor beam: its section under the stringer line (5.5 - 1.5) / 2 = 2 m from truss A,
	// its moment (R/2) x 2 m = 1.0 R (statics across the beam, each line bringing R/2).
	buf.Reset()
	if err := ExplainIn(&buf, run, br, "FB4:M", units.SI); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"under the stringer line 2.00 m from truss A", "track 1 1.0000 m", "section modulus W 6000000 mm³",
		"determinant length 11.0 m"} { // 2 b (EN 1991-2 Table 6.2, from memory)
		if !strings.Contains(buf.String(), want) {
			t.Errorf("FB4:M explain lacks %q:\n%s", want, buf.String())
		}
	}
	v := bridgePage(run, br, units.SI)
	drawn := false
	for _, s := range v.Sections {
		if s.Label == "S1-3:M" {
			drawn = s.Fatigue != nil && strings.Contains(s.Fatigue.Caption, "S1-3:M") && strings.Contains(s.Fatigue.Caption, "mid-span") &&
				strings.Contains(s.Fatigue.Caption, "W = 2500000 mm³")
			if s.Unit != "kN·m" {
				t.Errorf("the rating table of S1-3:M is in %q, want kN·m", s.Unit)
			}
		}
	}
	if !drawn {
		t.Error("no fatigue chart in the section of S1-3:M")
	}
}
