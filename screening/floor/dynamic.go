package floor

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// Lengths are the determinant lengths of the floor elements for EN 1991-2's dynamic factors
// (Table 6.2, steel open deck; values from memory, check against the edition in force):
// a stringer simply supported on cross girders takes its span plus StringerAddM, a cross
// girder FloorBeamTimes its span, an end cross girder EndFloorBeamM. Hangers carrying the
// cross girders take the cross girder's length; this package rates no hanger of its own
// (the trusses rate them, see doc.go).
type Lengths struct {
	StringerAddM   float64 `json:"stringer_add_m"`
	FloorBeamTimes float64 `json:"floor_beam_times"`
	EndFloorBeamM  float64 `json:"end_floor_beam_m"`
}

// DefaultLengths are EN 1991-2 Table 6.2's values as recalled (from memory): p + 3 m, 2 b,
// 3.6 m.
var DefaultLengths = Lengths{StringerAddM: 3, FloorBeamTimes: 2, EndFloorBeamM: 3.6}

// Validate checks that the lengths can be used.
func (l Lengths) Validate() error {
	for name, v := range map[string]float64{"stringer_add_m": l.StringerAddM, "floor_beam_times": l.FloorBeamTimes, "end_floor_beam_m": l.EndFloorBeamM} {
		if !(v >= 0) || math.IsInf(v, 0) || v > 100 {
			return fmt.Errorf("floor determinant length %s must be between 0 and 100, got %v", name, v)
		}
	}
	if !(l.FloorBeamTimes > 0) || !(l.EndFloorBeamM > 0) {
		return fmt.Errorf("floor determinant lengths: floor_beam_times and end_floor_beam_m must be positive")
	}
	return nil
}

// elementLength is what an element's dynamic allowance depends on.
type elementLength struct {
	kind     truss.Kind
	end      bool    // an end floor beam
	panelM   float64 // the stringer's span; for a floor beam the longer adjacent panel
	spacingM float64 // the distance between the members carrying the element (rocking)
	spanM    float64 // a floor beam's span (the truss spacing)
}

// DeterminantM is the length the element's dynamic allowance is taken at, under the run's
// allowance d:
//   - EN 1991-2 (phi2, phi3): Lengths (Table 6.2, from memory);
//   - AREMA: the stringer's length; for a floor beam the longer adjacent stringer length
//     (AREMA chapter 15, from memory);
//   - fixed or none: the allowance takes no length.
func (e Element) DeterminantM(d traffic.Dynamic, l Lengths) float64 {
	il := e.impact
	switch d.Kind {
	case traffic.Phi2, traffic.Phi3:
		switch {
		case il.kind == KindStringer:
			return il.panelM + l.StringerAddM
		case il.end:
			return l.EndFloorBeamM
		default:
			return l.FloorBeamTimes * il.spanM
		}
	}
	return il.panelM
}

// Impact is the element's 1 + I under the run's allowance d. AREMA's rocking effect (100/S
// percent) is added where the run's allowance adds it, with S the distance between the
// members carrying the element: the two stringer lines for a stringer, the trusses for a
// floor beam. A determinant length set for the trusses (d.LengthM) is not used here.
func (e Element) Impact(d traffic.Dynamic, l Lengths) float64 {
	dd := d
	dd.LengthM = e.DeterminantM(d, l)
	if d.Kind == traffic.AREMASteel && d.SpacingM > 0 {
		dd.SpacingM = e.impact.spacingM
	}
	return dd.Factor(dd.LengthM)
}
