package main

import (
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/floor"
)

// worstKind tells a priority list's worst member apart: a truss member, a stringer or a
// floor beam ("" for a bridge without one).
func worstKind(label string) string {
	if label == "" {
		return ""
	}
	return floor.KindOf(label)
}

// effectQuantity is the quantity a result's effects are in: a floor element's moment in
// kN·m (kip-ft), every other effect a force in kN (kip).
func effectQuantity(label string) units.Quantity {
	if _, eff, ok := floor.ResultEffect(label); ok && eff == floor.Moment {
		return units.Moment
	}
	return units.Force
}
