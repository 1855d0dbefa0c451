package trusstest

import (
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// InfluenceLines builds the truss p and its members' influence lines, with each member's
// ordinates as one slice per member; an invalid truss fails the test.
func InfluenceLines(tb testing.TB, p truss.Params) (*analysis.Lines, [][]float64) {
	tb.Helper()
	tr, err := truss.Build(p)
	if err != nil {
		tb.Fatal(err)
	}
	lines, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		tb.Fatal(err)
	}
	ords := make([][]float64, len(lines.Members))
	for i, m := range lines.Members {
		ords[i] = m.Ordinates
	}
	return lines, ords
}
