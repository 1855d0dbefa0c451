package fatigue

import "math"

// A member whose influence line is c times another's (c may be negative), read the same way or
// mirrored, has c times that member's force history in every passage: the same turning points
// times c, so (rainflow takes ranges, which a change of sign leaves alone) the same cycles with
// every range |c| times. In a truss with parallel chords many lines are such multiples: a
// chord's and the chord opposite's (both the moment at one panel point over the depth), a
// diagonal's and the vertical's carrying the same panel's shear. Counting the cycles once for
// all of them is exact to rounding: each range is |c| times one counted over the other line
// rather than counted over its own, which differ in the last bits (and, where two ranges of a
// history are equal but for rounding, rainflow may pair the points of such a tie the other way,
// which moves a range by that rounding).

// CountedAs gives a line for l that counts its passages over o's (or, for a mirror image, over
// o's run the other way), each range |c| times, when l read left to right is c times o read
// left to right or right to left: the same kinks to within 1e-9 of the span, and every jump,
// slope, ordinate and area c times o's to within 1e-9 of l's largest ordinate (slopes per
// metre and areas times the span). ok is false when no such c (other than 0) exists. The line
// given keeps l's own kinks for History: only the counting is shared.
func (l *Line) CountedAs(o *Line) (counted *Line, ok bool) {
	if o.base != nil || !(l.maxAbs > 0) || !(o.maxAbs > 0) {
		return nil, false
	}
	for _, mirror := range []bool{false, true} {
		b := o.dir[0]
		if mirror {
			b = o.dir[1]
		}
		if c, ok := proportional(l.dir[0], b, l.maxAbs, o.maxAbs, max(l.xl-l.x0, 1)); ok {
			base := o
			if mirror {
				base = o.Mirror()
			}
			m := *l
			m.base, m.factor = base, c
			return &m, true
		}
	}
	return nil, false
}

// proportional finds c with a = c b (kinks at the same positions, to within 1e-9 of the span;
// values to within 1e-9 of scaleA, slopes per metre and areas times the span): c by least
// squares over the ordinates and jumps (each line's divided by its largest ordinate, scaleA
// and scaleB, so that no square underflows), then every value checked against it.
func proportional(a, b *kinks, scaleA, scaleB, span float64) (float64, bool) {
	if len(a.x) != len(b.x) {
		return 0, false
	}
	xtol, tol := 1e-9*span, 1e-9*scaleA
	ab, bb := 0.0, 0.0
	for j := range a.x {
		if math.Abs(a.x[j]-b.x[j]) > xtol {
			return 0, false
		}
		ae, aj, be, bj := a.eta0[j]/scaleA, a.jump[j]/scaleA, b.eta0[j]/scaleB, b.jump[j]/scaleB
		ab += ae*be + aj*bj
		bb += be*be + bj*bj
	}
	if !(bb > 0) || ab == 0 {
		return 0, false
	}
	c := ab / bb * (scaleA / scaleB)
	for j := range a.x {
		if math.Abs(a.eta0[j]-c*b.eta0[j]) > tol || math.Abs(a.jump[j]-c*b.jump[j]) > tol ||
			math.Abs(a.slope[j]-c*b.slope[j]) > tol || math.Abs(a.area[j]-c*b.area[j]) > tol*span {
			return 0, false
		}
	}
	return c, true
}

// counted is the line whose passages l counts and the factor on their ranges: l itself and 1
// unless CountedAs made it.
func (l *Line) counted() (*Line, float64) {
	if l.base == nil {
		return l, 1
	}
	return l.base, math.Abs(l.factor)
}
