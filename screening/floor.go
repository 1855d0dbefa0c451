package screening

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// FloorSystem is what the inventory holds of a bridge's floor system. Its elements' capacity
// data sit in Bridge.Members under the results' labels ("S1-3:M", "FB4:V": the element's
// label and the effect), a capacity in the positive sense (sagging moment, shear) held as
// CapacityTension.
type FloorSystem struct {
	// Rate asks for the floor system to be rated.
	Rate bool
	// StringerSpacingM, StringerDeadKNPerM, FloorBeamDeadKNPerM: 0 takes floor's defaults.
	StringerSpacingM, StringerDeadKNPerM, FloorBeamDeadKNPerM float64
}

// FloorNotes say what of a bridge's floor system was assumed or not rated.
type FloorNotes = floor.Notes

// isFloorLabel says whether a member label is a floor element's result label.
func isFloorLabel(label string) bool {
	_, _, ok := floor.ResultEffect(label)
	return ok
}

// FloorSystemOf describes the bridge's floor system, on truss t's deck panel points, for
// package floor.
func (b Bridge) FloorSystemOf(t *truss.Truss) floor.System {
	return floor.System{
		PanelX: t.DeckX(), Tracks: b.TrackCount(),
		TrussSpacingM: b.TrussSpacingM, TrackOffsetsM: b.TrackOffsetsM,
		StringerSpacingM:    b.Floor.StringerSpacingM,
		StringerDeadKNPerM:  b.Floor.StringerDeadKNPerM,
		FloorBeamDeadKNPerM: b.Floor.FloorBeamDeadKNPerM,
	}
}

// screenFloor rates the bridge's floor system, where the inventory asks for it, as further
// member results (kinds stringer and floor-beam), with the same rating equations, condition
// factors and flags as the truss members; assess gains their assessments.
func (w *Screener) screenFloor(b Bridge, s *Settings, t *truss.Truss, res *Result, assess []rating.Assessment) ([]rating.Assessment, error) {
	w.floorRated = nil
	if !b.Floor.Rate {
		for label := range b.Members {
			if isFloorLabel(label) {
				return nil, fmt.Errorf("inventory member %q is a floor element, but the bridge's floor system is not rated", label)
			}
		}
		return assess, nil
	}
	sys := b.FloorSystemOf(t)
	els, notes, err := sys.Elements()
	if err != nil {
		return nil, err
	}
	res.Floor = &notes
	// Every element of the system may hold data, also a floor beam left unrated because the
	// truss spacing is not known.
	known := map[string]bool{}
	for _, l := range floor.Labels(len(sys.PanelX)-1, sys.Tracks) {
		known[l] = true
	}
	for label := range b.Members {
		if el, _, ok := floor.ResultEffect(label); ok && !known[el] {
			return nil, fmt.Errorf("inventory floor element %q is not in this bridge's floor system (%d panels, %d tracks)", el, len(sys.PanelX)-1, sys.Tracks)
		}
	}
	w.floor.Reset()
	w.floor.Memo = s.floorMemo
	ex, err := w.floor.Live(sys, els, s.Existing.Trains)
	if err != nil {
		return nil, fmt.Errorf("existing traffic: %w", err)
	}
	pr, err := w.floor.Live(sys, els, s.Proposed.Trains)
	if err != nil {
		return nil, fmt.Errorf("proposed traffic: %w", err)
	}
	refs := map[string][]envelope.Extremes{}
	for _, e := range els {
		inv := b.Members[e.Label]
		if _, done := refs[inv.ReferenceTrain]; done || !inv.HasStoredRating() || inv.HasCapacity(rating.Tension) {
			continue
		}
		ld, ok := s.References[inv.ReferenceTrain]
		if !ok {
			return nil, fmt.Errorf("reference train %q of a stored rating factor is not known (import it, or name a built-in model)", inv.ReferenceTrain)
		}
		if refs[inv.ReferenceTrain], err = w.floor.Live(sys, els, []*envelope.Load{ld}); err != nil {
			return nil, fmt.Errorf("reference train %s: %w", inv.ReferenceTrain, err)
		}
	}
	lengths := floor.DefaultLengths
	if s.FloorLengths != nil {
		lengths = *s.FloorLengths
	}
	fr := &floorRated{sys: sys, els: els, impact: make([]float64, len(els)), refs: refs}
	for i, e := range els {
		impact := e.Impact(s.Dynamic, lengths)
		if !(impact >= 1) || math.IsInf(impact, 0) {
			return nil, fmt.Errorf("dynamic allowance %s gives 1 + I = %v for %s", s.Dynamic, impact, e.Label)
		}
		fr.impact[i] = impact
		exE := Envelope{Max: ex[i].Max, Min: ex[i].Min, Impact: impact}
		prE := Envelope{Max: pr[i].Max, Min: pr[i].Min, Impact: impact}
		inv := b.Members[e.Label]
		exL := rating.Loading{Demand: demand(e.Dead, exE)}
		prL := rating.Loading{Demand: demand(e.Dead, prE)}
		if r, ok := refs[inv.ReferenceTrain]; ok && inv.HasStoredRating() {
			d := demand(e.Dead, Envelope{Max: r[i].Max, Min: r[i].Min, Impact: impact})
			exL.Reference, prL.Reference = &d, &d
		}
		a := rating.Assess(inv, exL, prL, s.Method, s.Thresholds)
		for _, f := range append(append([]rating.Factor{}, a.Existing...), a.Proposed...) {
			if math.IsNaN(f.RF) || math.IsInf(f.RF, 0) {
				return nil, fmt.Errorf("floor element %s: rating factor is %v (check its capacity and the settings)", e.Label, f.RF)
			}
		}
		assess = append(assess, a)
		res.Members = append(res.Members, MemberResult{Label: e.Label, Kind: e.Kind, Effect: string(e.Effect),
			Dead: e.Dead, Existing: exE, Proposed: prE, Assessment: a})
	}
	w.floorRated = fr
	return assess, nil
}

// SenseName names the sense a rating factor of the result rates: "tension" or
// "compression" for a truss member, the effect ("moment", "shear") for a floor element, whose
// rating has the one positive sense.
func (m MemberResult) SenseName(s rating.Sense) string {
	if m.Effect != "" {
		return m.Effect
	}
	return s.String()
}
