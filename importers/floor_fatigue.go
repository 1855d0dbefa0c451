package importers

import "github.com/trussfleet/trussfleet/store"

// A floor element's fatigue data (docs/inventory.md, "The floor system"): its elastic section
// modulus, with which the fatigue check turns its bending moment into a stress (M / W), and
// the fatigue_category every member may give.
var colSectionModulus = column{name: "section_modulus_mm3", alt: "section_modulus_in3", factor: mm3PerIn3}

const (
	// mm3PerIn3 is 25.4³, exact by definition of the inch.
	mm3PerIn3 = 25.4 * 25.4 * 25.4
	// maxSectionModulusMM3 bounds a floor element's section modulus: 1e9 mm³ is ten times a
	// deep plate-girder floor beam's (common practice: riveted stringers hold some 1e6 to
	// 1e7 mm³); a larger value is a typing or unit error.
	maxSectionModulusMM3 = 1e9
)

// parseFloorFatigue reads a members.csv row's section modulus into m and refuses it on a
// truss member's row, whose fatigue stress is its force over its area; and refuses an area on
// a floor element's row, whose stress is its moment over its section modulus (an area there
// would be kept and never used).
func parseFloorFatigue(r memberRecord, p *row, m *store.Member, isFloor bool) {
	m.SectionModulusMM3 = floorQuantity(p, colSectionModulus, r.SectionModulusMM3, r.SectionModulusIn3, maxSectionModulusMM3, "mm³")
	if m.AreaMM2 != nil && isFloor {
		p.fail(p.pick(colArea), pickRaw(p, colArea, r.AreaMM2, r.AreaIn2),
			"%s is a floor element: its fatigue check takes section_modulus_mm3 (its moment over W), not an area", m.Member)
	}
	if m.SectionModulusMM3 != nil && !isFloor {
		p.fail(p.pick(colSectionModulus), pickRaw(p, colSectionModulus, r.SectionModulusMM3, r.SectionModulusIn3),
			"%s is a truss member: a section modulus is for a floor element's bending (S<track>-<panel>, FB<point>); a truss member's fatigue check takes its area_mm2", m.Member)
	}
}
