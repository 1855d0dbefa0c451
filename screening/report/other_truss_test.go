package report

import (
	"bytes"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening"
)

// TestBothTrussesOnTheBridgePage: one track 0.6 m towards truss A, trusses 5.2 m apart, so
// A carries 1/2 + 0.6/5.2 of the train and B 1/2 - 0.6/5.2 (lever rule, common practice).
// With the same capacities on both trusses A governs every member the train loads, and B's
// proposed RF is higher. The page lists, under the elevation, the members whose two RF differ
// by 0.005 or more with B's RF as screened; explain prints it.
func TestBothTrussesOnTheBridgePage(t *testing.T) {
	b := pratt48(t, "NER-E1", "Eccleshaw <Skew> Bridge", 1.3)
	b.TrussShare, b.Tracks, b.TrussSpacingM, b.TrackOffsetsM = 0, 0, 5.2, []float64{0.6}
	f := screenFleet(t, []invented{b})
	res := screening.ScreenBridge(b.Bridge, f.Settings)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	other := map[string]*screening.OtherTruss{}
	for _, m := range res.Members {
		other[m.Label] = m.Other
	}
	br := f.Bridges["NER-E1"]
	v := bridgePage(f.Run, br, units.SI)
	if len(v.Trusses) == 0 {
		t.Fatal("no member listed where the trusses differ")
	}
	for _, r := range v.Trusses {
		o := other[r.Label]
		if o == nil || r.Governs != "A" || o.Truss != "B" || r.B != rfText(&o.RFProposed) {
			t.Errorf("%s: row %+v, screened other truss %+v", r.Label, r, o)
			continue
		}
		a := mustFloat(r.A)
		// lever rule: B carries the smaller share, so its RF is the higher one
		if bb := mustFloat(r.B); !(bb-a >= 0.005-1e-9) {
			t.Errorf("%s: A %s, B %s; want B higher by 0.005 or more", r.Label, r.A, r.B)
		}
	}
	var page bytes.Buffer
	if err := pages.ExecuteTemplate(&page, "bridge.tmpl", v); err != nil {
		t.Fatal(err)
	}
	html := page.String()
	if !strings.Contains(html, "Where the two main trusses differ") || !strings.Contains(html, `<tr data-member="`+v.Trusses[0].Label+`">`) {
		t.Error("the page lacks the table of the trusses that differ")
	}
	if strings.Contains(html, "<Skew>") {
		t.Error("the bridge's name reached the page unescaped")
	}
	var ex bytes.Buffer
	if err := ExplainIn(&ex, f.Run, br, v.Trusses[0].Label, units.SI); err != nil {
		t.Fatal(err)
	}
	if want := "on truss B, which does not govern: RF existing"; !strings.Contains(ex.String(), want) || !strings.Contains(ex.String(), "proposed "+v.Trusses[0].B) {
		t.Errorf("explain lacks the other truss's RF:\n%s", ex.String())
	}
	// One track on the centre line loads both trusses alike: one truss screened, no table.
	sym := screenFleet(t, []invented{pratt48(t, "NER-S1", "Symmetry Bridge", 1.3)})
	if v := bridgePage(sym.Run, sym.Bridges["NER-S1"], units.SI); len(v.Trusses) != 0 {
		t.Errorf("a symmetric bridge lists trusses that differ: %+v", v.Trusses)
	}
}

func mustFloat(s string) float64 {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return math.NaN()
	}
	return v
}
