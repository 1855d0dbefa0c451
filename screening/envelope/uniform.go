package envelope

import (
	"math"
	"slices"
)

// uniform places a uniform load of variable length over each member's best feasible
// interval [a, b]: b - a <= max, and b - a >= min unless the interval touches a bearing.
//
// The force q(E(b) - E(a)), E the integral of the line, is separable and piecewise quadratic.
// At the best interval each end is either at a stationary point of E (a zero crossing, a
// vertex of the refined grid), at a vertex, at a bearing, or on a length bound b - a = L, on
// which the force is a quadratic in a between the positions where a or a + L passes a
// vertex. So the candidates are all pairs of refined vertices, the intervals of length max
// from each bearing, and the best interval of each bounding length, found piece by piece.
func (c *Calculator) uniform(l *Lines, ld *Load, out []Extremes) []Extremes {
	u := ld.uniform
	gr := l.refinedGrid(0)
	m, nx := c.m, len(gr.x)
	x0, xl := l.x0, l.xl
	span := xl - x0
	tol := 1e-9 * max(1, span)
	out = slices.Grow(out[:0], m)[:m]
	for i := range m {
		best := [2]uniformBest{}
		e := func(j int) float64 { return gr.area[j*m+i] }
		offer := func(a, b, v float64) {
			for s, sign := range [2]float64{1, -1} {
				if sign*v > sign*best[s].v {
					best[s] = uniformBest{v: v, a: a, b: b, ok: true}
				}
			}
		}
		feasible := func(a, b float64) bool {
			n := b - a
			return n <= u.MaxM+tol && (n >= u.MinM-tol || a <= x0+tol || b >= xl-tol)
		}
		for ja := range nx {
			for jb := ja + 1; jb < nx; jb++ {
				if feasible(gr.x[ja], gr.x[jb]) {
					offer(gr.x[ja], gr.x[jb], e(jb)-e(ja))
				}
			}
		}
		if u.MaxM < span {
			offer(x0, x0+u.MaxM, areaTo(gr, i, m, x0+u.MaxM))
			offer(xl-u.MaxM, xl, e(nx-1)-areaTo(gr, i, m, xl-u.MaxM))
		}
		for _, L := range [2]float64{u.MinM, u.MaxM} {
			if L > 0 && L < span {
				c.band(gr, i, L, offer)
			}
		}
		out[i] = Extremes{Max: best[0].extreme(u.QKNPerM, u.MinM, u.MaxM, x0, xl, tol), Min: best[1].extreme(u.QKNPerM, u.MinM, u.MaxM, x0, xl, tol)}
	}
	return out
}

type uniformBest struct {
	v, a, b float64
	ok      bool
}

func (ub uniformBest) extreme(q, minM, maxM, x0, xl, tol float64) Extreme {
	if !ub.ok || math.Abs(q*ub.v) < 1e-9 {
		return Extreme{}
	}
	// An end within the tolerance of a bearing is at the bearing: an interval of bounding
	// length laid from the far end (a = xl - L, b = a + L) may miss it by a rounding.
	if ub.a <= x0+tol {
		ub.a = x0
	}
	if ub.b >= xl-tol {
		ub.b = xl
	}
	p := Placement{Loaded: true, LoadedFromM: ub.a, LoadedToM: ub.b, HeadM: ub.b}
	p.LengthM = min(max(minM, ub.b-ub.a), maxM)
	if ub.b >= xl-tol && ub.a > x0+tol {
		// A train leaving to the right is one entering from the right, front at a.
		p.Direction, p.HeadM = RightToLeft, ub.a
	}
	return Extreme{Value: q * ub.v, Placement: p}
}

// band offers the best intervals of length L along member i's line: h(a) = E(a+L) - E(a) is
// quadratic between the positions where a or a + L passes a vertex, with h'(a) =
// eta(a+L) - eta(a) linear there.
func (c *Calculator) band(gr *grid, i int, L float64, offer func(a, b, v float64)) {
	m := c.m
	x0, xl := gr.x[0], gr.x[len(gr.x)-1]
	brk := make([]float64, 0, 2*len(gr.x))
	for _, x := range gr.x {
		if x <= xl-L {
			brk = append(brk, x)
		}
		if x-L >= x0 {
			brk = append(brk, x-L)
		}
	}
	brk = append(brk, xl-L)
	slices.Sort(brk)
	brk = slices.Compact(brk)
	h := func(a float64) float64 { return areaTo(gr, i, m, a+L) - areaTo(gr, i, m, a) }
	dh := func(a float64) float64 { return etaAt(gr, i, m, a+L) - etaAt(gr, i, m, a) }
	for k, a := range brk {
		offer(a, a+L, h(a))
		if k+1 == len(brk) {
			break
		}
		b := brk[k+1]
		da, db := dh(a), dh(b)
		if da*db < 0 {
			t := a + (b-a)*da/(da-db)
			offer(t, t+L, h(t))
		}
	}
}

// etaAt is member i's ordinate at p inside the span (refined grid).
func etaAt(gr *grid, i, m int, p float64) float64 {
	k := segment(gr.x, p)
	x0, x1 := gr.x[k], gr.x[k+1]
	return gr.eta[k*m+i] + (gr.eta[(k+1)*m+i]-gr.eta[k*m+i])*(p-x0)/(x1-x0)
}

// areaTo is the integral of member i's line from the left bearing to p inside the span.
func areaTo(gr *grid, i, m int, p float64) float64 {
	k := segment(gr.x, p)
	t := p - gr.x[k]
	e0, e1 := gr.eta[k*m+i], gr.eta[(k+1)*m+i]
	slope := (e1 - e0) / (gr.x[k+1] - gr.x[k])
	return gr.area[k*m+i] + e0*t + slope*t*t/2
}

// segment is the index k of the segment [x[k], x[k+1]] holding p, clamped to the span.
func segment(x []float64, p float64) int {
	k, _ := slices.BinarySearch(x, p)
	return min(max(k-1, 0), len(x)-2)
}
