package envelope

import (
	"math"
	"slices"
	"sort"
)

// A rake of 1 to n identical vehicles (the network view's reference wagons) is swept by
// windows instead of count by count. Why it may be. Think of an endless train of the
// vehicle, fronts at u_i = phi + i L. A rake of k vehicles anywhere on the bridge is k
// consecutive vehicles of that train at some phase phi, and any k consecutive vehicles that
// the lines can feel form a rake, as long as n is at least the number of vehicles that can
// touch the lines at once. So the extreme over all rakes and positions is, over phi, the
// largest sum of consecutive vehicles' forces (Kadane's maximum subarray). Each vehicle's force
// is linear in phi between the phases where one of its axles stands over a vertex; so is every
// sum, and the extremes lie at those phases: the axles' offsets plus the vertices, modulo L.
// That is one pass over (axles x vertices) phases with the vehicles the bridge holds, instead
// of a sweep per count, whose work grows with the square of the count (a rake over a
// continuous truss, whose lines kink at every panel point, costs the most).

// rakeWindows reports whether windows can sweep ld over l: one group of identical vehicles of
// 1 to n, axles only, with n at least the vehicles whose axles can stand on the lines at once.
func (ld *Load) rakeWindows(l *Lines) bool {
	if ld.uniform != nil || len(ld.fixed) > 0 || len(ld.unit) == 0 || ld.r0 != 0 || ld.nMin != 1 ||
		len(ld.train.Parts) > 0 || !(ld.unitLen > 0) {
		return false
	}
	for _, it := range ld.unit {
		if it.kind != axle {
			return false
		}
	}
	// The windows count an axle within rounding of a bearing (onBearing) as on it, so as
	// many vehicles as that allows must be a rake.
	aMin, aMax := ld.unitSpread()
	touch := math.Floor((l.SpanM()+aMax-aMin+2*ld.onBearing(l.x0, l.xl))/ld.unitLen) + 1
	return float64(ld.nMax) >= touch
}

// onBearing is how near a bearing (at x0 or xl) the windows take an axle to stand on it: the
// rounding of an axle's position found from a phase (a vertex plus an offset, modulo the
// vehicle's length, then back), some 50 units in the last place of the lengths involved.
func (ld *Load) onBearing(x0, xl float64) float64 {
	_, aMax := ld.unitSpread()
	return 1e-14 * (1 + max(math.Abs(x0), math.Abs(xl)) + ld.unitLen + math.Abs(aMax))
}

// unitSpread is the least and largest offset of the vehicle's axles behind its front.
func (ld *Load) unitSpread() (aMin, aMax float64) {
	aMin, aMax = math.Inf(1), math.Inf(-1)
	for _, it := range ld.unit {
		aMin, aMax = min(aMin, it.d), max(aMax, it.d)
	}
	return aMin, aMax
}

// symmetricUnit reports whether the vehicle is its own mirror image: its axles matched one
// to one with axles of equal load as far from the other end (to within rounding, 1e-12 of
// its length). Then a rake running right to left loads the bridge as one running left to
// right does, and one direction holds both.
func (ld *Load) symmetricUnit() bool {
	L := ld.unitLen
	used := make([]bool, len(ld.unit))
	for _, a := range ld.unit {
		found := false
		for k, b := range ld.unit {
			if !used[k] && math.Abs(L-a.d-b.d) <= 1e-12*L && a.w == b.w {
				used[k], found = true, true
				break
			}
		}
		if !found {
			return false
		}
	}
	return true
}

// windowBest is a member's best window so far in one sense: its value, the phase and side
// (as found.side) it was taken at, the room to the next phase on that side, and the window's
// first and last vehicle (the last is the rake's front).
type windowBest struct {
	v, phi, room float64
	side         int8
	j0, j1       int
	dir          int
}

// windows gives the extremes of rake ld over l (rakeWindows must hold).
func (c *Calculator) windows(l *Lines, ld *Load, out []Extremes) []Extremes {
	m := l.m
	c.wMax = slices.Grow(c.wMax[:0], m)[:m]
	c.wMin = slices.Grow(c.wMin[:0], m)[:m]
	clear(c.wMax)
	clear(c.wMin)
	dirs := 2
	if ld.symmetricUnit() {
		dirs = 1
	}
	for d := range dirs {
		c.windowsOver(l.plainGrid(d), d, ld)
	}
	out = slices.Grow(out[:0], m)[:m]
	for i := range m {
		out[i] = Extremes{Max: c.windowExtreme(l, ld, c.wMax[i]), Min: c.windowExtreme(l, ld, c.wMin[i])}
	}
	return out
}

// windowsOver finds on grid gr (direction d) each member's best windows at every phase.
func (c *Calculator) windowsOver(gr *grid, d int, ld *Load) {
	m := c.m
	x := gr.x
	nx := len(x)
	x0, xl := x[0], x[nx-1]
	L := ld.unitLen
	aMin, aMax := ld.unitSpread()
	phase := func(xv, a float64) float64 {
		p := math.Mod(xv+a, L)
		if p < 0 {
			p += L
		}
		if p >= L {
			p = 0
		}
		return p
	}
	phases := c.wPhases[:0]
	var atBearing []float64 // the phases that put an axle on a bearing
	for j, xv := range x {
		for _, it := range ld.unit {
			p := phase(xv, it.d)
			phases = append(phases, p)
			if j == 0 || j == nx-1 {
				atBearing = append(atBearing, p)
			}
		}
	}
	slices.Sort(phases)
	phases = slices.Compact(phases)
	c.wPhases = phases
	point, limits := []int8{0}, []int8{-1, 0, 1}
	// Positions within rounding of a bearing stand on it: a phase found from a bearing puts
	// an axle there only to within rounding.
	tiny := ld.onBearing(x0, xl)
	for b, phi := range phases {
		before, after := phi-phases[(b+len(phases)-1)%len(phases)], phases[(b+1)%len(phases)]-phi
		if before <= 0 {
			before += L
		}
		if after <= 0 {
			after += L
		}
		iLo := int(math.Ceil((x0+aMin-phi)/L)) - 1
		iHi := int(math.Floor((xl+aMax-phi)/L)) + 1
		nv := iHi - iLo + 1
		sides := point
		if gr.endJumps && slices.Contains(atBearing, phi) {
			sides = limits
		}
		for _, side := range sides {
			vals := c.wVals[:0]
			vals = slices.Grow(vals, nv*m)[:nv*m]
			clear(vals)
			c.wVals = vals
			for k := range nv {
				u := phi + float64(iLo+k)*L
				row := vals[k*m : k*m+m]
				for _, it := range ld.unit {
					addEta(row, gr, u-it.d, side, tiny, it.w)
				}
			}
			room := roomOn(side, before, after)
			for i := range m {
				c.kadane(i, vals, nv, m, iLo, phi, side, room, d)
			}
		}
	}
}

// addEta adds w times every member's ordinate at xq to row, an axle at xq standing on the
// bridge in the limit from the given side (-1: just before the phase, the train further
// back; +1: just after) where it is at a bearing.
func addEta(row []float64, gr *grid, xq float64, side int8, tiny, w float64) {
	x := gr.x
	nx := len(x)
	m := len(row)
	switch {
	case math.Abs(xq-x[0]) <= tiny:
		if side >= 0 {
			addScaled(row, gr.eta[:m], w)
		}
		return
	case math.Abs(xq-x[nx-1]) <= tiny:
		if side <= 0 {
			addScaled(row, gr.eta[(nx-1)*m:nx*m], w)
		}
		return
	case xq < x[0] || xq > x[nx-1]:
		return
	}
	j := sort.SearchFloat64s(x, xq) // x[j-1] < xq <= x[j]
	if x[j] == xq {
		addScaled(row, gr.eta[j*m:j*m+m], w)
		return
	}
	t := (xq - x[j-1]) / (x[j] - x[j-1])
	a, b := gr.eta[(j-1)*m:j*m], gr.eta[j*m:j*m+m]
	for i := range row {
		row[i] += w * (a[i] + t*(b[i]-a[i]))
	}
}

// kadane finds member i's largest and smallest sums of consecutive vehicles (vals[k*m+i],
// vehicle iLo+k) at this phase and keeps them where they beat the best so far. Windows start
// after a non-positive sum and end at a strict improvement, so they hold no idle vehicle at
// either end.
func (c *Calculator) kadane(i int, vals []float64, nv, m, iLo int, phi float64, side int8, room float64, d int) {
	for sense := 1.0; sense >= -1; sense -= 2 {
		best := &c.wMax[i]
		if sense < 0 {
			best = &c.wMin[i]
		}
		cur, start := 0.0, 0
		for k := range nv {
			v := sense * vals[k*m+i]
			if cur <= 0 {
				cur, start = v, k
			} else {
				cur += v
			}
			if cur > sense*best.v {
				*best = windowBest{v: sense * cur, phi: phi, room: room, side: side, j0: iLo + start, j1: iLo + k, dir: d}
			}
		}
	}
}

// windowExtreme turns a best window into a result with its placement in the truss's own
// coordinates: a rake of j1 - j0 + 1 vehicles, its front at the front of vehicle j1.
func (c *Calculator) windowExtreme(l *Lines, ld *Load, b windowBest) Extreme {
	if math.Abs(b.v) < 1e-9 {
		return Extreme{}
	}
	h := b.phi + float64(b.j1)*ld.unitLen + offJump(b.side, b.room, l.SpanM())
	k := b.j1 - b.j0 + 1
	p := Placement{Loaded: true, Direction: Direction(b.dir), HeadM: h, Count: k, LengthM: ld.lengthM(k)}
	p.LoadedFromM, p.LoadedToM = max(h-p.LengthM, l.x0), min(h, l.xl)
	l.inTruss(&p, b.dir)
	return Extreme{Value: b.v, Placement: p}
}
