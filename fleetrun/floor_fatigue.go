package fleetrun

import (
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/store"
)

// floorFatigueData puts a floor element's fatigue data (its section modulus and category) on
// its moment's rating member, and says whether the row holds any.
func floorFatigueData(m store.Member, r *rating.Member) bool {
	r.FatigueCategory = m.FatigueCategory
	if m.SectionModulusMM3 != nil {
		r.SectionModulusMM3 = *m.SectionModulusMM3
	}
	return r.SectionModulusMM3 > 0 || r.FatigueCategory != ""
}
