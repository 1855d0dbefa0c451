package importers

import (
	"fmt"

	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/store"
)

// The floor system's columns (docs/inventory.md, "The floor system"). A bridges.csv row that
// gives any of the bridge columns, or a bridge with floor elements in members.csv, has its
// floor system rated.
var (
	colStringerSpacing = column{name: "stringer_spacing_m", alt: "stringer_spacing_ft", factor: metresPerFoot}
	colStringerDead    = column{name: "stringer_dead_kn_per_m", alt: "stringer_dead_kip_per_ft", factor: kNPerMPerKipFt}
	colFloorBeamDead   = column{name: "floor_beam_dead_kn_per_m", alt: "floor_beam_dead_kip_per_ft", factor: kNPerMPerKipFt}

	colMoment = column{name: "capacity_moment_knm", alt: "capacity_moment_kipft", factor: kNPerKip * metresPerFoot}
	colShear  = column{name: "capacity_shear_kn", alt: "capacity_shear_kip", factor: kNPerKip}
)

// Bounds of the floor data: stringer lines stand within a track's width (a few metres); dead
// loads and capacities beyond these are typing or unit errors.
const (
	maxStringerSpacingM = 5.0
	maxFloorDeadKNPerM  = 100.0
	maxMomentKNM        = 1e5
)

// floorQuantity reads an optional positive quantity bounded by limit (SI unit named).
func floorQuantity(p *row, c column, metric, imperial string, limit float64, unit string) *float64 {
	f := p.quantity(c, metric, imperial)
	raw := pickRaw(p, c, metric, imperial)
	p.positive(p.pick(c), raw, f)
	p.atMost(p.pick(c), raw, f, limit, unit)
	return f
}

// parseBridgeFloor reads a bridges.csv row's floor columns into b.
func parseBridgeFloor(r bridgeRecord, p *row, b *store.Bridge) {
	b.StringerSpacingM = floorQuantity(p, colStringerSpacing, r.StringerSpacingM, r.StringerSpacingFt, maxStringerSpacingM, "m")
	b.StringerDeadKNPerM = floorQuantity(p, colStringerDead, r.StringerDeadKNPerM, r.StringerDeadKipPerFt, maxFloorDeadKNPerM, "kN/m")
	b.FloorBeamDeadKNPerM = floorQuantity(p, colFloorBeamDead, r.FloorBeamDeadKNPerM, r.FloorBeamDeadKipPerFt, maxFloorDeadKNPerM, "kN/m")
}

// parseMemberFloor reads a members.csv row's floor columns into m and checks that a floor
// element holds floor capacities and senses, and a truss member truss ones.
func parseMemberFloor(r memberRecord, p *row, m *store.Member) {
	rec := r
	m.CapacityMomentKNM = floorQuantity(p, colMoment, r.CapacityMomentKNM, r.CapacityMomentKipFt, maxMomentKNM, "kN·m")
	m.CapacityShearKN = floorQuantity(p, colShear, r.CapacityShearKN, r.CapacityShearKip, maxCapacityKN, "kN")
	isFloor := floor.IsLabel(m.Member)
	parseFloorFatigue(r, p, m, isFloor)
	sense := ""
	if m.RatingSense != nil {
		sense = *m.RatingSense
	}
	if isFloor {
		if m.CapacityTensionKN != nil || m.CapacityCompressionKN != nil {
			p.fail(p.pick(colTension), pickRaw(p, colTension, rec.CapacityTensionKN, rec.CapacityTensionKip),
				"%s is a floor element: give capacity_moment and capacity_shear, not tension or compression", m.Member)
		}
		switch {
		case sense == "tension" || sense == "compression":
			p.fail("rating_sense", rec.RatingSense, "%s is a floor element: its rating factor is rated in moment or shear", m.Member)
		case m.RatingFactor != nil && sense == "":
			p.fail("rating_sense", rec.RatingSense, "%s is a floor element: say whether its rating_factor rates moment or shear", m.Member)
		}
		return
	}
	if m.CapacityMomentKNM != nil || m.CapacityShearKN != nil {
		p.fail(p.pick(colMoment), pickRaw(p, colMoment, r.CapacityMomentKNM, r.CapacityMomentKipFt),
			"%s is a truss member: its capacities are in tension and compression (floor elements are S<track>-<panel> and FB<point>)", m.Member)
	}
	if sense == "moment" || sense == "shear" {
		p.fail("rating_sense", rec.RatingSense, "%s is a truss member: its rating factor is rated in tension or compression", m.Member)
	}
}

// hasFloorCapacity says whether a members.csv row gives a floor capacity.
func hasFloorCapacity(r memberRecord) bool {
	return r.CapacityMomentKNM != "" || r.CapacityMomentKipFt != "" || r.CapacityShearKN != "" || r.CapacityShearKip != ""
}

// floorLabels adds a bridge's floor labels to its label set.
func floorLabels(ls *labelSet, panels, tracks int) {
	for _, l := range floor.Labels(panels, tracks) {
		ls.set[l] = l
	}
	ls.desc += fmt.Sprintf(", with floor elements S1-1 to S%d-%d and FB0 to FB%d", max(tracks, 1), panels, panels)
}
