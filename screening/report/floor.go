package report

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// A floor element's result (a stringer's or a floor beam's moment or shear, package floor)
// stands beside the truss members: its effects are a moment in kN·m or a shear in kN, its
// rating has the one sense named by its effect.

// effectQty is the quantity of a result's forces: kN·m for a floor element's moment.
func effectQty(label string) units.Quantity {
	if _, eff, ok := floor.ResultEffect(label); ok && eff == floor.Moment {
		return units.Moment
	}
	return units.Force
}

// senseName names a result's sense for people: a floor element's effect for its one sense.
func senseName(label, sense string) string {
	if _, eff, ok := floor.ResultEffect(label); ok {
		return string(eff)
	}
	return sense
}

// floorFact says whether the floor system was rated, and what was assumed or left unrated.
func floorFact(b Bridge) string {
	if b.FloorNotes == nil {
		return "not rated (the inventory does not describe it)"
	}
	if len(b.FloorNotes) == 0 {
		return "rated as the inventory describes it"
	}
	return "rated; " + strings.Join(b.FloorNotes, "; ")
}

// floorSection draws a flagged floor element's influence line along the track with the
// governing train's axles, and says how the element's effect follows from it.
func floorSection(run Run, b Bridge, t *truss.Truss, s section, i int, u units.System) section {
	m := b.Members[i]
	tr := m.Proposed.MaxTrain
	xs, eta, xi, err := floor.ResultLine(t.DeckX(), m.Label, tr)
	if err != nil {
		s.Captions = append(s.Captions, "The element's influence line is not drawn: "+err.Error())
		return s
	}
	ex := m.Proposed.Max
	// A floor beam's effect is the track reactions' by statics: c times its reaction line.
	c, what := 1.0, "per unit load of the track, the stringer line carrying half"
	if m.Kind == string(floor.KindFloorBeam) {
		what = "the floor beam's reaction from one track per unit load, height 1"
		if tr != nil && ex.Value > 0 {
			if r, err := envelope.Compute(xs, [][]float64{eta}, tr, envelope.Options{}); err == nil && r[0].Max.Value > 0 {
				c = ex.Value / r[0].Max.Value
			}
		}
	}
	scaled := make([]float64, len(eta))
	for k, v := range eta {
		scaled[k] = c * v
	}
	ob := placeTrain(tr, ex.Placement, t.SpanM(), xs, scaled, 1)
	drawn := ex.Loaded && tr != nil
	if drawn && math.Abs(ob.effect(xs, scaled)-ex.Value) > 1e-6*math.Max(1, ex.Value) {
		s.Captions = append(s.Captions, fmt.Sprintf("Train %s as now defined does not give the run's effect here: its definition has changed since the run, so its loads are not drawn.", ex.Train))
		drawn, ob = false, onBridge{}
	}
	ch := drawIL(fmt.Sprintf("m%d", i), m.Label, t.SpanM(), xs, eta, ob, ex.Direction == envelope.LeftToRight, ex.HeadM, drawn, u, m.Kind == string(floor.KindStringer) && effectQty(m.Label) == units.Moment)
	s.Chart = &ch
	lu, q := u.Name(units.Length), effectQty(m.Label)
	cap := fmt.Sprintf("Influence line of %s along the track: %s", m.Label, what)
	if xi > 0 {
		cap += fmt.Sprintf("; the moment at %s %s into the panel, where the governing train's largest moment stands", qty(u, units.Length, xi), lu)
	}
	if c != 1 {
		cap += fmt.Sprintf("; the floor beam's %s is %s %s per unit reaction (statics across the floor beam, stringer lines where they meet it)", senseName(m.Label, ""), num(c, 3), u.Name(q))
	}
	s.Captions = append(s.Captions, cap+".")
	if ex.Loaded {
		s.Captions = append(s.Captions, fmt.Sprintf("Proposed traffic: %s, %s, front at x = %s %s, gives L = %s %s.", orDash(ex.Train), ex.Direction,
			qty(u, units.Length, ex.HeadM), lu, qty(u, q, ex.Value), u.Name(q)))
	}
	if s.Fatigue = drawFatigue(run, b, m, nil, nil, t.SpanM()); s.Fatigue != nil {
		s.Fatigue.Caption += floorFatigueNote(b, m, u)
	}
	return s
}

// floorPlan sketches the floor system in plan: the two trusses, a floor beam at each deck
// panel point, the stringers of each track between them, every rated element styled by its
// proposed rating factor and the flagged ones labelled. nil for a bridge without floor
// results.
func floorPlan(run Run, b Bridge, t *truss.Truss, u units.System) *elevation {
	worst := map[string]Member{} // by element: its lower proposed RF of moment and shear
	any := false
	for _, m := range b.Members {
		el, _, ok := floor.ResultEffect(m.Label)
		if !ok {
			continue
		}
		any = true
		w, seen := worst[el]
		if !seen || (m.RFProposed != nil && (w.RFProposed == nil || *m.RFProposed < *w.RFProposed)) {
			if seen && len(w.Flags) > 0 && len(m.Flags) == 0 {
				m.Flags = w.Flags
			}
			worst[el] = m
		} else if len(m.Flags) > 0 && len(w.Flags) == 0 {
			w.Flags = m.Flags
			worst[el] = w
		}
	}
	if !any {
		return nil
	}
	xs := t.DeckX()
	n := len(xs) - 1
	tracks := max(b.Tracks, 1)
	const margin, top = 40.0, 30.0
	span := t.SpanM()
	s := (svgWidth - 2*margin) / span
	rowH := 34.0
	h := rowH * float64(tracks+1)
	e := elevation{W: svgWidth, H: top + h + 50}
	px := func(x float64) float64 { return margin + x*s }
	// The trusses, A at the top.
	e.Deck = line{px(0), top + h/2, px(span), top + h/2}
	for _, y := range []float64{top, top + h} {
		e.Members = append(e.Members, elevMember{Label: "truss", Kind: "truss", Colour: "#5a6770", Width: 3,
			D: fmt.Sprintf("M %.2f %.2f L %.2f %.2f", px(0), y, px(span), y), Title: "main truss"})
	}
	e.Joints = append(e.Joints, elevText{X: px(0) - 8, Y: top + 4, Anchor: "end", Text: "A"}, elevText{X: px(0) - 8, Y: top + h + 4, Anchor: "end", Text: "B"})
	var ws []wanted
	var rfs []float64
	lines := []line{{px(0), top, px(span), top}, {px(0), top + h, px(span), top + h}}
	add := func(el, kind string, x1, y1, x2, y2 float64) {
		m, ok := worst[el]
		var rf *float64
		if ok {
			rf = m.RFProposed
		}
		bd := bandOf(run, rf)
		title := fmt.Sprintf("%s (%s): proposed RF %s", el, kind, rfText(rf))
		if !ok {
			title = fmt.Sprintf("%s (%s): not rated", el, kind)
			bd.Colour, bd.Dash = "#c9d1d6", "2 3"
		}
		if len(m.Flags) > 0 {
			title += "; flags: " + strings.Join(m.Flags, ", ")
		}
		em := elevMember{Label: el, Kind: kind, Colour: bd.Colour, Dash: bd.Dash, Width: bd.Width, Band: bd.Key, Title: title,
			D: fmt.Sprintf("M %.2f %.2f L %.2f %.2f", x1, y1, x2, y2), Flagged: len(m.Flags) > 0}
		e.Members = append(e.Members, em)
		lines = append(lines, line{x1, y1, x2, y2})
		if em.Flagged && rf != nil && finite(*rf) {
			ws = append(ws, wanted{Text: el + " " + rfText(rf), X1: x1, Y1: y1, X2: x2, Y2: y2})
			rfs = append(rfs, *rf)
		}
	}
	for j := 0; j <= n; j++ {
		add(floor.FloorBeamLabel(j), string(floor.KindFloorBeam), px(xs[j]), top, px(xs[j]), top+h)
	}
	for tk := 1; tk <= tracks; tk++ {
		y := top + rowH*float64(tk)
		for j := 1; j <= n; j++ {
			add(floor.StringerLabel(tk, j), string(floor.KindStringer), px(xs[j-1])+3, y, px(xs[j])-3, y)
		}
	}
	byRF := mostSevereFirst(ws, rfs)
	e.Labels, e.Key = placeLabels(byRF, nil, lines, box{2, 2, e.W - 2, e.H - 22})
	e.Span = elevText{X: svgWidth / 2, Y: e.H - 8, Text: fmt.Sprintf("plan, span %s %s, %d panels, %d track(s); stringers of each track between the floor beams", qty(u, units.Length, span), u.Name(units.Length), n, tracks)}
	return &e
}

// explainFloor is Explain for a floor element's result: the element, its influence line
// along the track, each scenario's governing train with its loads summed on the line, the
// rating arithmetic in the effect's unit, and why it is flagged.
func explainFloor(w io.Writer, run Run, b Bridge, t *truss.Truss, m Member, u units.System) error {
	ew := &errWriter{w: w}
	p := func(format string, a ...any) { fmt.Fprintf(ew, format, a...) }
	lu, q := u.Name(units.Length), effectQty(m.Label)
	qu := u.Name(q)
	r := b.Row
	p("Bridge %s  %s\n", safetext.Terminal(r.BridgeID), safetext.Terminal(r.Name))
	tp := t.Params
	p("  %s truss, %s, span %s %s, %d panels, %d track(s)\n", tp.Type, orText(tp.Deck, truss.Through), qty(u, units.Length, tp.SpanM), lu, tp.Panels, max(b.Tracks, 1))
	p("Screening run %d (%s): %s\n\n", run.ID, orDash(run.Status), equation(run))
	el, eff, _ := floor.ResultEffect(m.Label)
	p("Floor element %s (%s), %s in %s\n", el, m.Kind, eff, qu)
	p("Floor system: %s\n", floorFact(b))
	if len(m.Flags) > 0 {
		p("Flags: %s\n", strings.Join(m.Flags, ", "))
	} else {
		p("Flags: none\n")
	}
	deadFrom := "the stringer line's dead load per metre over the panel"
	if m.Kind == string(floor.KindFloorBeam) {
		deadFrom = "the stringers' dead reactions and the floor beam's own weight"
	}
	p("  dead load D = %s %s, from %s\n", signedQty(u, q, m.DeadKN), qu, deadFrom)
	for _, sc := range []struct {
		name string
		s    Scenario
	}{{"existing", m.Existing}, {"proposed", m.Proposed}} {
		ex, tr := sc.s.Max, sc.s.MaxTrain
		p("\n%s traffic: 1 + I = %s for this element (its own determinant length)\n", capitalise(sc.name), num(sc.s.Impact, 3))
		if !ex.Loaded {
			p("  no train loads it\n")
			continue
		}
		p("  governing: %s %s, %s, %s\n", qty(u, q, ex.Value), qu, safetext.Terminal(orDash(ex.Train)), placementWordsIn(ex, tr, u))
		if tr == nil {
			continue
		}
		xs, eta, xi, err := floor.ResultLine(t.DeckX(), m.Label, tr)
		if err != nil {
			p("  (influence line: %v)\n", err)
			continue
		}
		if sc.name == "proposed" {
			p("  influence line along the track (zero outside):")
			for k := range xs {
				p(" x %s %s: %s;", qty(u, units.Length, xs[k]), lu, num(clean(eta[k]), 4))
			}
			if xi > 0 {
				p(" the moment at %s %s into the panel", qty(u, units.Length, xi), lu)
			}
			p("\n")
		}
		ob := placeTrain(tr, ex.Placement, t.SpanM(), xs, eta, 1)
		sum := ob.effect(xs, eta)
		tw := tabwriter.NewWriter(ew, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "    axle\tx (%s)\tP (%s)\teta\tP x eta\t\n", lu, u.Name(units.Force))
		for i, a := range ob.Axles {
			if h := analysis.Interpolate(xs, eta, a.XM); h != 0 {
				fmt.Fprintf(tw, "    %d\t%s\t%s\t%s\t%s\t\n", i+1, qty(u, units.Length, a.XM), qty(u, units.Force, a.LoadKN), num(clean(h), 4), signedQty(u, units.Force, a.LoadKN*h))
			}
		}
		_ = tw.Flush()
		for _, st := range ob.Stretches {
			if in := integral(xs, eta, st.FromM, st.ToM); in != 0 {
				p("    %s %s over x = %s to %s %s: %s\n", qty(u, units.PerLength, st.QKNPerM), u.Name(units.PerLength), qty(u, units.Length, st.FromM), qty(u, units.Length, st.ToM), lu, signedQty(u, units.Force, st.QKNPerM*in))
			}
		}
		if m.Kind == string(floor.KindFloorBeam) && sum > 0 {
			p("    sum: reaction R = %s %s from one track; by statics across the floor beam the %s is %s %s per unit R: L = %s %s\n",
				qty(u, units.Force, sum), u.Name(units.Force), eff, num(ex.Value/sum, 4), qu, qty(u, q, ex.Value), qu)
		} else {
			p("    sum %s %s (L as screened: %s %s)\n", qty(u, q, sum), qu, qty(u, q, ex.Value), qu)
		}
	}
	if eff == floor.Moment {
		explainFatigue(p, run, b, m, nil, nil, t.SpanM())
		p("\n")
	}
	explainRating(ew, run, m, u)
	for _, c := range Caution {
		p("CAUTION: %s\n", c)
	}
	return ew.err
}
