package traffic

import (
	"math"
	"testing"
)

// TestRealTrainFactor: EN 1991-2 Annex C (from memory), computed by hand for two spans at two
// speeds. For example L = 12 m, n0 = 8 Hz, 60 km/h = 16.667 m/s: K = 16.667/(2·12·8) =
// 0.086806, phi' = K/(1 - K + K^4) = 0.095051; alpha = 16.667/22 = 0.75758, phi” = alpha
// (0.56 e^-1.44 + 0.50 (12·8/80 - 1) e^-0.36) = 0.75758 (0.13268 + 0.06977) = 0.153369;
// 1 + phi' + phi”/2 = 1.171736, 1 + phi' + phi” = 1.248420.
func TestRealTrainFactor(t *testing.T) {
	tests := []struct {
		lM, n0, kmh                     float64
		k, phiP, phiPP, careful, normal float64
	}{
		// L = 48 m: e^-(4.8^2) is negligible, phi'' = 0.50 (48·3/80 - 1) e^-5.76
		{48, 3, 60, 0.057870, 0.061424, 0.000955, 1.061902, 1.062379},
		{48, 3, 160, 0.154321, 0.182359, 0.001260, 1.182990, 1.183620},
		{12, 8, 60, 0.086806, 0.095051, 0.153369, 1.171736, 1.248420},
		// above 22 m/s alpha = 1
		{12, 8, 160, 0.231481, 0.300084, 0.202447, 1.401307, 1.502531},
	}
	for _, tc := range tests {
		v := tc.kmh / 3.6
		c, n := RealTrainFactor(v, tc.lM, tc.n0, false), RealTrainFactor(v, tc.lM, tc.n0, true)
		for _, p := range [][2]float64{{c.K, tc.k}, {c.PhiP, tc.phiP}, {c.PhiPP, tc.phiPP}, {c.Factor, tc.careful}, {n.Factor, tc.normal}} {
			if math.Abs(p[0]-p[1]) > 5e-6 { // by hand, six decimals
				t.Errorf("L %g m, %g km/h: got %.6f, want %.6f (%+v)", tc.lM, tc.kmh, p[0], p[1], c)
			}
		}
	}
	// K >= 0.76: phi' = 1.325 (from memory)
	if a := RealTrainFactor(100, 10, 5, false); a.PhiP != 1.325 {
		t.Errorf("K = %g: phi' %g, want 1.325", a.K, a.PhiP)
	}
}

// TestFrequencyBounds: by hand from the recalled bounds (EN 1991-2 6.4.4, from memory):
// L = 48 m: upper 94.76·48^-0.748 = 5.2367 Hz, lower 23.58·48^-0.592 = 2.3837 Hz; L = 12 m:
// upper 14.7706 Hz, lower 80/12 = 6.6667 Hz.
func TestFrequencyBounds(t *testing.T) {
	for _, tc := range []struct{ l, lo, hi float64 }{{48, 2.3837, 5.2367}, {12, 6.6667, 14.7706}} {
		lo, hi := FrequencyBounds(tc.l)
		if math.Abs(lo-tc.lo) > 1e-4 || math.Abs(hi-tc.hi) > 1e-4 {
			t.Errorf("L %g: bounds %g, %g; want %g, %g", tc.l, lo, hi, tc.lo, tc.hi)
		}
	}
	// the unmeasured factor is the larger of the two bounds' (a lower frequency raises K)
	a := RealTrainFactorUnmeasured(160/3.6, 48, 48, false)
	lo, _ := FrequencyBounds(48)
	if b := RealTrainFactor(160/3.6, 48, lo, false); a.Factor != b.Factor {
		t.Errorf("unmeasured %+v, lower bound's %+v", a, b)
	}
}
