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

// DynamicFor is the dynamic allowance d with its determinant length set for a truss
// continuous over the given spans, unless d already names a length. A single span leaves d
// as it is (Factor takes the span).
func DynamicFor(d Dynamic, spansM []float64) Dynamic {
	if len(spansM) > 1 && d.LengthM == 0 {
		d.LengthM = DeterminantLengthM(spansM)
	}
	return d
}
