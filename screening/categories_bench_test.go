package screening_test

import (
	"fmt"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// benchBridges are Pratt spans of 48 m (8 panels) and 96 m (16 panels) and a Pratt
// continuous over two 48 m spans, every member with capacities, under the default
// configuration's freight and multiple-unit trains.
func benchSetup(b *testing.B, withNetwork bool) ([]screening.Bridge, *screening.Settings) {
	b.Helper()
	var trains []*traffic.Train
	for _, spec := range []string{"northmoor-freight-today", "eastfell-multiple-unit", "northmoor-freight-proposed"} {
		t, err := traffic.ParseSpec(spec, configs.Trains())
		if err != nil {
			b.Fatal(err)
		}
		trains = append(trains, t)
	}
	ex, _ := screening.NewScenario("existing", trains[:2])
	pr, _ := screening.NewScenario("proposed", trains[1:])
	s := &screening.Settings{Existing: ex, Proposed: pr, Dynamic: traffic.Dynamic{Kind: traffic.Phi3}, Method: rating.WorkingStress,
		Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2}}
	if withNetwork {
		var err error
		if s.Network, err = screening.NewNetworkTrains(); err != nil {
			b.Fatal(err)
		}
	}
	s.ShareTrains()
	var out []screening.Bridge
	for _, p := range []truss.Params{{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6}, {Type: "pratt", SpanM: 96, Panels: 16, DepthM: 11}, {Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6, Spans: 2}, {Type: "howe", SpanM: 64, Panels: 12, DepthM: 8, Spans: 3}} {
		out = append(out, screening.Bridge{ID: p.Type, Truss: p, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 20, Members: withCapacities(b, p)})
	}
	return out, s
}

// BenchmarkScreenNetwork is one bridge screened with and without the network view (the
// categories' eight geometries and Cooper E80 swept besides the scenarios' trains).
func BenchmarkScreenNetwork(b *testing.B) {
	for _, on := range []bool{false, true} {
		bridges, s := benchSetup(b, on)
		for _, br := range bridges {
			name := fmt.Sprintf("span-%g", br.Truss.SpanM)
			if br.Truss.Spans > 1 {
				name = fmt.Sprintf("spans-%dx%g", br.Truss.Spans, br.Truss.SpanM)
			}
			b.Run(fmt.Sprintf("%s/network-%v", name, on), func(b *testing.B) {
				var w screening.Screener
				for b.Loop() {
					if r := w.Screen(br, s); r.Err != nil {
						b.Fatal(r.Err)
					}
				}
			})
		}
	}
}

// BenchmarkNetworkTrains is the envelope of each network train over the 96 m Pratt truss,
// beside the proposed freight train, to show where the network view's time goes.
func BenchmarkNetworkTrains(b *testing.B) {
	lines, ords := influenceLines(b, truss.Params{Type: "pratt", SpanM: 96, Panels: 16, DepthM: 11})
	el, err := envelope.NewLines(lines.X, ords)
	if err != nil {
		b.Fatal(err)
	}
	freight, err := traffic.ParseSpec("northmoor-freight-proposed", configs.Trains())
	if err != nil {
		b.Fatal(err)
	}
	trains := []*traffic.Train{freight, traffic.Cooper(80)}
	for _, g := range network.Geometries() {
		long := *g.Long
		long.Name += " long"
		trains = append(trains, g.Unit, &long)
		n := network.WagonsThatMatter(lines.X[len(lines.X)-1]-lines.X[0], g.LengthM)
		cutLong, cutUnit := g.Wagons(n, true), g.Wagons(n, false)
		cutLong.Name += " long cut"
		cutUnit.Name += " cut"
		trains = append(trains, cutUnit, cutLong)
	}
	for _, tr := range trains {
		ld, err := envelope.Prepare(tr)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(tr.Name, func(b *testing.B) {
			var c envelope.Calculator
			var out []envelope.Extremes
			for b.Loop() {
				if out, err = c.Envelope(el, ld, envelope.Options{Share: 0.5}, out[:0]); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
