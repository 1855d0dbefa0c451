package envelope

import (
	"math"
	"slices"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// This file is the brute-force reference the exact sweep is tested against: it evaluates a
// train at one placement directly from the definition (sum of P eta(x) over the axles on the
// bridge, integrals of q eta over the parts), with no events, tables or sweeps, and searches
// placements for the extremes by stepping finely and trying every critical position
// (bruteTrain, bruteUniform).

// etaRef is the influence line at p: linear between the points, zero outside, and taking the
// end ordinates at the bearings themselves.
func etaRef(x, eta []float64, p float64) float64 {
	n := len(x)
	if p < x[0] || p > x[n-1] {
		return 0
	}
	for k := 0; k+1 < n; k++ {
		if p <= x[k+1] {
			return eta[k] + (eta[k+1]-eta[k])*(p-x[k])/(x[k+1]-x[k])
		}
	}
	return eta[n-1]
}

// integralRef integrates f(eta) over [a, b], exactly for f = identity or a clip at zero: it
// splits every segment at its zero crossing and uses the trapezoid on each straight piece.
func integralRef(x, eta []float64, a, b float64, f func(float64) float64) float64 {
	a, b = max(a, x[0]), min(b, x[len(x)-1])
	if !(a < b) {
		return 0
	}
	pts := []float64{a, b}
	for k := range x {
		if x[k] > a && x[k] < b {
			pts = append(pts, x[k])
		}
		if k+1 < len(x) {
			if xc, ok := crossing(x, eta, k); ok && xc > a && xc < b {
				pts = append(pts, xc)
			}
		}
	}
	slices.Sort(pts)
	s := 0.0
	for k := 0; k+1 < len(pts); k++ {
		p, q := pts[k], pts[k+1]
		// inner points avoid the jumps at the bearings
		ep, eq := etaInside(x, eta, p), etaInside(x, eta, q)
		s += (f(ep) + f(eq)) / 2 * (q - p)
	}
	return s
}

// crossing is where the line crosses zero inside segment k (between x[k] and x[k+1]), if it
// does.
func crossing(x, eta []float64, k int) (float64, bool) {
	if !(eta[k]*eta[k+1] < 0) {
		return 0, false
	}
	return x[k] + (x[k+1]-x[k])*eta[k]/(eta[k]-eta[k+1]), true
}

// zeroCrossings are the line's zero crossings inside its segments, from left to right.
func zeroCrossings(x, eta []float64) []float64 {
	var out []float64
	for k := 0; k+1 < len(x); k++ {
		if xc, ok := crossing(x, eta, k); ok {
			out = append(out, xc)
		}
	}
	return out
}

func etaInside(x, eta []float64, p float64) float64 {
	return etaRef(x, eta, min(max(p, x[0]), x[len(x)-1]))
}

func identity(v float64) float64 { return v }

// placedRef is one placement: direction, position of the front, vehicles in the last group,
// length of a part cut at the unfavourable length.
type placedRef struct {
	dir      Direction
	head     float64
	count    int
	trailing float64
}

// placedAt is a reported placement as the reference takes it.
func placedAt(p Placement) placedRef {
	return placedRef{p.Direction, p.HeadM, p.Count, p.TrailingM}
}

// responseRef is the member force at a placement for the given sense (+1 tension, -1
// compression; it decides only where parts applied where unfavourable act).
func responseRef(x, eta []float64, t *traffic.Train, p placedRef, sense float64) float64 {
	// pos maps a distance d behind the front to a bridge coordinate.
	pos := func(d float64) float64 {
		if p.dir == RightToLeft {
			return p.head + d
		}
		return p.head - d
	}
	span := func(d1, d2 float64) (float64, float64) {
		a, b := pos(d1), pos(d2)
		return min(a, b), max(a, b)
	}
	v := 0.0
	if len(t.Consist) > 0 {
		for _, a := range t.Axles(p.count) {
			v += a.LoadKN * etaRef(x, eta, pos(a.AtM))
		}
	}
	for _, part := range t.Parts {
		d1, d2 := part.FromM, part.ToM
		switch part.Mode {
		case traffic.CutUnfavourable:
			d2 = d1 + p.trailing
		}
		// Only the distances behind the front that can stand on the bridge matter (a metre's
		// margin): infinite extents are cut there, and a part wholly off the bridge adds none.
		dLo, dHi := p.head-x[len(x)-1], p.head-x[0]
		if p.dir == RightToLeft {
			dLo, dHi = x[0]-p.head, x[len(x)-1]-p.head
		}
		d1, d2 = max(d1, dLo-1), min(d2, dHi+1)
		if d1 >= d2 {
			continue
		}
		a, b := span(d1, d2)
		f := identity
		if part.Mode == traffic.WhereUnfavourable {
			f = func(e float64) float64 {
				if e*sense > 0 {
					return e
				}
				return 0
			}
		}
		v += part.QKNPerM * integralRef(x, eta, a, b, f)
	}
	return v
}

// bruteTrain is the reference extreme: every direction and count, the front stepped finely
// over the whole crossing and also put (and put just beside) wherever an item stands over a
// vertex, with a cut part tried at every length that ends on a vertex or zero crossing and at
// stepped lengths.
func bruteTrain(x, eta []float64, tr *traffic.Train, sense float64) float64 {
	x0, xl := x[0], x[len(x)-1]
	best := 0.0
	lo, hi := 1, 1
	if n := len(tr.Consist); n > 0 {
		lo, hi = tr.Consist[n-1].Min, tr.Consist[n-1].Max
	}
	verts := append(slices.Clone(x), zeroCrossings(x, eta)...)
	for count := lo; count <= hi; count++ {
		var ds []float64
		reach := 0.0
		if len(tr.Consist) > 0 {
			for _, a := range tr.Axles(count) {
				ds = append(ds, a.AtM)
			}
			reach = tr.LengthM(count)
		}
		var cut *traffic.Part
		for i, p := range tr.Parts {
			for _, d := range []float64{p.FromM, p.ToM} {
				if !math.IsInf(d, 0) {
					ds = append(ds, d)
					reach = max(reach, d)
				}
			}
			if p.Mode == traffic.CutUnfavourable {
				cut = &tr.Parts[i]
			}
		}
		for _, dir := range []Direction{LeftToRight, RightToLeft} {
			var heads []float64
			for _, d := range ds {
				for _, v := range x {
					h := v + d
					if dir == RightToLeft {
						h = v - d
					}
					heads = append(heads, h, h-1e-7, h+1e-7)
				}
			}
			start, end := x0-2, xl+reach+2
			if dir == RightToLeft {
				start, end = x0-reach-2, xl+2
			}
			for k := 0; k <= 300; k++ {
				heads = append(heads, start+(end-start)*float64(k)/300)
			}
			for _, h := range heads {
				trails := []float64{0}
				if cut != nil {
					z := h - cut.FromM
					if dir == RightToLeft {
						z = h + cut.FromM
					}
					for _, y := range verts {
						trails = append(trails, math.Abs(z-y))
					}
					for k := 1; k <= 20; k++ {
						trails = append(trails, (xl-x0+math.Abs(z))*float64(k)/20)
					}
				}
				for _, tl := range trails {
					v := sense * responseRef(x, eta, tr, placedRef{dir, h, count, tl}, sense)
					best = max(best, v)
				}
			}
		}
	}
	return sense * best
}

// bruteUniform is the reference for a uniform load of variable length: every feasible
// interval with ends on a fine grid, on the vertices or on the zero crossings.
func bruteUniform(x, eta []float64, u traffic.Uniform, sense float64) float64 {
	x0, xl := x[0], x[len(x)-1]
	pts := slices.Clone(x)
	for k := 0; k <= 120; k++ {
		pts = append(pts, x0+(xl-x0)*float64(k)/120)
	}
	pts = append(pts, zeroCrossings(x, eta)...)
	// intervals of exactly the bounding lengths from every point
	n := len(pts)
	for _, L := range []float64{u.MinM, u.MaxM} {
		for _, p := range pts[:n] {
			if !math.IsInf(L, 0) {
				pts = append(pts, p+L, p-L)
			}
		}
	}
	best := 0.0
	for _, a := range pts {
		for _, b := range pts {
			a, b := max(a, x0), min(b, xl)
			l := b - a
			if l <= 0 || l > u.MaxM+1e-9 || (l < u.MinM-1e-9 && a > x0 && b < xl) {
				continue
			}
			best = max(best, sense*u.QKNPerM*integralRef(x, eta, a, b, identity))
		}
	}
	return sense * best
}

// placementGives reports whether placement p reproduces value within tol, by responseRef: at
// p itself or, failing that, at the precision a placement is given to. That is, with the head
// moved 2e-9 of the span either way: a limit at a jump of the line stands 1e-9 of the span off
// it, and a position where axles arrive and leave at once is turned into the truss's
// coordinates with rounding, which can leave an axle a rounding's width off the bearing it
// stands on. Or with the bearings moved out by rounding (1e-12 of the lengths involved): the
// sweep takes positions equal in floating point as one, so where the span is a multiple of an
// axle spacing to within rounding, an axle arriving and one leaving stand on the bridge
// together (the larger force, on the safe side).
func placementGives(x, eta []float64, t *traffic.Train, p Placement, sense, value, tol float64) (float64, bool) {
	got := responseRef(x, eta, t, placedAt(p), sense)
	if math.Abs(got-value) <= tol {
		return got, true
	}
	span := x[len(x)-1] - x[0]
	d := 2e-9 * max(1, span)
	for _, h := range []float64{p.HeadM - d, p.HeadM + d} {
		q := placedAt(p)
		q.head = h
		if math.Abs(responseRef(x, eta, t, q, sense)-value) <= tol {
			return got, true
		}
	}
	// A limit at a jump is the value approached as the head nears the jump from the side the
	// placement stands on, up to 1e-9 of the span away: where the force is steep, the value
	// at the placement differs from it by the slope times that. Heads nearer the jump, in
	// steps of 1e-10 of the span, approach the limit.
	for k := -9; k <= 9; k++ {
		q := placedAt(p)
		q.head = p.HeadM + float64(k)*1e-10*max(1, span)
		if k != 0 && math.Abs(responseRef(x, eta, t, q, sense)-value) <= tol {
			return got, true
		}
	}
	r := 1e-12 * max(1, span, math.Abs(x[0]), math.Abs(x[len(x)-1]), math.Abs(p.HeadM))
	wide := slices.Clone(x)
	wide[0] -= r
	wide[len(wide)-1] += r
	if math.Abs(responseRef(wide, eta, t, placedAt(p), sense)-value) <= tol {
		return got, true
	}
	return got, false
}
