package report

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// A strip diagram shows one line: its bridges along the chainage, each a mark filled with the
// colour of its proposed RF's band (and sized by it, so that it reads in black and white),
// with the highest line categories it carries beneath; flagged bridges are labelled with
// their id, and a bridge with a page links to it.

// stripsView is the index's section of strips, with the bands' legend.
type stripsView struct {
	Strips []strip
	Bands  []band
}

// strip is one line's diagram.
type strip struct {
	Line    string
	Summary string
	W, H    float64
	Track   line
	Ticks   []stripTick
	Marks   []stripMark
}

type stripTick struct {
	X, Y1, Y2, TextY float64
	Text             string
}

type stripMark struct {
	X, Y, R         float64
	Colour, Stroke  string
	Href, Title, ID string
	Label           bool
	LabelY, LeaderY float64
	Cat             string
	CatY            float64
}

// The strip's drawing size, px of the viewBox.
const (
	stripW      = 960.0
	stripMargin = 48.0
	stripTrackY = 74.0
	stripH      = 140.0
)

// drawStrips draws a strip for each line of the rows that has bridges with a chainage, lines
// in name order. names maps the bridges that have a page to its file.
func drawStrips(run Run, rows []BridgeRow, names map[string]string) []strip {
	byLine := map[string][]BridgeRow{}
	for _, r := range rows {
		byLine[r.Line] = append(byLine[r.Line], r)
	}
	lines := make([]string, 0, len(byLine))
	for l := range byLine {
		lines = append(lines, l)
	}
	sort.Strings(lines)
	var out []strip
	for _, l := range lines {
		if s, ok := drawStrip(run, l, byLine[l], names); ok {
			out = append(out, s)
		}
	}
	return out
}

func drawStrip(run Run, name string, rows []BridgeRow, names map[string]string) (strip, bool) {
	var placed []BridgeRow
	for _, r := range rows {
		if r.ChainageKm != nil && !math.IsNaN(*r.ChainageKm) && !math.IsInf(*r.ChainageKm, 0) {
			placed = append(placed, r)
		}
	}
	if len(placed) == 0 {
		return strip{}, false
	}
	sort.SliceStable(placed, func(i, j int) bool { return *placed[i].ChainageKm < *placed[j].ChainageKm })
	k0, k1 := *placed[0].ChainageKm, *placed[len(placed)-1].ChainageKm
	step := tickStep(k1 - k0)
	k0, k1 = math.Floor(k0/step)*step, math.Ceil(k1/step)*step
	if k1 == k0 {
		k0, k1 = k0-step, k1+step
	}
	x := func(km float64) float64 { return stripMargin + (km-k0)/(k1-k0)*(stripW-2*stripMargin) }
	s := strip{Line: orText(name, "(no line)"), W: stripW, H: stripH,
		Track: line{X1: x(k0), Y1: stripTrackY, X2: x(k1), Y2: stripTrackY}}
	for k := k0; k <= k1+step/2; k += step {
		s.Ticks = append(s.Ticks, stripTick{X: x(k), Y1: stripTrackY + 12, Y2: stripTrackY + 17, TextY: stripTrackY + 30, Text: num(k, decimalsFor(step))})
	}
	flagged, level := 0, 0
	// The category texts take the first of two rows where they clear the one before.
	lastX := []float64{math.Inf(-1), math.Inf(-1)}
	for _, r := range placed {
		b := bandOf(run, r.RFProposed)
		m := stripMark{X: x(*r.ChainageKm), Y: stripTrackY, R: markRadius(b.Key), Colour: b.Colour, Stroke: "#1f2a30",
			Href: names[r.BridgeID], ID: r.BridgeID, CatY: stripTrackY + 46}
		if r.Status == "failed" {
			m.Colour, m.Stroke = "#fff", "#c44e00"
		}
		m.Cat = categoryWords(r)
		if m.Cat != "" {
			row := 0
			if m.X-lastX[0] < 34 {
				row = 1
			}
			lastX[row] = m.X
			m.CatY = stripTrackY + 46 + 14*float64(row)
		}
		m.Title = markTitle(run, r)
		if len(r.Flags) > 0 {
			flagged++
			m.Label = true
			// Three rows of labels, in turn, so that neighbours' labels rarely collide.
			m.LabelY = stripTrackY - 16 - 14*float64(level%3)
			m.LeaderY = m.LabelY + 3
			level++
		}
		s.Marks = append(s.Marks, m)
	}
	s.Summary = fmt.Sprintf("%d bridges, km %s to %s, %d flagged", len(rows), num(*placed[0].ChainageKm, 3), num(*placed[len(placed)-1].ChainageKm, 3), flagged)
	if n := len(rows) - len(placed); n > 0 {
		s.Summary += fmt.Sprintf("; %d without a chainage not drawn", n)
	}
	return s, true
}

// markRadius sizes a mark by its band: the worse the RF, the larger.
func markRadius(band string) float64 {
	switch band {
	case "below":
		return 8
	case "review":
		return 6.5
	case "adequate":
		return 5
	}
	return 4
}

// categoryWords is what a mark shows beneath: the highest categories carried, "none", or
// nothing where the run did not rate them.
func categoryWords(r BridgeRow) string {
	switch {
	case r.Status == "failed":
		return "not screened"
	case r.Categories == nil:
		return ""
	case len(r.Categories) == 0:
		return "none"
	}
	return strings.Join(r.Categories, " ")
}

func markTitle(run Run, r BridgeRow) string {
	t := fmt.Sprintf("%s %s, km %s", r.BridgeID, r.Name, num(*r.ChainageKm, 3))
	if r.Status == "failed" {
		return t + ": not screened"
	}
	if r.RFProposed != nil {
		t += ", proposed RF " + num(*r.RFProposed, 2)
	}
	if c := categoryWords(r); c != "" {
		t += ", carries " + c
	}
	if r.ERating != nil {
		t += fmt.Sprintf(", Cooper E%.0f", *r.ERating)
	}
	if len(r.Flags) > 0 {
		t += ", " + strings.Join(r.Flags, ", ")
	}
	return t
}

// tickStep is a round distance between axis ticks giving 4 to 10 ticks over the span (km).
func tickStep(span float64) float64 {
	if !(span > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(span)))
	for _, f := range []float64{0.1, 0.2, 0.5, 1, 2, 5, 10} {
		if span/(f*p) <= 10 {
			return f * p
		}
	}
	return 10 * p
}

func decimalsFor(step float64) int {
	d := 0
	for step < 1 && d < 3 {
		step *= 10
		d++
	}
	return d
}

// eText is a Cooper E rating as the tables show it (E64), or a dash.
func eText(e *float64) string {
	if e == nil {
		return dash
	}
	return fmt.Sprintf("E%.0f", *e)
}

// networkFacts are a bridge page's facts of the network view: its Cooper E rating and the
// highest line categories it carries; none where the run did not rate them.
func networkFacts(r BridgeRow) []keyValue {
	if r.Categories == nil && r.ERating == nil {
		return nil
	}
	e := eText(r.ERating)
	if r.EMember != "" {
		e += " (" + r.EMember + ")"
	}
	return []keyValue{{"Cooper E rating", e}, {"line categories carried", orText(categoryWords(r), "none")}}
}
