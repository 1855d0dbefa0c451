package floor

import (
	"fmt"
	"strconv"
	"strings"
)

// FatigueLine is a floor element's bending moment at its fatigue section as an influence line
// along the track, for the fatigue check (screening/fatigue): the moment under a train on
// track t is Shares[t] times the train's effect on the line (X, Eta), which is straight
// between its points and zero outside them, so that the exact passage histories apply as they
// do to the truss members.
//
//   - A stringer (S<track>-<panel>): the moment at mid-span of the simply supported stringer,
//     a triangle of height p/4 over its panel (kN·m per kN on the stringer line; a textbook
//     influence line), and its track's share 1/2: each of the track's two stringer lines
//     carries half the axle loads. The other tracks' shares are 0.
//   - A floor beam (FB<point>): its reaction from one track, a triangle of height 1 over the
//     two adjacent panels (one for an end floor beam), and each track's share the moment at
//     the fatigue section per unit reaction of that track, each of its stringer lines bringing
//     half (statics across the floor beam, as Elements rates it). The fatigue section is the
//     stringer line under which the floor beam's largest live moment stands over the cases
//     Elements checks (each track alone, every track at once): the section its strength is
//     rated at. The shares may differ from track to track (an eccentric track).
type FatigueLine struct {
	X, Eta []float64
	// Shares are each track's factor on the line (a floor beam's in kN·m per kN of reaction).
	Shares []float64
	// SectionM locates the fatigue section: for a stringer from its panel's start (p/2), for
	// a floor beam from truss A.
	SectionM float64
	// DeterminantM is the element's determinant length for a dynamic factor: EN 1991-2 Table
	// 6.2's as Lengths recalls it (p + 3 m, 2 b, 3.6 m for an end floor beam; from memory),
	// which the fatigue dynamic factor of a train at speed (EN 1991-2 Annex C) takes.
	DeterminantM float64
}

// FatigueLine gives the fatigue line of the floor element labelled element ("S1-3", "FB4"),
// with the determinant lengths l. A floor beam needs the truss spacing.
func (s System) FatigueLine(element string, l Lengths) (FatigueLine, error) {
	s, _, err := s.check()
	if err != nil {
		return FatigueLine{}, err
	}
	n := len(s.PanelX) - 1
	shares := make([]float64, s.Tracks)
	if rest, ok := strings.CutPrefix(element, "FB"); ok {
		j, err := strconv.Atoi(rest)
		if err != nil || j < 0 || j > n {
			return FatigueLine{}, fmt.Errorf("floor beam %q: the bridge has floor beams FB0 to FB%d", element, n)
		}
		b := s.TrussSpacingM
		if !(b > 0) {
			return FatigueLine{}, fmt.Errorf("floor beam %s: the truss spacing is not known", element)
		}
		x, eta, _, err := ResultLine(s.PanelX, element+Moment.Suffix(), nil)
		if err != nil {
			return FatigueLine{}, err
		}
		ys := s.stringerLines()
		y := fatigueSection(b, ys)
		for t, tr := range ys {
			shares[t] = momentAt(b, y, []pointLoad{{tr[0], 0.5}, {tr[1], 0.5}})
		}
		lphi := l.FloorBeamTimes * b
		if j == 0 || j == n {
			lphi = l.EndFloorBeamM
		}
		return FatigueLine{X: x, Eta: eta, Shares: shares, SectionM: y, DeterminantM: lphi}, nil
	}
	track, panel, ok := parseStringer(element)
	if !ok || track < 1 || track > s.Tracks || panel < 1 || panel > n {
		return FatigueLine{}, fmt.Errorf("stringer %q: the bridge has stringers S1-1 to S%d-%d", element, s.Tracks, n)
	}
	a, b := s.PanelX[panel-1], s.PanelX[panel]
	p := b - a
	shares[track-1] = 0.5
	return FatigueLine{X: []float64{a, a + p/2, b}, Eta: []float64{0, p / 4, 0}, Shares: shares, SectionM: p / 2,
		DeterminantM: p + l.StringerAddM}, nil
}

// parseStringer reads a stringer's label S<track>-<panel>.
func parseStringer(label string) (track, panel int, ok bool) {
	rest, ok := strings.CutPrefix(label, "S")
	if !ok {
		return 0, 0, false
	}
	ts, ps, ok := strings.Cut(rest, "-")
	t, err1 := strconv.Atoi(ts)
	p, err2 := strconv.Atoi(ps)
	return t, p, ok && err1 == nil && err2 == nil
}

// fatigueSection is the stringer line (m from truss A) under which a floor beam of span b
// takes its largest moment per unit reaction, over each track loaded alone and every track
// at once (the cases of liveCoefficients, which rates the moment there); of lines with equal
// moments, the first.
func fatigueSection(b float64, lines [][2]float64) float64 {
	best, at := -1.0, 0.0
	consider := func(pts []pointLoad) {
		for _, pl := range pts {
			// A line's moment must beat the best by more than rounding: of equal ones (a
			// centred track's two lines) the first, nearer truss A, stands.
			if m := momentAt(b, pl.y, pts); m > best*(1+1e-12) {
				best, at = m, pl.y
			}
		}
	}
	var all []pointLoad
	for _, tr := range lines {
		pts := []pointLoad{{tr[0], 0.5}, {tr[1], 0.5}}
		consider(pts)
		all = append(all, pts...)
	}
	if len(lines) > 1 {
		consider(all)
	}
	return at
}

// momentAt is a simple beam's moment at y (from the left support, span b) under point loads:
// each load P at x gives P x (b - y) / b left of y and P y (b - x) / b right of it.
func momentAt(b, y float64, pts []pointLoad) float64 {
	m := 0.0
	for _, pl := range pts {
		if pl.y <= y {
			m += pl.p * pl.y * (b - y) / b
		} else {
			m += pl.p * y * (b - pl.y) / b
		}
	}
	return m
}
