package floor

import "math"

// The moment of a simple span at a section that moves with the train, and the largest moment
// between two loads, are polynomials of degree at most 4 in the train's position while the
// same loads stand on the span (see stringer.go). Such a polynomial is found exactly, up to
// rounding, from its values at 5 points; its stationary points then come from the roots of its
// derivative, found to machine precision by bisection between the roots of the derivative's
// own derivative. Nothing is stepped.

// polyDeg is the degree of every candidate function within one piece.
const polyDeg = 4

// nodes are the Chebyshev points of the first kind on [0, 1]: well conditioned for the fit,
// and strictly inside the piece, where the polynomial holds (at a piece's end a load may sit
// exactly on a bearing, where it counts for the reaction but not for the moment).
var nodes = func() [polyDeg + 1]float64 {
	var u [polyDeg + 1]float64
	for k := range u {
		u[k] = (1 - math.Cos(math.Pi*float64(2*k+1)/(2*polyDeg+2))) / 2
	}
	return u
}()

// fit gives the monomial coefficients c[0] + c[1] u + ... of the polynomial of degree at most
// polyDeg through (nodes[k], v[k]) (Newton's divided differences, then expanded).
func fit(v [polyDeg + 1]float64) [polyDeg + 1]float64 {
	d := v
	for j := 1; j <= polyDeg; j++ {
		for k := polyDeg; k >= j; k-- {
			d[k] = (d[k] - d[k-1]) / (nodes[k] - nodes[k-j])
		}
	}
	// Horner in Newton form: p = d0 + (u - u0)(d1 + (u - u1)(d2 + ...)).
	var c [polyDeg + 1]float64
	c[0] = d[polyDeg]
	deg := 0
	for k := polyDeg - 1; k >= 0; k-- {
		// c := c·(u - nodes[k]) + d[k]
		for j := deg + 1; j >= 1; j-- {
			c[j] = c[j-1] - nodes[k]*c[j]
		}
		c[0] = -nodes[k]*c[0] + d[k]
		deg++
	}
	return c
}

// eval is the polynomial c at u.
func eval(c []float64, u float64) float64 {
	s := 0.0
	for k := len(c) - 1; k >= 0; k-- {
		s = s*u + c[k]
	}
	return s
}

// deriv is the derivative's coefficients.
func deriv(c []float64) []float64 {
	if len(c) <= 1 {
		return nil
	}
	d := make([]float64, len(c)-1)
	for k := 1; k < len(c); k++ {
		d[k-1] = float64(k) * c[k]
	}
	return d
}

// roots appends to dst the points of (0, 1) where the polynomial c changes sign. Between two
// consecutive roots of its derivative a polynomial is monotone, so each such interval holds
// at most one sign change, found by bisection to machine precision.
func roots(c []float64, dst []float64) []float64 {
	for len(c) > 0 && c[len(c)-1] == 0 {
		c = c[:len(c)-1]
	}
	if len(c) <= 1 {
		return dst
	}
	if len(c) == 2 {
		if u := -c[0] / c[1]; u > 0 && u < 1 {
			dst = append(dst, u)
		}
		return dst
	}
	var buf [polyDeg + 2]float64
	cuts := append(buf[:0], 0)
	cuts = roots(deriv(c), cuts)
	cuts = append(cuts, 1)
	for k := 0; k+1 < len(cuts); k++ {
		a, b := cuts[k], cuts[k+1]
		fa, fb := eval(c, a), eval(c, b)
		if fa == 0 && a > 0 {
			dst = append(dst, a)
			continue
		}
		if fa*fb >= 0 {
			continue
		}
		for range 200 {
			m := (a + b) / 2
			if m <= a || m >= b {
				break
			}
			if fm := eval(c, m); fm*fa > 0 {
				a, fa = m, fm
			} else {
				b = m
			}
		}
		dst = append(dst, (a+b)/2)
	}
	return dst
}
