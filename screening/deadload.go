package screening

import (
	"fmt"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// deadForces gives each member's dead-load force (kN): the deck and floor system's part,
// DeadLoadKNPerM less TrussWeightKNPerM, at the deck chord's panel points (a uniform load on
// simply supported stringers, through the influence lines), and the truss's own weight,
// TrussWeightKNPerM, half at the top chord's joints and half at the bottom chord's
// (analysis.DeadJointLoads). Without a truss weight the whole dead load acts at the deck
// chord's panel points, as it always has.
func deadForces(t *truss.Truss, lines *analysis.Lines, b Bridge) ([]float64, error) {
	if !(b.TrussWeightKNPerM >= 0 && b.TrussWeightKNPerM <= b.DeadLoadKNPerM) {
		return nil, fmt.Errorf("truss weight %v kN/m: must be from 0 to the dead load, %v kN/m", b.TrussWeightKNPerM, b.DeadLoadKNPerM)
	}
	out := make([]float64, len(lines.Members))
	deck := b.DeadLoadKNPerM - b.TrussWeightKNPerM
	for i, l := range lines.Members {
		out[i] = analysis.DeadLoad(lines.X, l.Ordinates, deck)
	}
	if b.TrussWeightKNPerM == 0 {
		return out, nil
	}
	own, err := analysis.DeadForces(t, analysis.Options{}, analysis.DeadJointLoads(t, b.TrussWeightKNPerM))
	if err != nil {
		return nil, fmt.Errorf("truss weight: %w", err)
	}
	for i := range out {
		out[i] += own[i]
	}
	return out, nil
}
