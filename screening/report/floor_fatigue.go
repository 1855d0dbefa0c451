package report

import (
	"fmt"
	"strings"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/floor"
)

// A floor element's fatigue check (screening/floor_fatigue.go) is done again for its page and
// its explanation on its moment line at the fatigue section (floor.FatigueLine), from the
// floor system as the inventory describes it now and the run's determinant lengths.

// floorFatigueInput is a floor element's moment line along the track and the check's bridge
// data (its shares of each track's load and its determinant length) added to fb.
func floorFatigueInput(run Run, b Bridge, m Member, fb fatigue.Bridge) (xs, eta []float64, _ fatigue.Bridge, err error) {
	f := m.Fatigue
	if run.Fatigue == nil || f.CategoryMPa == nil || f.SectionModulusMM3 == nil {
		return nil, nil, fb, fmt.Errorf("no fatigue check for floor element %s", m.Label)
	}
	if b.Floor == nil {
		return nil, nil, fb, fmt.Errorf("floor element %s: the inventory no longer describes the bridge's floor system", m.Label)
	}
	el, _, _ := floor.ResultEffect(m.Label)
	fl, err := b.Floor.FatigueLine(el, floorLengths(run))
	if err != nil {
		return nil, nil, fb, err
	}
	fb.Shares, fb.DeterminantM = fl.Shares, fl.DeterminantM
	return fl.X, fl.Eta, fb, nil
}

// floorLengths are the run's floor determinant lengths.
func floorLengths(run Run) floor.Lengths {
	if run.FloorLengths != nil {
		return *run.FloorLengths
	}
	return floor.DefaultLengths
}

// floorFatigueBasis says how a floor element's stresses follow from its moment: the section,
// the moment line, each track's share and the section modulus.
func floorFatigueBasis(b Bridge, m Member, rc *fatigueRecheck) string {
	el, _, _ := floor.ResultEffect(m.Label)
	var s strings.Builder
	fl, err := b.Floor.FatigueLine(el, floor.DefaultLengths)
	switch {
	case err != nil:
	case m.Kind == string(floor.KindFloorBeam):
		fmt.Fprintf(&s, "  fatigue section under the stringer line %s m from truss A, where the largest live moment stands; moment = the floor beam's reaction from a track (influence line a triangle of height 1 over its panels) x the track's share, the moment per unit reaction by statics:", num(fl.SectionM, 2))
		for t, v := range fl.Shares {
			fmt.Fprintf(&s, " track %d %s m;", t+1, num(v, 4))
		}
		s.WriteString("\n")
	default:
		fmt.Fprintf(&s, "  fatigue section at mid-span, %s m into the panel: moment influence line a triangle of height p/4 = %s m over the panel (textbook), each stringer line carrying half its track's axles (share 0.5)\n",
			num(fl.SectionM, 2), num(fl.SectionM/2, 3))
	}
	fmt.Fprintf(&s, "  section modulus W %s mm³; stress = moment (kN·m) x share x dynamic factor x 1e6 / W (MPa); a train at speed takes the dynamic factor at the element's determinant length %s m\n",
		num(*m.Fatigue.SectionModulusMM3, 0), num(rc.lphiM, 1))
	s.WriteString("  shear is not checked for fatigue: its details (connections, out-of-plane bending) need a detail assessment\n")
	return s.String()
}

// floorFatigueNote adds to a floor element's fatigue chart where its stress is taken: its
// fatigue section (the strength's influence line above may stand at another) and its section
// modulus; and that shear is not checked.
func floorFatigueNote(b Bridge, m Member, u units.System) string {
	el, _, _ := floor.ResultEffect(m.Label)
	fl, err := b.Floor.FatigueLine(el, floor.DefaultLengths)
	if err != nil || m.Fatigue.SectionModulusMM3 == nil {
		return ""
	}
	where := fmt.Sprintf("at mid-span of the stringer, %s %s into the panel (its moment influence line a triangle of height p/4)", qty(u, units.Length, fl.SectionM), u.Name(units.Length))
	if m.Kind == string(floor.KindFloorBeam) {
		where = fmt.Sprintf("under the stringer line %s %s from truss A, where the floor beam's largest live moment stands", qty(u, units.Length, fl.SectionM), u.Name(units.Length))
	}
	return fmt.Sprintf(" Stress: the moment %s over the section modulus W = %s mm³. Shear is not checked for fatigue: its details need a detail assessment.", where, num(*m.Fatigue.SectionModulusMM3, 0))
}
