package fleetrun

import (
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/store"
)

// floorInput adds the inventory's floor system to a screening input: the bridge's floor
// columns, and each floor element's row as two rated effects ("S1-3:M" with the moment
// capacity, "S1-3:V" with the shear capacity, each held as the positive sense's capacity; a
// stored rating factor goes to the effect its sense names). A bridge with any floor column
// or floor element has its floor system rated.
func floorInput(b store.Bridge, sb *screening.Bridge) {
	f := &sb.Floor
	for _, v := range []struct {
		src *float64
		dst *float64
	}{{b.StringerSpacingM, &f.StringerSpacingM}, {b.StringerDeadKNPerM, &f.StringerDeadKNPerM}, {b.FloorBeamDeadKNPerM, &f.FloorBeamDeadKNPerM}} {
		if v.src != nil {
			*v.dst, f.Rate = *v.src, true
		}
	}
}

// floorMember adds a floor element's row to the input; false where m is a truss member.
func floorMember(m store.Member, sb *screening.Bridge) bool {
	if !floor.IsLabel(m.Member) {
		return false
	}
	sb.Floor.Rate = true
	for _, e := range []struct {
		eff floor.Effect
		cap *float64
	}{{floor.Moment, m.CapacityMomentKNM}, {floor.Shear, m.CapacityShearKN}} {
		r := rating.Member{ConditionFactor: m.ConditionFactor}
		if e.cap != nil {
			r.CapacityTension = *e.cap
		}
		if m.RatingFactor != nil && m.ReferenceTrain != nil && m.RatingSense != nil && *m.RatingSense == string(e.eff) {
			r.RatingFactor, r.ReferenceTrain = *m.RatingFactor, *m.ReferenceTrain
			r.RatingSense, r.RatingSenseGiven = rating.Tension, true
		}
		fatigueData := false
		if e.eff == floor.Moment {
			// The moment's result carries the element's fatigue data (its fatigue check).
			fatigueData = floorFatigueData(m, &r)
		}
		if r.CapacityTension > 0 || r.RatingFactor > 0 || fatigueData {
			sb.Members[m.Member+e.eff.Suffix()] = r
		}
	}
	return true
}
