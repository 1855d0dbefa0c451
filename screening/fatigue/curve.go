package fatigue

import (
	"fmt"
	"math"
)

// The knees of the EN 1993-1-9 S-N curves for direct stress ranges (from memory; check against
// the edition in force): the detail category is the range at 2e6 cycles, slope 3 down to the
// constant-amplitude limit at 5e6 cycles, slope 5 down to the cut-off at 1e8 cycles, and ranges
// below the cut-off do no damage.
const (
	CategoryCycles = 2e6
	LimitCycles    = 5e6
	CutOffCycles   = 1e8
)

// Curve is an S-N curve of EN 1993-1-9's shape for one detail category.
type Curve struct {
	// CategoryMPa is the detail category: the stress range (MPa) that the detail withstands
	// 2e6 times.
	CategoryMPa float64
	// GammaMf is the partial factor on fatigue strength (EN 1993-1-9 Table 3.1, from memory:
	// 1.00 to 1.35 by assessment method and consequence of failure); 0 means 1. Each range
	// is multiplied by it before the curve is read, which is the same as dividing the
	// curve's strengths by it.
	GammaMf float64
}

// NewCurve checks a category and a partial factor.
func NewCurve(categoryMPa, gammaMf float64) (Curve, error) {
	if !(categoryMPa > 0) || math.IsInf(categoryMPa, 0) {
		return Curve{}, fmt.Errorf("detail category must be a positive stress range in MPa, got %v", categoryMPa)
	}
	if !(gammaMf >= 1) || gammaMf > 2 {
		return Curve{}, fmt.Errorf("gamma_Mf must be from 1 to 2, got %v", gammaMf)
	}
	return Curve{CategoryMPa: categoryMPa, GammaMf: gammaMf}, nil
}

func (c Curve) gamma() float64 {
	if c.GammaMf == 0 {
		return 1
	}
	return c.GammaMf
}

// LimitMPa is the constant-amplitude fatigue limit: the range at 5e6 cycles on the slope-3
// line, (2/5)^(1/3) = 0.737 times the category (before GammaMf).
func (c Curve) LimitMPa() float64 { return c.CategoryMPa * limitPerCategory }

// CutOffMPa is the cut-off limit: the range at 1e8 cycles on the slope-5 line, (5/100)^(1/5)
// = 0.549 times the constant-amplitude limit (before GammaMf).
func (c Curve) CutOffMPa() float64 {
	return c.LimitMPa() * cutOffPerLimit
}

// The knees' ratios, computed once (Damage reads them for every passage).
var (
	limitPerCategory = math.Cbrt(CategoryCycles / LimitCycles)
	cutOffPerLimit   = math.Pow(LimitCycles/CutOffCycles, 1.0/5)
)

// Cycles is the number of cycles of the stress range rangeMPa (times GammaMf) to failure:
// 2e6 (dC/dS)^3 down to the constant-amplitude limit, 5e6 (dD/dS)^5 down to the cut-off, +Inf
// below it.
func (c Curve) Cycles(rangeMPa float64) float64 {
	s := rangeMPa * c.gamma()
	switch {
	case s >= c.LimitMPa():
		r := c.CategoryMPa / s
		return CategoryCycles * r * r * r
	case s >= c.CutOffMPa():
		r := c.LimitMPa() / s
		return LimitCycles * r * r * r * r * r
	}
	return math.Inf(1)
}

// Damage is the Palmgren-Miner sum of the cycles, their ranges multiplied by scale (from kN to
// MPa and by the dynamic factor): the sum of count / Cycles(range).
func (c Curve) Damage(cycles []Cycle, scale float64) float64 {
	d := 0.0
	g := c.gamma() * scale
	dD, dL := c.LimitMPa(), c.CutOffMPa()
	for _, cy := range cycles {
		s := cy.Range * g
		switch {
		case s >= dD:
			r := s / c.CategoryMPa
			d += cy.Count * r * r * r / CategoryCycles
		case s >= dL:
			r := s / dD
			d += cy.Count * r * r * r * r * r / LimitCycles
		}
	}
	return d
}
