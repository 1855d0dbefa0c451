package main

import (
	"context"
	"fmt"
	"io"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// worstKind tells a priority list's worst member apart: a truss member, a stringer or a
// floor beam ("" for a bridge without one).
func worstKind(label string) string {
	if label == "" {
		return ""
	}
	return floor.KindOf(label)
}

// effectQuantity is the quantity a result's effects are in: a floor element's moment in
// kN·m (kip-ft), every other effect a force in kN (kip).
func effectQuantity(label string) units.Quantity {
	if _, eff, ok := floor.ResultEffect(label); ok && eff == floor.Moment {
		return units.Moment
	}
	return units.Force
}

// floorFlags ask envelope for a floor system's elements beside the members.
type floorFlags struct {
	on bool
	// trussSpacing is the floor beams' span: the cross-section's --truss-spacing (0: floor
	// beams not rated).
	trussSpacing, stringerSpace float64
}

func (f *floorFlags) add(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.BoolVar(&f.on, "floor", false, "add the floor system's stringers and floor beams (a stored bridge's --bridge adds them where the inventory describes its floor)")
	fl.Float64Var(&f.stringerSpace, "stringer-spacing", 0, "distance between a track's stringer lines (m); 0: the default 1.5 m")
}

// system is the floor system to add, or nil: the flags' for a geometry given by flags, the
// stored bridge's with --bridge.
func (f *floorFlags) system(ctx context.Context, look *fleetrun.Lookup, bridgeID string, t *truss.Truss) (*floor.System, error) {
	if bridgeID != "" {
		b, err := look.Bridge(ctx, bridgeID)
		if err != nil {
			return nil, fmt.Errorf("--bridge: %w", err)
		}
		if !b.Floor.Rate && !f.on {
			return nil, nil
		}
		fs := b.FloorSystemOf(t)
		return &fs, nil
	}
	if !f.on {
		return nil, nil
	}
	return &floor.System{PanelX: t.DeckX(), Tracks: 1, TrussSpacingM: f.trussSpacing, StringerSpacingM: f.stringerSpace}, nil
}

// floorEnvelopes appends the floor elements' largest effects (one stringer line's, a whole
// floor beam's), each with its own dynamic allowance (floor.DefaultLengths), to the members'.
func floorEnvelopes(out []memberEnvelope, s *floor.System, loads []*envelope.Load, dyn traffic.Dynamic) ([]memberEnvelope, error) {
	if s == nil {
		return out, nil
	}
	els, _, err := s.Elements()
	if err != nil {
		return nil, fmt.Errorf("floor system: %w", err)
	}
	var a floor.Analyser
	live, err := a.Live(*s, els, loads)
	if err != nil {
		return nil, err
	}
	for i, e := range els {
		f := e.Impact(dyn, floor.DefaultLengths)
		mx, mn := live[i].Max, live[i].Min
		mx.Value *= f
		mn.Value *= f
		out = append(out, memberEnvelope{Label: e.Label, Kind: string(e.Kind), Unit: units.SI.Name(effectQuantity(e.Label)),
			Max: extremeDoc(mx), Min: extremeDoc(mn)})
	}
	return out, nil
}

// floorNote tells a table's reader that floor elements' values are per element, with their
// own allowance.
func floorNote(w io.Writer, doc envelopeDoc) {
	for _, m := range doc.Members {
		if _, _, ok := floor.ResultEffect(m.Label); ok {
			fmt.Fprintf(w, "Floor elements (S<track>-<panel> stringers, FB<point> floor beams; :M moment in kN·m, :V shear in kN): one stringer line's or the whole floor beam's effect, each with its own dynamic allowance.\n")
			return
		}
	}
}

// floorLines are a one-track floor system's influence lines along the track (floor.ResultLine,
// stringer moments at mid-span): one stringer line's effects, a floor beam's reaction.
func floorLines(t *truss.Truss) ([]memberLine, error) {
	x := t.DeckX()
	var out []memberLine
	for _, el := range floor.Labels(len(x)-1, 1) {
		for _, eff := range []floor.Effect{floor.Moment, floor.Shear} {
			label := el + eff.Suffix()
			xs, eta, _, err := floor.ResultLine(x, label, nil)
			if err != nil {
				return nil, err
			}
			unit := units.SI.Name(effectQuantity(label))
			if floor.KindOf(label) == string(floor.KindFloorBeam) {
				// The reaction's line: the moment and shear follow by statics across the beam.
				unit = "kN"
				if eff == floor.Shear {
					continue
				}
				label = el + ":R"
			}
			pos, neg := analysis.Areas(xs, eta)
			out = append(out, memberLine{Label: label, Kind: truss.Kind(floor.KindOf(el + eff.Suffix())), Unit: unit, X: xs,
				Ordinates: eta, AreaPos: pos, AreaNeg: neg, SignChanges: []float64{}})
		}
	}
	return out, nil
}
