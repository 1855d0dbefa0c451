package screening

import (
	"fmt"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// Trains at speed. Under an EN 1991-2 allowance (phi2 or phi3) a scenario's train may carry a
// speed: its own, or the bridge's line speed. It then takes the Annex C factor of a real
// train (traffic.RealTrainFactor: phi'' halved for phi2's carefully maintained track, whole
// for phi3's standard maintenance) at the member's determinant length, with the span's
// measured first bending frequency where the bridge gives one, else the frequency bound that
// gives the larger factor. Phi2/Phi3 remain for trains without a speed (the load models).
// A train at the line speed on a bridge without one takes Phi2/Phi3. Under other allowances
// speeds are not used.
//
// A member's envelope keeps one 1 + I (its Phi2/Phi3); a train at speed has its extremes
// scaled by its own factor over that one before the envelope is taken, so that live × (1 + I)
// is the train's force with its own factor. The factor used is kept with the member.

// TrainSpeed is the speed a scenario gives a train: Kmh > 0, or the bridge's line speed.
type TrainSpeed struct {
	Kmh  float64
	Line bool
}

// speedMPerS is the train's speed on the bridge, m/s; 0 for none.
func (ts TrainSpeed) speedMPerS(b Bridge) float64 {
	switch {
	case ts.Kmh > 0:
		return ts.Kmh / 3.6
	case ts.Line && b.LineSpeedKmh > 0:
		return b.LineSpeedKmh / 3.6
	}
	return 0
}

// SpeedFactor is the Annex C factor a train at speed took on a member, with its inputs.
type SpeedFactor struct {
	Train string
	traffic.AnnexC
	// Measured says the frequency is the bridge's measured one, not a bound.
	Measured bool
}

// speedFactors gives, for train k of the scenario at speed on the bridge, each member's
// Annex C factor; nil where the train has no speed or the allowance is not EN 1991-2's.
func speedFactors(sc Scenario, k int, b Bridge, d traffic.Dynamic, spanM float64, dyn []MemberDynamic) []SpeedFactor {
	if k >= len(sc.Speeds) || (d.Kind != traffic.Phi2 && d.Kind != traffic.Phi3) {
		return nil
	}
	v := sc.Speeds[k].speedMPerS(b)
	if !(v > 0) {
		return nil
	}
	out := make([]SpeedFactor, len(dyn))
	for i, md := range dyn {
		f := SpeedFactor{Train: sc.Trains[k].Train().Name, Measured: b.FirstFrequencyHz > 0}
		if f.Measured {
			f.AnnexC = traffic.RealTrainFactor(v, md.LengthM, b.FirstFrequencyHz, d.Kind == traffic.Phi3)
		} else {
			f.AnnexC = traffic.RealTrainFactorUnmeasured(v, md.LengthM, spanM, d.Kind == traffic.Phi3)
		}
		out[i] = f
	}
	return out
}

// scaleBySpeed scales a train's extremes (a copy in dst) by its own factor over each
// member's 1 + I.
func scaleBySpeed(dst, ext []envelope.Extremes, f []SpeedFactor, impacts []float64) []envelope.Extremes {
	dst = append(dst[:0], ext...)
	for i := range dst {
		r := f[i].Factor / impacts[i]
		dst[i].Max.Value *= r
		dst[i].Min.Value *= r
	}
	return dst
}

// String reads like "train X at 160 km/h: Annex C, L 48.00 m, n0 3.00 Hz (measured), K 0.154,
// phi' 0.182, phi” 0.001: 1.184".
func (f SpeedFactor) String() string {
	src := "lower or upper bound, the larger factor"
	if f.Measured {
		src = "measured"
	}
	return fmt.Sprintf("train %s at %.0f km/h: Annex C, L %.2f m, n0 %.2f Hz (%s), K %.3f, phi' %.3f, phi'' %.3f: %.3f",
		f.Train, f.SpeedMPerS*3.6, f.LengthM, f.FrequencyHz, src, f.K, f.PhiP, f.PhiPP, f.Factor)
}
