package report

import (
	"io"
	"testing"

	"github.com/trussfleet/trussfleet/internal/units"
)

// BenchmarkBridgePage measures one bridge page of the demo fleet: geometry and influence
// lines rebuilt, every flagged member's placement recomputed and drawn, the page written.
func BenchmarkBridgePage(b *testing.B) {
	f := demoFleet(b, 40)
	d := f.Bridges[f.Rows[0].BridgeID]
	for b.Loop() {
		if err := pages.ExecuteTemplate(io.Discard, "bridge.tmpl", bridgePage(f.Run, d, units.SI)); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkIndexPage measures the index of the 40-bridge demo fleet.
func BenchmarkIndexPage(b *testing.B) {
	f := demoFleet(b, 40)
	names := pageNames(f.Rows)
	for b.Loop() {
		if err := pages.ExecuteTemplate(io.Discard, "index.tmpl", indexPage(f.Run, f.Rows, names, units.SI)); err != nil {
			b.Fatal(err)
		}
	}
}
