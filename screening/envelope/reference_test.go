package envelope

import (
	"math"
	"slices"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// This file is the brute-force reference the exact sweep is tested against: it evaluates a
// train at one placement directly from the definition (sum of P eta(x) over the axles on the
// bridge, integrals of q eta over the parts), with no events, tables or sweeps.

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
		if k+1 < len(x) && eta[k]*eta[k+1] < 0 {
			xc := x[k] + (x[k+1]-x[k])*eta[k]/(eta[k]-eta[k+1])
			if xc > a && xc < b {
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
		// infinite extents reach past the bridge; a bridge-length margin is enough
		big := 10 * (x[len(x)-1] - x[0] + 1)
		d1 = max(d1, -big-math.Abs(p.head))
		d2 = min(d2, big+math.Abs(p.head))
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
