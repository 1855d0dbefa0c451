package report

import "math"

// yearlySpectrum is each scenario's stress ranges a year (index 0 existing, 1 proposed), in
// bins of binMPa from 0 (the last bin takes the largest range): for every passage of every
// train of the scenario, in each direction, its rainflow cycles' counts times its passages a
// year, summed by range. This is what the two scenarios' traffic does to the member in a
// year, every train together, rather than one passage of the train doing most damage (which
// may be a different train in each scenario). Both scenarios take the same bins.
func yearlySpectrum(passages []keptPassage, binMPa float64) [2][]float64 {
	maxR := 0.0
	for _, p := range passages {
		for _, cy := range p.Cycles {
			maxR = max(maxR, cy.Range*p.MPaPerKN)
		}
	}
	nb := max(int(math.Ceil(maxR/binMPa)), 1)
	counts := [2][]float64{make([]float64, nb), make([]float64, nb)}
	for _, p := range passages {
		k := 0
		if p.proposed {
			k = 1
		}
		for _, cy := range p.Cycles {
			i := min(int(cy.Range*p.MPaPerKN/binMPa), nb-1)
			counts[k][i] += cy.Count * p.PerYear
		}
	}
	return counts
}
