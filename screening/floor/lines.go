package floor

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// ResultLine is the influence line along the track of a result's live effect, in the bridge's
// coordinates over the element's own panels (zero outside them), for drawing and explaining
// it:
//   - a stringer's moment ("S1-3:M"): the moment at the section where train tr's absolute
//     largest moment stands (mid-span without a train), a triangle of height ξ(p − ξ)/p, times
//     1/2 for the one line's half of the axle loads;
//   - a stringer's end shear: 1 at the support falling to 0 over the panel, times 1/2;
//   - a floor beam's effect: its reaction from one track, a triangle of height 1 over the two
//     panels (one for an end floor beam); the moment and the shear follow from it by statics
//     (a factor the floor's geometry gives, which the caller applies).
//
// sectionM is the stringer moment's section from the panel's start (0 for other effects).
func ResultLine(panelX []float64, label string, tr *traffic.Train) (x, eta []float64, sectionM float64, err error) {
	el, eff, ok := ResultEffect(label)
	n := len(panelX) - 1
	if !ok || n < 1 {
		return nil, nil, 0, fmt.Errorf("%q is not a floor element's result", label)
	}
	// The line over the element's own panels, zero outside them (it may start with a jump,
	// the stringer's end shear).
	line := func(pts [][2]float64) ([]float64, []float64) {
		var xs, es []float64
		for _, p := range pts {
			xs, es = append(xs, p[0]), append(es, p[1])
		}
		return xs, es
	}
	if rest, isFB := strings.CutPrefix(el, "FB"); isFB {
		j, _ := strconv.Atoi(rest)
		if j < 0 || j > n {
			return nil, nil, 0, fmt.Errorf("floor beam %s: the bridge has panel points 0 to %d", el, n)
		}
		var pts [][2]float64
		if j > 0 {
			pts = append(pts, [2]float64{panelX[j-1], 0})
		}
		pts = append(pts, [2]float64{panelX[j], 1})
		if j < n {
			pts = append(pts, [2]float64{panelX[j+1], 0})
		}
		x, eta = line(pts)
		return x, eta, 0, nil
	}
	_, panel, _ := strings.Cut(el, "-")
	j, _ := strconv.Atoi(panel)
	if j < 1 || j > n {
		return nil, nil, 0, fmt.Errorf("stringer %s: the bridge has panels 1 to %d", el, n)
	}
	a, b := panelX[j-1], panelX[j]
	p := b - a
	if eff == Shear {
		x, eta = line([][2]float64{{a, 0.5}, {b, 0}})
		return x, eta, 0, nil
	}
	xi := p / 2
	if tr != nil {
		pk, err := MaxMoment(tr, p)
		if err != nil {
			return nil, nil, 0, err
		}
		if pk.Value > 0 {
			xi = pk.SectionM
		}
	}
	x, eta = line([][2]float64{{a, 0}, {a + xi, 0.5 * xi * (p - xi) / p}, {b, 0}})
	return x, eta, xi, nil
}
