package screening_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// TestTrainAtSpeed: the single axle P over L2 of the 48 m Pratt gives L2-L3 0.5 × 1.5 P with
// one centred track (method of sections); a train at 160 km/h over the span of measured
// n0 = 3 Hz takes, at L_phi = 48 m, 1 + phi' + phi” = 1.183620 on standard track (EN 1991-2
// Annex C from memory, by hand in traffic's TestRealTrainFactor), instead of Phi3.
func TestTrainAtSpeed(t *testing.T) {
	const p = 200.0
	s := settings(t, axle("existing axle", p), axle("proposed axle", p))
	s.Dynamic = traffic.Dynamic{Kind: traffic.Phi3}
	s.Proposed.Speeds = []screening.TrainSpeed{{Line: true}}
	b := pratt48(0, 0, 5, 0)
	b.LineSpeedKmh, b.FirstFrequencyHz = 160, 3
	m := member(t, screening.ScreenBridge(b, s), "L2-L3")
	phi3 := 2.16/(math.Sqrt(48)-0.2) + 0.73 // EN 1991-2 6.4.5.2, from memory
	if got := m.Existing.Max.Value * m.Existing.Impact; math.Abs(got-0.5*1.5*p*phi3) > 1e-9 {
		t.Errorf("existing, no speed: %g, want %g (Phi3)", got, 0.5*1.5*p*phi3)
	}
	if got := m.Proposed.Max.Value * m.Proposed.Impact; math.Abs(got-0.5*1.5*p*1.183620) > 1e-3 {
		t.Errorf("at 160 km/h: %g, want %g", got, 0.5*1.5*p*1.183620)
	}
	if f := m.Proposed.MaxSpeed; !f.Measured || f.FrequencyHz != 3 || math.Abs(f.SpeedMPerS-160/3.6) > 1e-12 || f.Train != "proposed axle" {
		t.Errorf("speed factor kept %+v", f)
	}
	// the train's own force, 1.5 P over L2, times the share gives the live value
	if got := m.Proposed.MaxShare * 1.5 * p; math.Abs(got-m.Proposed.Max.Value) > 1e-9 {
		t.Errorf("share %g gives %g, live value %g", m.Proposed.MaxShare, got, m.Proposed.Max.Value)
	}
	// Not measured: the bound giving the larger factor.
	b.FirstFrequencyHz = 0
	m = member(t, screening.ScreenBridge(b, s), "L2-L3")
	want := traffic.RealTrainFactorUnmeasured(160/3.6, 48, 48, true).Factor
	if got := m.Proposed.Max.Value * m.Proposed.Impact; math.Abs(got-0.5*1.5*p*want) > 1e-9 || m.Proposed.MaxSpeed.Measured {
		t.Errorf("unmeasured: %g, want %g", got, 0.5*1.5*p*want)
	}
	// No line speed: Phi3.
	b.LineSpeedKmh = 0
	m = member(t, screening.ScreenBridge(b, s), "L2-L3")
	if got := m.Proposed.Max.Value * m.Proposed.Impact; math.Abs(got-0.5*1.5*p*phi3) > 1e-9 || m.Proposed.MaxSpeed.Factor != 0 {
		t.Errorf("no line speed: %g, want %g", got, 0.5*1.5*p*phi3)
	}
}
