package report

import (
	"fmt"
	"math"
	"strings"

	"github.com/trussfleet/trussfleet/screening/fatigue"
)

// fatigueChart is a flagged member's fatigue drawing: the stress history of one passage of
// the train doing most damage, existing against proposed, and a histogram of the stress
// ranges a year of every train together (yearlySpectrum), existing against proposed.
// Stresses in MPa.
type fatigueChart struct {
	W, H                float64
	Existing, Proposed  string // history polylines
	ExTrain, PrTrain    string
	HistZeroY           float64
	Left, Right         float64
	HistTop, HistBottom float64
	Bars                []fatigueBar
	BinTicks, HistTicks []elevText
	CutOffX             float64
	CutOff              string
	BarBase             float64
	Labels              []elevText
	Caption             string
}

type fatigueBar struct {
	X, Y, W, H float64
	Proposed   bool
	Title      string
}

// drawFatigue draws a member's fatigue chart from the check done again (nil without one).
func drawFatigue(run Run, b Bridge, m Member, xs, eta []float64, spanM float64) *fatigueChart {
	if m.Fatigue.Status != string(fatigue.Damaged) {
		return nil
	}
	rc, err := recheckFatigue(run, b, m, xs, eta, spanM)
	if err != nil || len(rc.passages) == 0 {
		return nil
	}
	const left, right, top, histH, gap, barH, bottom = 64.0, 24.0, 24.0, 150.0, 70.0, 150.0, 44.0
	c := &fatigueChart{W: svgWidth, Left: left, Right: svgWidth - right, HistTop: top, HistBottom: top + histH}
	c.BarBase = top + histH + gap + barH
	c.H = c.BarBase + bottom
	// The governing passage of each scenario: most damage a year, left to right first.
	pick := func(proposed bool) *keptPassage {
		var best *keptPassage
		for i := range rc.passages {
			p := &rc.passages[i]
			if p.proposed == proposed && (best == nil || p.Damage*p.PerYear > best.Damage*best.PerYear) {
				best = p
			}
		}
		return best
	}
	ex, pr := pick(false), pick(true)
	if ex == nil || pr == nil {
		return nil
	}
	// History: stress against the front's position from its first reaching the bridge.
	lo, hi, s0, s1 := 0.0, 0.0, math.Inf(1), math.Inf(-1)
	for _, p := range []*keptPassage{ex, pr} {
		for _, pt := range p.History {
			v := pt.Value * p.MPaPerKN
			lo, hi = min(lo, v), max(hi, v)
			s0, s1 = min(s0, pt.HeadM), max(s1, pt.HeadM)
		}
	}
	if hi-lo < 1e-9 || !(s1 > s0) {
		return nil
	}
	px := func(s float64) float64 { return c.Left + (s-s0)/(s1-s0)*(c.Right-c.Left) }
	py := func(v float64) float64 { return top + (hi-v)/(hi-lo)*histH }
	poly := func(p *keptPassage) string {
		pts := make([]string, len(p.History))
		for i, pt := range p.History {
			pts[i] = fmt.Sprintf("%.1f,%.1f", px(pt.HeadM), py(pt.Value*p.MPaPerKN))
		}
		return strings.Join(pts, " ")
	}
	c.Existing, c.Proposed, c.ExTrain, c.PrTrain = poly(ex), poly(pr), ex.Train, pr.Train
	c.HistZeroY = py(0)
	c.Labels = append(c.Labels,
		elevText{X: 14, Y: top + histH/2, Rotate: -90, Anchor: "middle", Text: "stress (MPa)"},
		elevText{X: (c.Left + c.Right) / 2, Y: top + histH + 18, Anchor: "middle", Text: fmt.Sprintf("one passage, %s: position of the train's front (m)", ex.Direction)},
		elevText{X: c.Left - 6, Y: py(hi) + 4, Anchor: "end", Text: num(hi, 0)},
		elevText{X: c.Left - 6, Y: py(lo) + 4, Anchor: "end", Text: num(lo, 0)},
		elevText{X: 14, Y: c.BarBase - barH/2, Rotate: -90, Anchor: "middle", Text: "cycles a year"},
		elevText{X: (c.Left + c.Right) / 2, Y: c.BarBase + 34, Anchor: "middle", Text: "stress range (MPa), before gamma_Mf"})
	// Histogram: the yearly spectrum of each scenario (fatigue_spectrum.go).
	const bin = 10.0
	counts := yearlySpectrum(rc.passages, bin)
	nb := len(counts[0])
	top2 := 0.0
	for k := range counts {
		for _, v := range counts[k] {
			top2 = max(top2, v)
		}
	}
	if top2 == 0 {
		return nil
	}
	bw := (c.Right - c.Left) / float64(nb)
	for i := range nb {
		for k := range 2 {
			h := counts[k][i] / top2 * barH
			if counts[k][i] == 0 {
				continue
			}
			scen := "existing"
			if k == 1 {
				scen = "proposed"
			}
			c.Bars = append(c.Bars, fatigueBar{X: c.Left + float64(i)*bw + float64(k)*bw/2 + 1, Y: c.BarBase - h, W: bw/2 - 2, H: h, Proposed: k == 1,
				Title: fmt.Sprintf("%s: %s cycles a year of %s to %s MPa", scen, num(counts[k][i], 0), num(float64(i)*bin, 0), num(float64(i+1)*bin, 0))})
		}
		if nb <= 24 || i%2 == 0 {
			c.BinTicks = append(c.BinTicks, elevText{X: c.Left + float64(i)*bw, Y: c.BarBase + 16, Anchor: "middle", Text: num(float64(i)*bin, 0)})
		}
	}
	c.HistTicks = append(c.HistTicks, elevText{X: c.Left - 6, Y: c.BarBase - barH + 4, Anchor: "end", Text: num(top2, 0)})
	cut := rc.curve.CutOffMPa() / rc.set.GammaMf
	c.CutOffX = c.Left + cut/bin*bw
	c.CutOff = fmt.Sprintf("cut-off %s MPa", num(cut, 1))
	c.Caption = fmt.Sprintf("Fatigue of %s: above, the stress history of one passage of the train doing most damage (existing %s, proposed %s); below, the stress ranges a year of every train together by rainflow counting (ASTM E1049), existing against proposed, with the cut-off of detail category %s MPa below which ranges do no damage (EN 1993-1-9, from memory). Yearly damage %s existing, %s proposed.",
		m.Label, ex.Train, pr.Train, num(rc.curve.CategoryMPa, 0), sci(rc.result.PerYearExisting), sci(rc.result.PerYearProposed))
	return c
}
