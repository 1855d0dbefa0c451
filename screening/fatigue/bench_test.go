package fatigue

import (
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// BenchmarkCheck times the fatigue check of every member of a 12-panel Pratt truss (60 m,
// 7.5 m deep, 45 members) under one train each of existing and proposed traffic, both
// directions: the example freight trains (2 locomotives and 60 wagons, 252 axles) or the
// multiple unit (9 cars, 36 axles). ns/member-train is the cost of one member under one
// train, both directions.
func BenchmarkCheck(b *testing.B) {
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 60, Panels: 12, DepthM: 7.5})
	if err != nil {
		b.Fatal(err)
	}
	lines, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		b.Fatal(err)
	}
	// own: every member's line its own; shared: a member whose line is another's or its
	// mirror image takes that line, as screening does (the truss is symmetric).
	var own, shared []Member
	curve, _ := NewCurve(71, 1.15)
	for _, m := range lines.Members {
		l, err := NewLine(lines.X, m.Ordinates)
		if err != nil {
			b.Fatal(err)
		}
		own = append(own, Member{Line: l, AreaMM2: 5000, Curve: curve})
		for _, o := range shared {
			if same, mirror := o.Line.Matches(l); same {
				l = o.Line
				break
			} else if mirror {
				l = o.Line.Mirror()
				break
			}
		}
		shared = append(shared, Member{Line: l, AreaMM2: 5000, Curve: curve})
	}
	prep := func(name string) *Train {
		t, err := traffic.ParseSpec(name, configs.Trains())
		if err != nil {
			b.Fatal(err)
		}
		p, err := PrepareTrain(t)
		if err != nil {
			b.Fatal(err)
		}
		return p
	}
	s := &Settings{GammaMf: 1.15, RivetedCategoryMPa: 71, DynamicFactor: 1.1, Year: 2026, DefaultYearBuilt: 1900, HorizonYears: 30, RiseFactor: 2}
	br := Bridge{SpanM: 60, YearBuilt: 1900, Shares: []float64{0.5}}
	for _, c := range []struct{ name, ex, pr string }{
		{"freight", "northmoor-freight-today", "northmoor-freight-proposed"},
		{"multiple-unit", "eastfell-multiple-unit", "eastfell-multiple-unit"},
	} {
		ex := []Traffic{{Train: prep(c.ex), PerYear: 1000, SpeedMPerS: 20}}
		pr := []Traffic{{Train: prep(c.pr), PerYear: 1000, SpeedMPerS: 20}}
		for _, v := range []struct {
			name    string
			members []Member
		}{{"", own}, {"-mirrored", shared}} {
			members := v.members
			b.Run(c.name+v.name, func(b *testing.B) {
				var calc Calculator
				b.ReportAllocs()
				for b.Loop() {
					calc.Forget() // a new bridge: nothing counted yet
					for _, m := range members {
						if _, err := calc.Check(m, br, s, ex, pr, nil); err != nil {
							b.Fatal(err)
						}
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(2*len(members)), "ns/member-train")
			})
		}
	}
}
