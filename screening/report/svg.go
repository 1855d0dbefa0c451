package report

import (
	"fmt"
	"math"
	"strings"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// The drawings are built here as plain shapes in SVG user units and written by the
// templates, so that every text in them passes through html/template's escaping.

// svgWidth is the width of every drawing's viewBox; pages scale it to the column.
const svgWidth = 960

// elevation is the drawing of a truss in elevation.
type elevation struct {
	W, H    float64
	Members []elevMember
	Joints  []elevText
	Labels  []elevText
	// Key lists the flagged members whose labels found no room in the drawing.
	Key      []keyEntry
	Supports []string // polygon points
	Rollers  []circle
	Deck     line
	Span     elevText
}

type elevMember struct {
	Label, Kind, D, Colour, Dash, Band, Title string
	Width                                     float64
	Flagged                                   bool
}

type elevText struct {
	X, Y, Rotate float64
	Anchor, Text string
}

type circle struct{ X, Y, R float64 }

type line struct{ X1, Y1, X2, Y2 float64 }

// drawElevation draws truss t with its members styled by proposed RF; members by label.
func drawElevation(t *truss.Truss, run Run, members map[string]Member, u units.System) elevation {
	const margin, top, bottom = 40.0, 46.0, 74.0
	// The drawing covers every joint: a joint table's truss need not start at x = 0 nor
	// keep above y = 0.
	xlo, xhi, ylo, yhi := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for _, j := range t.Joints {
		xlo, xhi, ylo, yhi = math.Min(xlo, j.X), math.Max(xhi, j.X), math.Min(ylo, j.Y), math.Max(yhi, j.Y)
	}
	span, depth := xhi-xlo, yhi-ylo
	s := (svgWidth - 2*margin) / span
	// Very shallow or very deep trusses keep a drawing of sensible height.
	s = math.Min(s, 360/math.Max(depth, 1e-9))
	width := span * s
	x0 := (svgWidth - width) / 2
	e := elevation{W: svgWidth, H: top + depth*s + bottom}
	px := func(x float64) float64 { return x0 + (x-xlo)*s }
	py := func(y float64) float64 { return top + (yhi-y)*s }
	supported := map[int]bool{}
	for _, sp := range t.Supports {
		supported[sp.Joint] = true
	}
	for i, j := range t.Joints {
		dx, dy, anchor := 0.0, 16.0, "middle"
		if j.Y-ylo > depth/2 {
			dy = -9
		}
		if supported[i] {
			// Beside the bearing symbol rather than under it.
			dx, dy, anchor = -16, 14, "end"
			if j.X-xlo > span/2 {
				dx, anchor = 16, "start"
			}
		}
		e.Joints = append(e.Joints, elevText{X: px(j.X) + dx, Y: py(j.Y) + dy, Anchor: anchor, Text: j.Name})
	}
	var ws []wanted
	var rfs []float64
	for _, mb := range t.Members {
		a, b := t.Joints[mb.A], t.Joints[mb.B]
		m, held := members[mb.Label]
		var rf *float64
		if held {
			rf = m.RFProposed
		}
		bd := bandOf(run, rf)
		title := fmt.Sprintf("%s (%s): proposed RF %s", mb.Label, mb.Kind, rfText(rf))
		if len(m.Flags) > 0 {
			title += "; flags: " + strings.Join(m.Flags, ", ")
		}
		em := elevMember{
			Label: mb.Label, Kind: string(mb.Kind), Colour: bd.Colour, Dash: bd.Dash, Width: bd.Width, Band: bd.Key,
			D:       fmt.Sprintf("M %.2f %.2f L %.2f %.2f", px(a.X), py(a.Y), px(b.X), py(b.Y)),
			Title:   title,
			Flagged: len(m.Flags) > 0,
		}
		e.Members = append(e.Members, em)
		// Unrated members are told apart by their line style (the legend's last entry),
		// not by a label of "—".
		if em.Flagged && rf != nil && finite(*rf) {
			ws = append(ws, wanted{Text: mb.Label + " " + rfText(rf), X1: px(a.X), Y1: py(a.Y), X2: px(b.X), Y2: py(b.Y)})
			rfs = append(rfs, *rf)
		}
	}
	// Most severe first, so that the worst members get the places nearest their middles.
	byRF := mostSevereFirst(ws, rfs)
	var taken []box
	for _, j := range e.Joints {
		taken = append(taken, textBox(j, jointFont, 1))
	}
	for _, j := range t.Joints {
		taken = append(taken, box{px(j.X) - 4, py(j.Y) - 4, px(j.X) + 4, py(j.Y) + 4})
	}
	for _, sp := range t.Supports {
		j := t.Joints[sp.Joint]
		taken = append(taken, box{px(j.X) - 12, py(j.Y), px(j.X) + 12, py(j.Y) + 32})
	}
	// Clear of the drawing's edges and of the span line at its foot.
	var lines []line
	for _, mb := range t.Members {
		a, b := t.Joints[mb.A], t.Joints[mb.B]
		lines = append(lines, line{px(a.X), py(a.Y), px(b.X), py(b.Y)})
	}
	e.Labels, e.Key = placeLabels(byRF, taken, lines, box{2, 2, e.W - 2, e.H - 22})
	for _, sp := range t.Supports {
		j := t.Joints[sp.Joint]
		x, y := px(j.X), py(j.Y)
		e.Supports = append(e.Supports, fmt.Sprintf("%.2f,%.2f %.2f,%.2f %.2f,%.2f", x, y+4, x-11, y+22, x+11, y+22))
		if !sp.Fixed[0] {
			e.Rollers = append(e.Rollers, circle{x - 5, y + 27, 4}, circle{x + 5, y + 27, 4})
		}
	}
	dx := t.DeckX()
	if len(dx) > 0 {
		y := py(t.Joints[t.DeckJoints[0]].Y)
		e.Deck = line{px(dx[0]), y, px(dx[len(dx)-1]), y}
	}
	e.Span = elevText{X: svgWidth / 2, Y: e.H - 8, Anchor: "middle", Text: formCaption(t, u)}
	return e
}

// ilChart is a member's influence line with the governing train placed on it.
type ilChart struct {
	ID, Label   string
	W, H        float64
	Left, Right float64 // plot x extent
	ZeroY       float64
	Line        string // polyline points
	PosArea     string // polygon points
	NegArea     string
	Ticks       []elevText
	Ordinates   []elevText
	PanelLines  []line
	DeckY       float64
	Arrows      []arrow
	Stretches   []rect
	Drops       []line
	Direction   elevText
	DirShaft    line
	DirHead     string // polygon points
	Front       *line
	YLabel      elevText
	XLabel      elevText
}

type arrow struct {
	Shaft line
	Head  string
	Title string
}

type rect struct {
	X, Y, W, H float64
	Title      string
}

// minTickGap is the least distance (px) between two labelled positions of a chart's axis.
const minTickGap = 34

// drawIL draws the line (xs, eta) over a span of spanM with the loads ob on the bridge. eta
// is a force per unit load, or, where moment, a moment per unit load (kN·m per kN: a length),
// which the ordinates and the axis show in u's length unit.
func drawIL(id, label string, spanM float64, xs, eta []float64, ob onBridge, leftToRight bool, headM float64, loaded bool, u units.System, moment bool) ilChart {
	const left, right, trainTop, deckY, plotTop, plotH, bottom = 56.0, 24.0, 18.0, 78.0, 96.0, 150.0, 40.0
	// The ordinates' unit: force per force, or moment per force (a length) in u's unit.
	ilUnit := u.Name(units.Force) + "/" + u.Name(units.Force)
	ordinate := func(v float64) float64 { return v }
	if moment {
		ilUnit = u.Name(units.Moment) + "/" + u.Name(units.Force)
		ordinate = func(v float64) float64 { return u.Convert(units.Length, v) }
	}
	c := ilChart{ID: id, Label: label, W: svgWidth, H: plotTop + plotH + bottom, Left: left, Right: svgWidth - right, DeckY: deckY}
	s := (c.Right - c.Left) / spanM
	px := func(x float64) float64 { return c.Left + x*s }
	hi, lo := 0.0, 0.0
	for _, v := range eta {
		hi, lo = math.Max(hi, v), math.Min(lo, v)
	}
	if hi-lo < 1e-12 {
		hi = 1
	}
	ys := plotH / (hi - lo)
	py := func(v float64) float64 { return plotTop + (hi-v)*ys }
	c.ZeroY = py(0)
	var pts, pos, neg []string
	pt := func(x, v float64) string { return fmt.Sprintf("%.2f,%.2f", px(x), py(v)) }
	pos = append(pos, pt(xs[0], 0))
	neg = append(neg, pt(xs[0], 0))
	for k := range xs {
		if k > 0 && (eta[k-1] > 0) != (eta[k] > 0) && eta[k-1] != 0 && eta[k] != 0 {
			z := xs[k-1] + (xs[k]-xs[k-1])*eta[k-1]/(eta[k-1]-eta[k])
			pos, neg = append(pos, pt(z, 0)), append(neg, pt(z, 0))
		}
		v := clean(eta[k])
		pts = append(pts, pt(xs[k], v))
		pos = append(pos, pt(xs[k], math.Max(v, 0)))
		neg = append(neg, pt(xs[k], math.Min(v, 0)))
		c.PanelLines = append(c.PanelLines, line{px(xs[k]), deckY, px(xs[k]), plotTop + plotH})
		// A position too close to the last one labelled (a section point beside a panel
		// point) keeps its line but not its label, which would run into the other.
		if len(c.Ticks) == 0 || px(xs[k])-c.Ticks[len(c.Ticks)-1].X >= minTickGap {
			c.Ticks = append(c.Ticks, elevText{X: px(xs[k]), Y: plotTop + plotH + 16, Anchor: "middle", Text: num(u.Convert(units.Length, xs[k]), 1)})
		}
		if v != 0 {
			dy := -6.0
			if v < 0 {
				dy = 14
			}
			c.Ordinates = append(c.Ordinates, elevText{X: px(xs[k]), Y: py(v) + dy, Anchor: "middle", Text: num(ordinate(v), 3)})
		}
	}
	last := xs[len(xs)-1]
	pos, neg = append(pos, pt(last, 0)), append(neg, pt(last, 0))
	c.Line, c.PosArea, c.NegArea = strings.Join(pts, " "), strings.Join(pos, " "), strings.Join(neg, " ")
	// The x axis: distance from the left bearing, in the unit of the tick values.
	c.XLabel = elevText{X: (c.Left + c.Right) / 2, Y: plotTop + plotH + 34, Anchor: "middle", Text: "position from left bearing x (" + u.Name(units.Length) + ")"}
	c.YLabel = elevText{X: 14, Y: plotTop + plotH/2, Rotate: -90, Anchor: "middle", Text: "η (" + ilUnit + ")"}

	pmax := 0.0
	for _, a := range ob.Axles {
		pmax = math.Max(pmax, a.LoadKN)
	}
	for _, a := range ob.Axles {
		x := px(a.XM)
		top := deckY - 14 - 40*a.LoadKN/pmax
		c.Arrows = append(c.Arrows, arrow{
			Shaft: line{x, top, x, deckY - 7},
			Head:  fmt.Sprintf("%.2f,%.2f %.2f,%.2f %.2f,%.2f", x-3.5, deckY-8, x+3.5, deckY-8, x, deckY-1),
			Title: fmt.Sprintf("axle %s %s at x = %s %s, η = %s", qty(u, units.Force, a.LoadKN), u.Name(units.Force), qty(u, units.Length, a.XM), u.Name(units.Length), num(ordinate(clean(analysis.Interpolate(xs, eta, a.XM))), 3)),
		})
		c.Drops = append(c.Drops, line{x, deckY, x, py(clean(analysis.Interpolate(xs, eta, a.XM)))})
	}
	qmax := 0.0
	for _, st := range ob.Stretches {
		qmax = math.Max(qmax, st.QKNPerM)
	}
	for _, st := range ob.Stretches {
		h := 8 + 22*st.QKNPerM/qmax
		c.Stretches = append(c.Stretches, rect{
			X: px(st.FromM), Y: deckY - 2 - h, W: (st.ToM - st.FromM) * s, H: h,
			Title: fmt.Sprintf("%s %s from x = %s to %s %s", qty(u, units.PerLength, st.QKNPerM), u.Name(units.PerLength), qty(u, units.Length, st.FromM), qty(u, units.Length, st.ToM), u.Name(units.Length)),
		})
	}
	if loaded {
		dir := "running left to right"
		ax, tip := c.Right-64, c.Right-4
		if !leftToRight {
			dir = "running right to left"
			ax, tip = c.Left+64, c.Left+4
		}
		// The words end at the arrow's tip side, so that they stay inside the drawing.
		anchor := "end"
		if !leftToRight {
			anchor = "start"
		}
		c.Direction = elevText{X: tip, Y: trainTop - 4, Anchor: anchor, Text: dir}
		back := tip - 8*math.Copysign(1, tip-ax)
		c.DirShaft = line{ax, trainTop + 4, back, trainTop + 4}
		c.DirHead = fmt.Sprintf("%.2f,%.2f %.2f,%.2f %.2f,%.2f", back, trainTop, back, trainTop+8, tip, trainTop+4)
		if headM >= 0 && headM <= spanM {
			x := px(headM)
			c.Front = &line{x, trainTop + 10, x, deckY}
		}
	}
	return c
}
