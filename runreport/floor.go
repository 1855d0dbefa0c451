package runreport

import (
	"fmt"

	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// floorMembers gives the run's floor-system results of a bridge in the floor's order
// (stringers by track and panel, then floor beams; moment before shear), each with what the
// inventory holds for its element: the capacity of its effect, held as the positive sense's,
// and a stored rating factor rated in that effect.
func floorMembers(results map[string]*report.Member, held map[[2]string]store.Member, panels, tracks int) []report.Member {
	var out []report.Member
	for _, el := range floor.Labels(panels, tracks) {
		for _, eff := range []floor.Effect{floor.Moment, floor.Shear} {
			m, ok := results[el+eff.Suffix()]
			if !ok {
				continue // not rated (a floor beam without the truss spacing) or not screened
			}
			m.Kind = floor.KindOf(m.Label)
			m.ConditionFactor = 1
			if h, ok := held[[2]string{el, ""}]; ok {
				m.ConditionFactor = h.ConditionFactor
				if eff == floor.Moment {
					m.CapacityTensionKN = h.CapacityMomentKNM
				} else {
					m.CapacityTensionKN = h.CapacityShearKN
				}
				if h.RatingFactor != nil && h.ReferenceTrain != nil && h.RatingSense != nil && *h.RatingSense == string(eff) {
					m.StoredRF, m.ReferenceTrain, m.RatingSense = h.RatingFactor, *h.ReferenceTrain, *h.RatingSense
				}
			}
			out = append(out, *m)
		}
	}
	return out
}

// floorNotes says, in words, what the screening of the bridge's floor system assumed and left
// unrated (floor.Notes, from the inventory as it is now); nil where the floor is not rated.
func floorNotes(b store.Bridge, inv []store.Member, t *truss.Truss) []string {
	sb := fleetrun.ScreeningInput(b, inv)
	if !sb.Floor.Rate {
		return nil
	}
	_, n, err := sb.FloorSystemOf(t).Elements()
	if err != nil {
		return []string{err.Error()}
	}
	out := []string{}
	if n.FloorBeamsNotRated > 0 {
		out = append(out, fmt.Sprintf("%d floor beams not rated: the truss spacing, their span, is not known", n.FloorBeamsNotRated))
	}
	return append(out, n.Assumed...)
}
