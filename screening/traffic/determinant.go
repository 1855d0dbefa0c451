package traffic

// DeterminantLengthM is the determinant length of the main trusses for the dynamic
// allowance, from the lengths of the spans over which the truss is continuous (m).
//
// One span: the span. Continuous over n spans (from memory: EN 1991-2 Table 6.2, case 5.1;
// check against the edition in force): k times the mean span, k = 1.2 for two spans, 1.3
// for three, 1.4 for four, 1.5 for five or more, and never less than the longest span.
func DeterminantLengthM(spansM []float64) float64 {
	n := len(spansM)
	if n == 0 {
		return 0
	}
	sum, longest := 0.0, 0.0
	for _, l := range spansM {
		sum += l
		longest = max(longest, l)
	}
	if n == 1 {
		return spansM[0]
	}
	k := 1.5
	if n < 5 {
		k = []float64{0, 0, 1.2, 1.3, 1.4}[n]
	}
	return max(k*sum/float64(n), longest)
}

// LengthFor is the length the allowance's formula takes for a truss over the given spans:
// EN 1991-2's determinant length (DeterminantLengthM) for Phi2 and Phi3. AREMA's formula takes
// the length of the span loaded; for a continuous truss screening takes the shortest span,
// the conservative choice, since the allowance falls with length (a screening assumption;
// equal spans make it the span).
func (d Dynamic) LengthFor(spansM []float64) float64 {
	if d.Kind == AREMASteel && len(spansM) > 0 {
		shortest := spansM[0]
		for _, l := range spansM {
			shortest = min(shortest, l)
		}
		return shortest
	}
	return DeterminantLengthM(spansM)
}

// DynamicFor is the dynamic allowance d with its length set for a truss continuous over the
// given spans (LengthFor), unless d already names a length. A single span leaves d as it is
// (Factor takes the span).
func DynamicFor(d Dynamic, spansM []float64) Dynamic {
	if len(spansM) > 1 && d.LengthM == 0 {
		d.LengthM = d.LengthFor(spansM)
	}
	return d
}
