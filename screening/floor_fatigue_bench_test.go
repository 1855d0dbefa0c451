package screening_test

import (
	"fmt"
	"io/fs"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// BenchmarkScreenFloorFatigue screens BenchmarkScreenFloor's bridge (a 12-panel Pratt, 72 m,
// its floor rated) with the fatigue check under the demo's freight trains, 3000 passages a
// year each: every truss member with an area and a category, its floor elements without
// (none checked) and with a section modulus and a category (12 stringers and 13 floor beams
// checked on their moments).
func BenchmarkScreenFloorFatigue(b *testing.B) {
	ref := func(name string) screening.TrainRef {
		src, err := fs.ReadFile(configs.Trains(), name+".yaml")
		if err != nil {
			b.Fatal(err)
		}
		return screening.TrainRef{Asked: name, Name: name, FileName: name + ".yaml", Source: string(src)}
	}
	today, proposed := ref("northmoor-freight-today"), ref("northmoor-freight-proposed")
	p := screening.Plan{Existing: []screening.TrainRef{today}, Proposed: []screening.TrainRef{proposed}, Dynamic: "phi3",
		Method: "working-stress", Flag: 1, Review: 1.1, Worse: 0.2,
		Fatigue: &screening.FatiguePlan{GammaMf: 1.15, RivetedCategoryMPa: 71, DynamicFactor: 1.2, Year: 2026, DefaultYearBuilt: 1900,
			HorizonYears: 30, RiseFactor: 1.5,
			Existing: []screening.FatigueTraffic{{Train: today, PerYear: 3000}},
			Proposed: []screening.FatigueTraffic{{Train: proposed, PerYear: 3000}}}}
	s, err := p.Settings()
	if err != nil {
		b.Fatal(err)
	}
	tp := truss.Params{Type: "pratt", SpanM: 72, Panels: 12, DepthM: 9}
	t, err := truss.Build(tp)
	if err != nil {
		b.Fatal(err)
	}
	for _, withFloor := range []bool{false, true} {
		br := screening.Bridge{ID: "B", Truss: tp, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 20, TrussSpacingM: 5,
			Floor: screening.FloorSystem{Rate: true}, Members: map[string]rating.Member{}}
		for _, l := range t.Labels() {
			br.Members[l] = rating.Member{CapacityTension: 1e4, CapacityCompression: 1e4, AreaMM2: 12000, FatigueCategory: "71"}
		}
		if withFloor {
			for _, l := range floor.Labels(12, 1) {
				br.Members[l+floor.Moment.Suffix()] = rating.Member{CapacityTension: 1e4, SectionModulusMM3: 4e6, FatigueCategory: "71"}
			}
		}
		b.Run(fmt.Sprintf("floor-fatigue=%v", withFloor), func(b *testing.B) { benchScreen(b, br, s) })
	}
}
