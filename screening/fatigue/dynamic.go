package fatigue

import (
	"fmt"
	"math"
)

// DynamicFactor is the fatigue dynamic factor of a real train at a known speed, EN 1991-2
// Annex C (from memory; check against the edition in force): 1 + (phi' + phi”/2)/2, the
// mean dynamic increment that fatigue takes rather than the extreme one, with
//
//	K = v / (2 Lphi n0),  phi' = K / (1 - K + K^4) for K < 0.76, else 1.325,
//	phi'' = alpha (0.56 e^-(Lphi/10)^2 + 0.50 (Lphi n0 / 80 - 1) e^-(Lphi/20)^2) >= 0,
//	alpha = v/22 for v <= 22 m/s, else 1,
//
// v the speed (m/s), lphiM the determinant length (m), n0 the first bending frequency (Hz).
func DynamicFactor(speedMPerS, lphiM, n0Hz float64) (float64, error) {
	if !(speedMPerS >= 0) || math.IsInf(speedMPerS, 0) || !(lphiM > 0) || math.IsInf(lphiM, 0) || !(n0Hz > 0) || math.IsInf(n0Hz, 0) {
		return 0, fmt.Errorf("fatigue dynamic factor: speed %v m/s, determinant length %v m and frequency %v Hz must be finite, the speed not negative and the others positive", speedMPerS, lphiM, n0Hz)
	}
	k := speedMPerS / (2 * lphiM * n0Hz)
	phi1 := 1.325
	if k < 0.76 {
		phi1 = k / (1 - k + k*k*k*k)
	}
	alpha := min(speedMPerS/22, 1)
	a, b := lphiM/10, lphiM/20
	phi2 := alpha * (0.56*math.Exp(-a*a) + 0.50*(lphiM*n0Hz/80-1)*math.Exp(-b*b))
	phi2 = max(phi2, 0)
	return 1 + (phi1+phi2/2)/2, nil
}

// LowerFrequency is the lower bound of the first bending frequency n0 (Hz) of a simple span
// of spanM metres, EN 1991-2 Figure 6.10 (from memory): 80/L for 4 <= L <= 20 m, 23.58
// L^-0.592 for 20 < L <= 100 m. Outside those lengths the nearer formula is carried on, an
// extrapolation the standard does not make. The lower bound gives the larger phi', the part
// that governs at speed: a conservative choice where the frequency is not known.
func LowerFrequency(spanM float64) float64 {
	if spanM <= 20 {
		return 80 / spanM
	}
	return 23.58 * math.Pow(spanM, -0.592)
}
