package runreport

import (
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// floorSystem is the bridge's floor system as a run screens it, for its elements' fatigue
// arithmetic; nil where the floor is not rated.
func floorSystem(b store.Bridge, inv []store.Member, t *truss.Truss) *floor.System {
	sb := fleetrun.ScreeningInput(b, inv)
	if !sb.Floor.Rate {
		return nil
	}
	sys := sb.FloorSystemOf(t)
	return &sys
}
