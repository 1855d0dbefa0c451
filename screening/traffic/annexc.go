package traffic

import "math"

// Real trains at speed (from memory: EN 1991-2 Annex C; check the edition in force). A real
// train running at v m/s over a span of first bending frequency n0 Hz and determinant length
// L m takes the factor 1 + phi' + phi''/2 on carefully maintained track, 1 + phi' + phi'' on
// track of standard maintenance, where
//
//	K = v / (2 L n0); phi' = K / (1 - K + K^4) for K < 0.76, else 1.325;
//	phi'' = alpha (0.56 e^(-(L/10)^2) + 0.50 (L n0 / 80 - 1) e^(-(L/20)^2)) >= 0,
//	alpha = v/22 for v <= 22 m/s, else 1.
//
// Phi2 and Phi3 belong with the load models (LM71, SW); a train at a known speed takes this
// factor instead.

// AnnexC is the factor of a real train at speed and its parts.
type AnnexC struct {
	SpeedMPerS, LengthM, FrequencyHz float64
	K, PhiP, PhiPP                   float64
	Factor                           float64 // 1 + phi' + phi''/2 (careful) or 1 + phi' + phi''
}

// RealTrainFactor gives the Annex C factor for a train at vMPerS over a determinant length
// lM with first bending frequency n0Hz; standardTrack selects the full phi”.
func RealTrainFactor(vMPerS, lM, n0Hz float64, standardTrack bool) AnnexC {
	a := AnnexC{SpeedMPerS: vMPerS, LengthM: lM, FrequencyHz: n0Hz}
	a.K = vMPerS / (2 * lM * n0Hz)
	a.PhiP = 1.325
	if a.K < 0.76 {
		a.PhiP = a.K / (1 - a.K + math.Pow(a.K, 4))
	}
	alpha := 1.0
	if vMPerS <= 22 {
		alpha = vMPerS / 22
	}
	a.PhiPP = max(0, alpha*(0.56*math.Exp(-math.Pow(lM/10, 2))+0.50*(lM*n0Hz/80-1)*math.Exp(-math.Pow(lM/20, 2))))
	a.Factor = 1 + a.PhiP + a.PhiPP/2
	if standardTrack {
		a.Factor = 1 + a.PhiP + a.PhiPP
	}
	return a
}

// FrequencyBounds are the bounds of a simple span's first bending frequency (Hz) for a span
// of spanM (from memory: EN 1991-2 6.4.4): upper 94.76 L^-0.748; lower 80/L for L <= 20 m,
// 23.58 L^-0.592 above. The recalled range is 4 to 100 m; a span outside it takes the bounds
// of the nearest end of the range.
func FrequencyBounds(spanM float64) (lower, upper float64) {
	l := min(max(spanM, 4), 100)
	upper = 94.76 * math.Pow(l, -0.748)
	lower = 80 / l
	if l > 20 {
		lower = 23.58 * math.Pow(l, -0.592)
	}
	return lower, upper
}

// RealTrainFactorUnmeasured gives the larger of the factors at the two frequency bounds of
// the span, for a span whose frequency is not measured.
func RealTrainFactorUnmeasured(vMPerS, lM, spanM float64, standardTrack bool) AnnexC {
	lo, hi := FrequencyBounds(spanM)
	a, b := RealTrainFactor(vMPerS, lM, lo, standardTrack), RealTrainFactor(vMPerS, lM, hi, standardTrack)
	if b.Factor > a.Factor {
		return b
	}
	return a
}
