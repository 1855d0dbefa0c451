package report

import (
	"fmt"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// crowdedMembers flags every member of t with a proposed RF just under 1 (labels of the
// longest kind, "U7-U8 0.94"), except every fifth, which is flagged unrated (no proposed
// RF), as a run with thresholds.flag_unrated on does.
func crowdedMembers(t *truss.Truss) (map[string]Member, map[string]bool) {
	ms := map[string]Member{}
	unrated := map[string]bool{}
	for i, mb := range t.Members {
		m := Member{Label: mb.Label, Kind: string(mb.Kind), Flags: []string{"exceeds"}}
		if i%5 == 4 {
			m.Flags = []string{"no-capacity"}
			unrated[mb.Label] = true
		} else {
			rf := 0.90 + float64(i%9)/100
			m.RFProposed = &rf
		}
		ms[mb.Label] = m
	}
	return ms, unrated
}

func TestElevationLabelsDoNotOverlap(t *testing.T) {
	for _, p := range []truss.Params{
		{Type: "pratt", SpanM: 96, Panels: 16, DepthM: 10},
		{Type: "howe", SpanM: 96, Panels: 16, DepthM: 10},
		{Type: "warren-verticals", SpanM: 96, Panels: 16, DepthM: 10},
		{Type: "warren", SpanM: 80, Panels: 16, DepthM: 6},
		{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
	} {
		t.Run(fmt.Sprintf("%s %d panels", p.Type, p.Panels), func(t *testing.T) {
			tr, err := truss.Build(p)
			if err != nil {
				t.Fatal(err)
			}
			ms, unrated := crowdedMembers(tr)
			e := drawElevation(tr, Run{Flag: 1, Review: 1.1}, ms, units.SI)
			// Boxes as the placement computes them, without its margins: what must not meet.
			var boxes []box
			var what []string
			for _, l := range e.Labels {
				boxes, what = append(boxes, textBox(l, labelFont, 0)), append(what, "label "+l.Text)
			}
			for _, j := range e.Joints {
				boxes, what = append(boxes, textBox(j, jointFont, 0)), append(what, "joint "+j.Text)
			}
			for i := range boxes {
				if i < len(e.Labels) && !boxes[i].inside(box{0, 0, e.W, e.H}) {
					t.Errorf("%s %+v leaves the drawing (%g × %g)", what[i], boxes[i], e.W, e.H)
				}
				for k := i + 1; k < len(boxes); k++ {
					if i < len(e.Labels) && boxes[i].meets(boxes[k]) {
						t.Errorf("%s %+v meets %s %+v", what[i], boxes[i], what[k], boxes[k])
					}
				}
			}
			// Every rated flagged member is labelled, or numbered in the key; no unrated one is.
			shown := map[string]int{}
			for _, l := range e.Labels {
				if strings.Contains(l.Text, "—") {
					t.Errorf("label %q: unrated members carry no label", l.Text)
				}
				shown[strings.Fields(l.Text)[0]]++
			}
			numbered := 0
			for _, k := range e.Key {
				shown[strings.Fields(k.Text)[0]]++
				if k.Number != "" {
					numbered++
				}
			}
			for label := range ms {
				want := 1
				if unrated[label] {
					want = 0
				}
				if shown[label] != want {
					t.Errorf("member %s shown %d times, want %d", label, shown[label], want)
				}
			}
			// Numbers in the drawing stand for key entries one for one.
			nums := 0
			for _, l := range e.Labels {
				if !strings.Contains(l.Text, " ") {
					nums++
				}
			}
			if nums != numbered {
				t.Errorf("%d numbers in the drawing, %d numbered key entries", nums, numbered)
			}
			t.Logf("%d labels, %d in the key", len(e.Labels)-nums, len(e.Key))
		})
	}
}

func TestUnratedMembersUnlabelled(t *testing.T) {
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	if err != nil {
		t.Fatal(err)
	}
	rf := 0.93
	ms := map[string]Member{}
	for _, mb := range tr.Members {
		ms[mb.Label] = Member{Label: mb.Label, Flags: []string{"no-capacity"}}
	}
	flagged := tr.Members[3].Label
	ms[flagged] = Member{Label: flagged, Flags: []string{"exceeds"}, RFProposed: &rf}
	e := drawElevation(tr, Run{Flag: 1, Review: 1.1}, ms, units.SI)
	want := flagged + " 0.93"
	if len(e.Labels) != 1 || e.Labels[0].Text != want || len(e.Key) != 0 {
		t.Fatalf("labels %+v, key %+v; want the one label %q", e.Labels, e.Key, want)
	}
	// The unrated members are drawn in the legend's unrated style instead.
	unrated := bands(Run{Flag: 1, Review: 1.1})[4]
	for _, m := range e.Members {
		if m.Label != flagged && (m.Band != unrated.Key || m.Dash != unrated.Dash) {
			t.Errorf("member %s drawn in band %q dash %q, want the unrated style", m.Label, m.Band, m.Dash)
		}
	}
}

func TestInfluenceLineAxisLabels(t *testing.T) {
	xs := []float64{0, 6, 12, 18, 24}
	eta := []float64{0, 0.75, 0.5, 0.25, 0}
	c := drawIL("m", "U1-U2", 24, xs, eta, onBridge{}, true, 0, false, units.SI, false)
	if c.XLabel.Text != "position from left bearing x (m)" || c.YLabel.Text != "η (kN/kN)" {
		t.Errorf("axis labels %q and %q", c.XLabel.Text, c.YLabel.Text)
	}
	// Below the tick values and inside the drawing.
	if c.XLabel.Y <= c.Ticks[0].Y || c.XLabel.Y > c.H {
		t.Errorf("x axis label at y = %g, ticks at %g, drawing %g high", c.XLabel.Y, c.Ticks[0].Y, c.H)
	}
	// A stringer's line over one panel of a long span, with its section point 0.1 m from the
	// panel's end: the two positions' labels would overlap, so one is left out, and no two
	// labels stand closer than minTickGap.
	xs = []float64{0, 48, 56.2, 56.3, 120}
	c = drawIL("m", "S1-9:M", 120, xs, []float64{0, 0, 0.5, 0, 0}, onBridge{}, true, 0, false, units.SI, true)
	if len(c.Ticks) != len(xs)-1 {
		t.Errorf("%d labelled positions, want %d: %+v", len(c.Ticks), len(xs)-1, c.Ticks)
	}
	for k := 1; k < len(c.Ticks); k++ {
		if c.Ticks[k].X-c.Ticks[k-1].X < minTickGap {
			t.Errorf("labels %q and %q only %.1f px apart", c.Ticks[k-1].Text, c.Ticks[k].Text, c.Ticks[k].X-c.Ticks[k-1].X)
		}
	}
}

// TestCrowdedPageKey renders the page of a 16-panel truss whose every member is weak: the
// labels that find no room are listed in the key below the drawing, each once, numbered as in
// the drawing.
func TestCrowdedPageKey(t *testing.T) {
	b := withCapacities(t, invented{
		Bridge: screening.Bridge{ID: "NER-90016", Truss: truss.Params{Type: "pratt", SpanM: 96, Panels: 16, DepthM: 10}, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 20},
		Name:   "Hollin Gill Viaduct", Line: "Northmoor Main Line", ChainageKm: 40.1,
	}, 0.9)
	f := screenFleet(t, []invented{b})
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	page := readFile(t, filepath.Join(dir, "bridge-NER-90016.html"))
	key := regexp.MustCompile(`(?s)<ol class="label-key"[^>]*>(.*?)</ol>`).FindStringSubmatch(page)
	if key == nil {
		t.Fatal("no key below the crowded drawing")
	}
	entries := regexp.MustCompile(`<li>(?:<b>(\d+)</b> )?(\S+) \d+\.\d\d</li>`).FindAllStringSubmatch(key[1], -1)
	labels := regexp.MustCompile(`<text class="mlabel"[^>]*>([^<]*)</text>`).FindAllStringSubmatch(page, -1)
	inDrawing := map[string]bool{}
	for _, l := range labels {
		inDrawing[l[1]] = true
	}
	if len(entries) == 0 {
		t.Fatalf("key %q lists no member", key[1])
	}
	for _, e := range entries {
		if e[1] != "" && !inDrawing[e[1]] {
			t.Errorf("key entry %s for %s: no number %s in the drawing", e[1], e[2], e[1])
		}
		for l := range inDrawing {
			if strings.HasPrefix(l, e[2]+" ") {
				t.Errorf("%s is both labelled (%q) and in the key", e[2], l)
			}
		}
	}
	if !strings.Contains(page, "the member is listed below the drawing") {
		t.Error("the caption does not explain the numbers")
	}
}
