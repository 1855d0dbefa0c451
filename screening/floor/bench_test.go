package floor

import (
	"testing"

	"github.com/trussfleet/trussfleet/screening/envelope"
)

// BenchmarkLive: one bridge's floor system (12 panels of 6 m, trusses 5 m apart) under the
// demo's trains, as a screening run computes it per bridge.
func BenchmarkLive(b *testing.B) {
	var loads []*envelope.Load
	for _, tr := range demoTrains(b)[6:] {
		loads = append(loads, prepare(b, tr))
	}
	x := make([]float64, 13)
	for j := range x {
		x[j] = 6 * float64(j)
	}
	sys := System{PanelX: x, TrussSpacingM: 5}
	els, _, err := sys.Elements()
	if err != nil {
		b.Fatal(err)
	}
	var a Analyser
	for b.Loop() {
		a.Reset()
		if _, err := a.Live(sys, els, loads); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkMaxMoment(b *testing.B) {
	tr := demoTrains(b)[7]
	for b.Loop() {
		if _, err := MaxMoment(tr, 6); err != nil {
			b.Fatal(err)
		}
	}
}
