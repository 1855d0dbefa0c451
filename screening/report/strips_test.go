package report

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

// TestStripPlacesBridgesAlongTheLine: the marks of a line stand at their chainage on a linear
// scale (their x in proportion to km, arithmetic), in chainage order; flagged bridges are
// labelled, bridges with a page link to it, and a bridge without a chainage is counted, not
// drawn. Invented rows.
func TestStripPlacesBridgesAlongTheLine(t *testing.T) {
	km := func(v float64) *float64 { return &v }
	rf := km
	rows := []BridgeRow{
		{BridgeID: "S-2", Name: "Second", Line: "Strip Line", ChainageKm: km(17.5), RFProposed: rf(1.4), Categories: []string{"E5"}, Status: "done"},
		{BridgeID: "S-1", Name: "First", Line: "Strip Line", ChainageKm: km(2.5), RFProposed: rf(0.8), Flags: []string{"exceeds"},
			Categories: []string{"C4", "D2"}, Status: "done"},
		{BridgeID: "S-3", Name: "Unplaced", Line: "Strip Line", Status: "done"},
		{BridgeID: "S-4", Name: "Third", Line: "Strip Line", ChainageKm: km(10), Status: "failed", Error: "bad"},
		{BridgeID: "O-1", Name: "Other", Line: "Other Line", Status: "done"},
	}
	run := Run{Flag: 1, Review: 1.1}
	strips := drawStrips(run, rows, map[string]string{"S-1": "bridge-S-1.html"})
	if len(strips) != 1 {
		t.Fatalf("%d strips, want 1 (Other Line has no chainage)", len(strips))
	}
	s := strips[0]
	if len(s.Marks) != 3 || !strings.Contains(s.Summary, "1 without a chainage") {
		t.Fatalf("%d marks, summary %q", len(s.Marks), s.Summary)
	}
	want := []struct {
		id    string
		km    float64
		label bool
		href  string
		cat   string
	}{{"S-1", 2.5, true, "bridge-S-1.html", "C4 D2"}, {"S-4", 10, false, "", "not screened"}, {"S-2", 17.5, false, "", "E5"}}
	// Linear scale: (x - x(S-1)) / (x(S-2) - x(S-1)) = (km - 2.5) / (17.5 - 2.5).
	x0, x1 := s.Marks[0].X, s.Marks[2].X
	for i, w := range want {
		m := s.Marks[i]
		if m.ID != w.id || m.Label != w.label || m.Href != w.href || m.Cat != w.cat {
			t.Errorf("mark %d: %s label %v href %q cat %q; want %+v", i, m.ID, m.Label, m.Href, m.Cat, w)
		}
		if got, exp := (m.X-x0)/(x1-x0), (w.km-2.5)/15; math.Abs(got-exp) > 1e-12 {
			t.Errorf("%s at %v of the way, want %v", m.ID, got, exp)
		}
	}
	if s.Marks[0].Colour != bandOf(run, rf(0.8)).Colour || !(s.Marks[0].R > s.Marks[2].R) {
		t.Errorf("S-1 (RF 0.8) colour %s radius %v; S-2 (RF 1.4) radius %v", s.Marks[0].Colour, s.Marks[0].R, s.Marks[2].R)
	}
	// The index renders it, the link and the flagged label in the SVG.
	var buf bytes.Buffer
	if err := pages.ExecuteTemplate(&buf, "index.tmpl", indexPage(run, rows, map[string]string{"S-1": "bridge-S-1.html"}, 0)); err != nil {
		t.Fatal(err)
	}
	page := buf.String()
	for _, s := range []string{`<svg class="strip"`, `<a href="bridge-S-1.html"><g class="strip-mark" data-bridge="S-1">`, `>S-1</text>`, `>C4 D2</text>`} {
		if !strings.Contains(page, s) {
			t.Errorf("index lacks %s", s)
		}
	}
}

// TestTickStep: round steps giving at most 10 ticks (common practice for chart axes).
func TestTickStep(t *testing.T) {
	for _, c := range []struct{ span, step float64 }{{58.5, 10}, {18, 2}, {0.7, 0.1}, {120, 20}, {5, 0.5}} {
		if got := tickStep(c.span); math.Abs(got-c.step) > 1e-12 {
			t.Errorf("span %v: step %v, want %v", c.span, got, c.step)
		}
	}
}
