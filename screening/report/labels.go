package report

import (
	"math"
	"sort"
	"strconv"
	"unicode/utf8"
)

// Member labels on the elevation are placed greedily: each label, most severe member first,
// takes the first candidate position beside its own member whose box meets no box already
// taken (joint names, joints, bearings, labels placed before it) and stays inside the
// drawing. A label that finds no free position is replaced by a small number at the first
// free candidate, and the member is listed under that number in a key below the drawing.
// A position that crosses no member's line is preferred over one that does: a label over
// another member's line reads as that member's.
// Labels are written level (not rotated), so that their boxes are plain rectangles.

// Font sizes of the elevation's texts in SVG user units; style.css sets the same sizes
// (svg .joint, svg .mlabel).
const (
	jointFont = 12.0
	labelFont = 12.5
)

// box is an axis-aligned rectangle in SVG user units, y downwards.
type box struct{ X0, Y0, X1, Y1 float64 }

func (a box) meets(b box) bool {
	return a.X0 < b.X1 && b.X0 < a.X1 && a.Y0 < b.Y1 && b.Y0 < a.Y1
}

func (a box) inside(b box) bool {
	return a.X0 >= b.X0 && a.X1 <= b.X1 && a.Y0 >= b.Y0 && a.Y1 <= b.Y1
}

// textBox is the box a level text of the given font size covers, with a margin of pad. The
// width is an estimate that errs wide: 0.68 em a character (bold digits and capitals of the
// faces style.css names are about 0.57 to 0.7 em, spaces and points less); the height runs
// from 0.8 em above the baseline to 0.25 em below it.
func textBox(t elevText, font, pad float64) box {
	w := 0.68 * font * float64(utf8.RuneCountInString(t.Text))
	x0 := t.X - w/2
	switch t.Anchor {
	case "start":
		x0 = t.X
	case "end":
		x0 = t.X - w
	}
	return box{x0 - pad, t.Y - 0.8*font - pad, x0 + w + pad, t.Y + 0.25*font + pad}
}

// labelPad is the clear margin around a member label: its white halo (style.css strokes it
// 4 units wide) and a little air.
const labelPad = 2.5

// wanted is a label to place: its text and its member's ends on the page.
type wanted struct {
	Text           string
	X1, Y1, X2, Y2 float64
}

// keyEntry is a member whose label found no room: its number in the drawing (empty when not
// even the number found room) and its label.
type keyEntry struct {
	Number, Text string
}

// candidates are the baselines, best first, at which a level text of half-width hw and
// half-height hh sits clear of the line from (x1, y1) to (x2, y2): at points along the line,
// middle first, on either side, just far enough out along the normal that its box does not
// cover the line.
func candidates(w wanted, hw, hh float64) []elevText {
	dx, dy := w.X2-w.X1, w.Y2-w.Y1
	l := math.Hypot(dx, dy)
	if l == 0 {
		return nil
	}
	// Normal pointing up the page (or left for a vertical line) first.
	nx, ny := dy/l, -dx/l
	if ny > 0 || (ny == 0 && nx > 0) {
		nx, ny = -nx, -ny
	}
	const gap = 3.0
	var out []elevText
	for _, d := range []float64{hw*math.Abs(nx) + hh*math.Abs(ny) + gap, hw*math.Abs(nx) + 3*hh + gap} {
		for _, f := range []float64{0.5, 0.36, 0.64, 0.24, 0.76} {
			for _, side := range []float64{1, -1} {
				cx, cy := w.X1+f*dx+side*d*nx, w.Y1+f*dy+side*d*ny
				// The baseline sits below the box's centre: the box runs from 0.8 em above
				// it to 0.25 em below it.
				out = append(out, elevText{X: cx, Y: cy + hh - 0.25*labelFont - labelPad, Anchor: "middle", Text: w.Text})
			}
		}
	}
	return out
}

// placeLabels places the labels ws (in order of priority) in the drawing area, clear of the
// boxes taken, and where it can of the members' lines. It returns the labels placed, with
// any numbers standing for labels that found no room, and the key of those.
func placeLabels(ws []wanted, taken []box, lines []line, area box) ([]elevText, []keyEntry) {
	var placed []elevText
	var key []keyEntry
	try := func(w wanted) (elevText, bool) {
		b := textBox(elevText{Anchor: "middle", Text: w.Text}, labelFont, labelPad)
		cs := candidates(w, (b.X1-b.X0)/2, (b.Y1-b.Y0)/2)
		for _, strict := range []bool{true, false} {
			for _, c := range cs {
				cb := textBox(c, labelFont, labelPad)
				if !cb.inside(area) || meetsAny(cb, taken) || (strict && crossesAny(cb, lines)) {
					continue
				}
				taken = append(taken, cb)
				return c, true
			}
		}
		return elevText{}, false
	}
	for _, w := range ws {
		if t, ok := try(w); ok {
			placed = append(placed, t)
			continue
		}
		n := strconv.Itoa(len(key) + 1)
		e := keyEntry{Text: w.Text}
		num := w
		num.Text = n
		if t, ok := try(num); ok {
			placed = append(placed, t)
			e.Number = n
		}
		key = append(key, e)
	}
	return placed, key
}

// crossesAny reports whether any of the lines passes through box b (Liang–Barsky clipping
// of each line to the box).
func crossesAny(b box, lines []line) bool {
	for _, l := range lines {
		t0, t1 := 0.0, 1.0
		dx, dy := l.X2-l.X1, l.Y2-l.Y1
		in := true
		for _, pq := range [4][2]float64{{-dx, l.X1 - b.X0}, {dx, b.X1 - l.X1}, {-dy, l.Y1 - b.Y0}, {dy, b.Y1 - l.Y1}} {
			p, q := pq[0], pq[1]
			switch {
			case p == 0:
				if q < 0 {
					in = false
				}
			case p < 0:
				t0 = math.Max(t0, q/p)
			default:
				t1 = math.Min(t1, q/p)
			}
		}
		if in && t0 <= t1 {
			return true
		}
	}
	return false
}

func meetsAny(b box, bs []box) bool {
	for _, o := range bs {
		if b.meets(o) {
			return true
		}
	}
	return false
}

// mostSevereFirst orders the wanted labels by their rating factors rfs, lowest first (stable),
// so that the worst members get the places nearest their middles.
func mostSevereFirst(ws []wanted, rfs []float64) []wanted {
	order := make([]int, len(ws))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(i, k int) bool { return rfs[order[i]] < rfs[order[k]] })
	out := make([]wanted, len(ws))
	for i, k := range order {
		out[i] = ws[k]
	}
	return out
}
