package screening_test

import (
	"fmt"
	"math"
	"syscall"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// fatigueBenchBridges are trusses of the forms the benchmark fleet draws (screening/fleetgen:
// Pratt, Howe, Warren, Warren with verticals, K, subdivided and polygonal Pratts, continuous
// spans), 6 to 16 panels, every member with capacities and, as the fleet's, an area sized
// at about 165 MPa under its larger design force and fatigue category 71.
func fatigueBenchBridges(b testing.TB, s *screening.Settings) []screening.Bridge {
	b.Helper()
	params := []truss.Params{
		{Type: "pratt", SpanM: 60, Panels: 12, DepthM: 7.5},
		{Type: "pratt", SpanM: 36, Panels: 6, DepthM: 5},
		{Type: "pratt", SpanM: 96, Panels: 16, DepthM: 11, EndDepthM: 7.7},
		{Type: "pratt", SpanM: 80, Panels: 16, DepthM: 9, Deck: "deck"},
		{Type: "pratt-sub-ties", SpanM: 72, Panels: 12, DepthM: 9},
		{Type: "pratt", SpanM: 50, Panels: 10, DepthM: 6.5, Spans: 2},
		{Type: "howe", SpanM: 42, Panels: 8, DepthM: 5.5},
		{Type: "warren", SpanM: 45, Panels: 9, DepthM: 5.5},
		{Type: "warren", SpanM: 70, Panels: 14, DepthM: 8},
		{Type: "warren-verticals", SpanM: 56, Panels: 10, DepthM: 7},
		{Type: "k-truss", SpanM: 84, Panels: 14, DepthM: 10},
	}
	var out []screening.Bridge
	var w screening.Screener
	for i, p := range params {
		mem := withCapacities(b, p)
		br := screening.Bridge{ID: fmt.Sprintf("B-%d", i), Truss: p, TrussShare: 0.5, Tracks: 1,
			DeadLoadKNPerM: 9 + 0.14*p.SpanM, YearBuilt: 1900 + 5*i, Members: mem}
		res := w.Screen(br, s)
		if res.Err != nil {
			b.Fatal(res.Err)
		}
		for _, m := range res.Members {
			if m.Effect != "" {
				continue
			}
			demand := max(m.Dead+m.Proposed.Max.Value*m.Proposed.Impact, -(m.Dead + m.Proposed.Min.Value*m.Proposed.Impact), 1)
			area := math.Round(demand/0.165/100) * 100
			mem[m.Label] = rating.Member{CapacityTension: 3000, CapacityCompression: 2500, AreaMM2: max(area, 100), FatigueCategory: "71"}
		}
		out = append(out, br)
	}
	return out
}

// fatigueBenchSettings are the default configuration's scenarios with the network view, and,
// with fatigue, the demo railway's traffic (testdata/demo/traffic.yaml: 4 freight trains and
// 24 multiple units a day in each scenario, at 60 and 100 km/h).
func fatigueBenchSettings(b testing.TB, withFatigue bool) *screening.Settings {
	b.Helper()
	trains := map[string]*traffic.Train{}
	for _, spec := range []string{"northmoor-freight-today", "eastfell-multiple-unit", "northmoor-freight-proposed"} {
		t, err := traffic.ParseSpec(spec, configs.Trains())
		if err != nil {
			b.Fatal(err)
		}
		trains[spec] = t
	}
	ex, _ := screening.NewScenario("existing", []*traffic.Train{trains["northmoor-freight-today"], trains["eastfell-multiple-unit"]})
	pr, _ := screening.NewScenario("proposed", []*traffic.Train{trains["northmoor-freight-proposed"], trains["eastfell-multiple-unit"]})
	s := &screening.Settings{Existing: ex, Proposed: pr, Dynamic: traffic.Dynamic{Kind: traffic.Phi3}, Method: rating.WorkingStress,
		Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2}}
	var err error
	if s.Network, err = screening.NewNetworkTrains(); err != nil {
		b.Fatal(err)
	}
	s.ShareTrains()
	if !withFatigue {
		return s
	}
	prep := map[string]*fatigue.Train{}
	for name, t := range trains {
		if prep[name], err = fatigue.PrepareTrain(t); err != nil {
			b.Fatal(err)
		}
	}
	f := &screening.FatigueSettings{Settings: fatigue.Settings{GammaMf: 1.15, RivetedCategoryMPa: 71, DynamicFactor: 1.1, Year: 2026,
		DefaultYearBuilt: 1900, HorizonYears: 30, RiseFactor: 2,
		History: []fatigue.Period{{FromYear: 1850, Factor: 0.2}, {FromYear: 1950, Factor: 0.5}, {FromYear: 1990, Factor: 1}}}}
	f.Existing = []fatigue.Traffic{{Train: prep["northmoor-freight-today"], PerYear: 4 * 365, SpeedMPerS: 60 / 3.6},
		{Train: prep["eastfell-multiple-unit"], PerYear: 24 * 365, SpeedMPerS: 100 / 3.6}}
	f.Proposed = []fatigue.Traffic{{Train: prep["northmoor-freight-proposed"], PerYear: 4 * 365, SpeedMPerS: 60 / 3.6},
		{Train: prep["eastfell-multiple-unit"], PerYear: 24 * 365, SpeedMPerS: 100 / 3.6}}
	s.Fatigue = f
	return s
}

// BenchmarkScreenFatigue screens bridges of the benchmark fleet's forms with and without the
// fatigue check of every member (ns/op is per bridge): the fatigue check's share of a
// bridge's screening, which the fleet run measures end to end (BENCHMARKS.md, "Fatigue").
func BenchmarkScreenFatigue(b *testing.B) {
	bridges := fatigueBenchBridges(b, fatigueBenchSettings(b, false))
	for _, on := range []bool{false, true} {
		s := fatigueBenchSettings(b, on)
		b.Run(fmt.Sprintf("fatigue-%v", on), func(b *testing.B) {
			var w screening.Screener
			n := 0
			cpu0 := processCPU(b)
			for b.Loop() {
				if r := w.Screen(bridges[n%len(bridges)], s); r.Err != nil {
					b.Fatal(r.Err)
				}
				n++
			}
			// The process's CPU time is steadier than the wall time on a shared machine.
			b.ReportMetric(float64(processCPU(b)-cpu0)/float64(n), "cpu-ns/op")
		})
	}
}

// processCPU is the CPU time (user and system, ns) the test process has used so far.
func processCPU(b testing.TB) int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		b.Fatal(err)
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}

// BenchmarkCheckFatigue is the fatigue check alone of the bridges of BenchmarkScreenFatigue
// (cpu-ns/op per bridge): what the check costs, without the noise of the rest.
func BenchmarkCheckFatigue(b *testing.B) {
	s := fatigueBenchSettings(b, true)
	var checks []func(*screening.Screener) error
	for _, br := range fatigueBenchBridges(b, fatigueBenchSettings(b, false)) {
		c, err := screening.FatigueCheck(br, s)
		if err != nil {
			b.Fatal(err)
		}
		checks = append(checks, c)
	}
	var w screening.Screener
	n := 0
	cpu0 := processCPU(b)
	for b.Loop() {
		if err := checks[n%len(checks)](&w); err != nil {
			b.Fatal(err)
		}
		n++
	}
	b.ReportMetric(float64(processCPU(b)-cpu0)/float64(n), "cpu-ns/op")
}

// withCapacities gives every member of the truss p the same capacities (3000 kN in tension,
// 2500 kN in compression).
func withCapacities(b testing.TB, p truss.Params) map[string]rating.Member {
	t, err := truss.Build(p)
	if err != nil {
		b.Fatal(err)
	}
	mem := map[string]rating.Member{}
	for _, l := range t.Labels() {
		mem[l] = rating.Member{CapacityTension: 3000, CapacityCompression: 2500}
	}
	return mem
}
