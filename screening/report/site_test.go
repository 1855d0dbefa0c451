package report

import (
	"errors"
	"html"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// smallFleet is three invented bridges: a Pratt whose members carry only 95 % of today's
// demand (flagged), a Warren with ample capacity (not flagged), and a Pratt with an odd
// number of panels, which the geometry refuses (failed).
func smallFleet(t testing.TB) *fixture {
	t.Helper()
	weak := pratt48(t, "NER-90001", "Tarnbeck Viaduct", 0.95)
	strong := withCapacities(t, invented{
		Bridge: screening.Bridge{ID: "NER-90002", Truss: truss.Params{Type: "warren", SpanM: 31.5, Panels: 7, DepthM: 4.5}, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 12},
		Name:   "Cold Sike Bridge", Line: "Eastfell Valley Branch", ChainageKm: 3.2,
	}, 3)
	bad := invented{
		Bridge: screening.Bridge{ID: "NER-90003", Truss: truss.Params{Type: "pratt", SpanM: 35, Panels: 7, DepthM: 5}, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 12},
		Name:   "Odd Panel Bridge", Line: "Quarnmoss Loop", ChainageKm: 9.9,
	}
	return screenFleet(t, []invented{weak, strong, bad})
}

func readFile(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

var (
	tbodyRow  = regexp.MustCompile(`(?s)<tr[^>]*data-bridge="([^"]*)"[^>]*>(.*?)</tr>`)
	calcRow   = regexp.MustCompile(`(?s)<tr class="(gov)?" data-scenario="(\w+)" data-sense="(\w+)">(.*?)</tr>`)
	cell      = regexp.MustCompile(`(?s)<td[^>]*>(.*?)</td>`)
	sectionRe = regexp.MustCompile(`(?s)<section class="member" id="[^"]*" data-member="([^"]*)">(.*?)</section>`)
	memRow    = regexp.MustCompile(`(?s)<tr data-member="([^"]*)">(.*?)</tr>`)
	tagRe     = regexp.MustCompile(`<[^>]*>`)
)

func cells(s string) []string {
	var out []string
	for _, m := range cell.FindAllStringSubmatch(s, -1) {
		out = append(out, strings.TrimSpace(html.UnescapeString(tagRe.ReplaceAllString(m[1], ""))))
	}
	return out
}

// parseNum reads a number as the report prints it (− for minus, + allowed).
func parseNum(t *testing.T, s string) float64 {
	t.Helper()
	s = strings.ReplaceAll(strings.TrimPrefix(s, "+"), "−", "-")
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("not a number: %q", s)
	}
	return v
}

func TestIndexRows(t *testing.T) {
	f := smallFleet(t)
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	index := readFile(t, filepath.Join(dir, "index.html"))
	rows := tbodyRow.FindAllStringSubmatch(index, -1)
	if len(rows) != len(f.Rows) {
		t.Fatalf("index has %d bridge rows, want %d", len(rows), len(f.Rows))
	}
	for i, r := range rows {
		want := f.Rows[i]
		if r[1] != want.BridgeID {
			t.Errorf("row %d is %s, want %s (rank order)", i, r[1], want.BridgeID)
		}
		link := regexp.MustCompile(`href="([^"]+)"`).FindStringSubmatch(r[2])
		switch {
		case hasPage(want) && link == nil:
			t.Errorf("%s is flagged (%v) but has no link", want.BridgeID, want.Flags)
		case hasPage(want):
			if _, err := os.Stat(filepath.Join(dir, link[1])); err != nil {
				t.Errorf("%s links to %s: %v", want.BridgeID, link[1], err)
			}
		case link != nil:
			t.Errorf("%s is not flagged but links to %s", want.BridgeID, link[1])
		}
		if want.Error != "" && !strings.Contains(html.UnescapeString(r[2]), want.Error) {
			t.Errorf("failed bridge %s: row does not show its error %q", want.BridgeID, want.Error)
		}
	}
	if !strings.Contains(index, html.EscapeString(Caution[0])) {
		t.Error("index lacks the caution")
	}
	pages, _ := filepath.Glob(filepath.Join(dir, "bridge-*.html"))
	if len(pages) != f.Run.BridgesFlagged || f.Run.BridgesFlagged != 1 {
		t.Errorf("%d bridge pages for %d flagged bridges; want 1 of each", len(pages), f.Run.BridgesFlagged)
	}
}

// TestRatingArithmetic reads the numbers a bridge page prints and checks them against
// formulas written here: the working-stress rating equation RF = (C − D)/(L(1 + I))
// (DOMAIN.md), the dead-load chord force by the method of sections, and EN 1991-2's Phi3.
func TestRatingArithmetic(t *testing.T) {
	f := smallFleet(t)
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	in := f.Inputs["NER-90001"]
	page := readFile(t, filepath.Join(dir, "bridge-NER-90001.html"))
	if !strings.Contains(page, html.EscapeString(Caution[0])) {
		t.Error("bridge page lacks the caution")
	}

	// EN 1991-2 6.4.5.2 (from memory): Phi3 = 2.16/(sqrt(L) − 0.2) + 0.73 for L = 48 m.
	phi3 := 2.16/(math.Sqrt(48)-0.2) + 0.73
	checked := 0
	for _, s := range sectionRe.FindAllStringSubmatch(page, -1) {
		label := s[1]
		inv := in.Members[label]
		for _, r := range calcRow.FindAllStringSubmatch(s[2], -1) {
			scenario, sense := r[2], r[3]
			c := cells(r[4])
			// traffic, sense, basis, held, cond, C, D, L, 1+I, RF
			if len(c) != 10 {
				t.Fatalf("%s: calc row has %d cells: %q", label, len(c), c)
			}
			held, cond, C, D, L, imp, rf := parseNum(t, c[3]), parseNum(t, c[4]), parseNum(t, c[5]), parseNum(t, c[6]), parseNum(t, c[7]), parseNum(t, c[8]), parseNum(t, c[9])
			wantHeld := inv.CapacityTension
			if sense == "compression" {
				wantHeld = inv.CapacityCompression
			}
			if math.Abs(held-wantHeld) > 0.05 || cond != inv.ConditionFactor {
				t.Errorf("%s %s %s: held %v × %v, inventory %v × %v", label, scenario, sense, held, cond, wantHeld, inv.ConditionFactor)
			}
			if math.Abs(C-held*cond) > 0.1 {
				t.Errorf("%s %s %s: C %v, want held × condition = %v", label, scenario, sense, C, held*cond)
			}
			// The hangers L1-U1 and L7-U7 carry one floor beam each: with the truss spacing not
			// known, their determinant length is the longer adjacent panel, 6 m
			// (screening/dynamic.go after EN 1991-2 Table 6.2, from memory).
			wantImp := phi3
			if label == "L1-U1" || label == "L7-U7" {
				wantImp = 2.16/(math.Sqrt(6)-0.2) + 0.73
			}
			if math.Abs(imp-wantImp) > 0.0005 {
				t.Errorf("%s %s: 1 + I = %v, want Phi3 = %.4f", label, scenario, imp, wantImp)
			}
			// The printed inputs are rounded to 0.1 kN (±0.05 each in C, D and L); the RF
			// they give agrees with the printed one within that rounding and its own.
			want := (C - D) / (L * imp)
			tol := 0.0051 + 0.1/(L*imp) + math.Abs(want)*0.05/L
			if math.Abs(rf-want) > tol {
				t.Errorf("%s %s %s: printed RF %v, (C − D)/(L(1 + I)) = (%v − %v)/(%v × %v) = %.4f", label, scenario, sense, rf, C, D, L, imp, want)
			}
			checked++
		}
	}
	if checked < 4 {
		t.Fatalf("checked %d rating rows; the weak bridge should flag several members", checked)
	}

	// Method of sections (common practice): in panel L3-L4 of a Pratt truss the moment centre
	// of the bottom chord is U3, so N = M(x = 18 m)/h with M = w x (L − x)/2 under the uniform
	// dead load w.
	w, span, h, x := in.DeadLoadKNPerM, 48.0, 6.0, 18.0
	wantD := w * x * (span - x) / 2 / h
	found := false
	for _, r := range memRow.FindAllStringSubmatch(page, -1) {
		if r[1] != "L3-L4" {
			continue
		}
		found = true
		if d := parseNum(t, cells(r[2])[2]); math.Abs(d-wantD) > 0.051 {
			t.Errorf("L3-L4 dead-load force printed %v kN, method of sections %v kN", d, wantD)
		}
	}
	if !found {
		t.Error("members table has no L3-L4")
	}
}

func TestEscapesInventoryText(t *testing.T) {
	const (
		name = `<script>alert(1)</script>`
		line = `"><img src=x onerror=alert(2)>`
		id   = `NER-<b>9</b>`
	)
	b := pratt48(t, id, name, 0.9)
	b.Line = line
	f := screenFleet(t, []invented{b})
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	pages, _ := filepath.Glob(filepath.Join(dir, "*.html"))
	if len(pages) != 2 {
		t.Fatalf("want index and one bridge page, got %v", pages)
	}
	for _, p := range pages {
		if strings.ContainsAny(filepath.Base(p), "<>/\"") {
			t.Errorf("page file name %q carries markup from the bridge ID", filepath.Base(p))
		}
		s := readFile(t, p)
		for _, raw := range []string{"<script>alert", "<img", "<b>9"} {
			if strings.Contains(s, raw) {
				t.Errorf("%s holds the raw text %q", filepath.Base(p), raw)
			}
		}
		for _, text := range []string{name, id} {
			if !strings.Contains(s, html.EscapeString(text)) {
				t.Errorf("%s does not show %q as text", filepath.Base(p), text)
			}
		}
	}
	var sb strings.Builder
	b2 := f.Bridges[id]
	b2.Row.Name = "Esc\x1b[31mape\x07 Bridge"
	if err := Explain(&sb, f.Run, b2, "L3-L4"); err != nil {
		t.Fatal(err)
	}
	if strings.ContainsAny(sb.String(), "\x1b\x07") || !strings.Contains(sb.String(), "Esc[31mape Bridge") {
		t.Errorf("explanation passes control characters through: %q", strings.SplitN(sb.String(), "\n", 2)[0])
	}
}

// bidiControls are the bidirectional embedding, override and isolate characters
// U+202A–U+202E and U+2066–U+2069 (common practice: Unicode UAX #9, the characters that
// reorder the text after them).
const bidiControls = "\u202A\u202B\u202C\u202D\u202E\u2066\u2067\u2068\u2069"

// TestIsolatesBidiText shows that a right-to-left override in inventory text does not act on
// the page: every such character is written as a visible escape, and the names stand in
// <bdi> elements.
func TestIsolatesBidiText(t *testing.T) {
	const (
		name    = "Mill Lane \u202Eexe.1 FR"
		shown   = "Mill Lane ‹U+202E›exe.1 FR"
		line    = "Quarnmoss \u2067Loop\u2069"
		shownLn = "Quarnmoss ‹U+2067›Loop‹U+2069›"
		id      = "NER-9\u202E0001"
	)
	b := pratt48(t, id, name, 0.9)
	b.Line = line
	f := screenFleet(t, []invented{b})
	f.Run.Scenarios = map[string][]string{"existing": demoTrains["existing"], "proposed": {"Fell \u202Dfreight"}}
	d := f.Bridges[id]
	d.Members = append([]Member(nil), d.Members...)
	label := d.Members[0].Label
	d.Members[0].Label += "\u202E"
	f.Bridges[id] = d
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	pages, _ := filepath.Glob(filepath.Join(dir, "*.html"))
	if len(pages) != 2 {
		t.Fatalf("want index and one bridge page, got %v", pages)
	}
	title := regexp.MustCompile(`(?s)<title>.*?</title>`)
	for _, p := range pages {
		page := readFile(t, p)
		if i := strings.IndexAny(page, bidiControls); i >= 0 {
			t.Errorf("%s holds a raw bidirectional control near %q", filepath.Base(p), page[max(0, i-40):min(len(page), i+40)])
		}
		// The <title> cannot hold elements; everywhere else the name and the line are
		// isolated.
		body := title.ReplaceAllString(page, "")
		for _, text := range []string{shown, shownLn} {
			all, isolated := strings.Count(body, text), strings.Count(body, "<bdi>"+text+"</bdi>")
			if all == 0 || all != isolated {
				t.Errorf("%s shows %q %d times, %d of them in <bdi>", filepath.Base(p), text, all, isolated)
			}
		}
	}
	bridgePages, _ := filepath.Glob(filepath.Join(dir, "bridge-*.html"))
	if len(bridgePages) != 1 {
		t.Fatalf("bridge pages %v", bridgePages)
	}
	rows := memRow.FindAllStringSubmatch(readFile(t, bridgePages[0]), -1)
	if len(rows) == 0 {
		t.Fatal("the bridge page has no member rows")
	}
	// Rows are in order of severity, so look for the member's row among them.
	labelCell := regexp.MustCompile(`^\s*<td><bdi>(<a [^>]*>)?` + regexp.QuoteMeta(label+"‹U+202E›") + `(</a>)?</bdi></td>`)
	found := false
	for _, r := range rows {
		found = found || labelCell.MatchString(r[2])
	}
	if !found {
		t.Errorf("the member label with an override is not escaped and in <bdi> in any row: %q", rows[0][2])
	}
	index := readFile(t, filepath.Join(dir, "index.html"))
	if !strings.Contains(index, "<bdi>Fell ‹U+202D›freight</bdi>") {
		t.Errorf("index does not show the train name escaped and isolated")
	}

	// The terminal explanation escapes the override too.
	var sb strings.Builder
	if err := Explain(&sb, f.Run, f.Bridges[id], "L3-L4"); err != nil {
		t.Fatal(err)
	}
	if strings.ContainsAny(sb.String(), bidiControls) || !strings.Contains(sb.String(), shown) {
		t.Errorf("explanation: %q", strings.SplitN(sb.String(), "\n", 2)[0])
	}
}

func TestWriteSiteReplacesOnlyItsOwn(t *testing.T) {
	f := smallFleet(t)
	parent := t.TempDir()

	foreign := filepath.Join(parent, "notes")
	if err := os.MkdirAll(foreign, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(foreign, "mine.txt"), []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := WriteSite(foreign, f.Run, f.Rows, f.bridge); err == nil || !strings.Contains(err.Error(), foreign) {
		t.Errorf("writing over a folder of other files: got %v, want an error naming it", err)
	}
	if readFile(t, filepath.Join(foreign, "mine.txt")) != "keep" {
		t.Error("the other files were touched")
	}

	dir := filepath.Join(parent, "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	before := readFile(t, filepath.Join(dir, "index.html"))

	// A loader that fails leaves the previous report as it was and no temporary folder.
	boom := errors.New("connection lost")
	err := WriteSite(dir, f.Run, f.Rows, func(string) (Bridge, error) { return Bridge{}, boom })
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), "NER-90001") {
		t.Errorf("failing loader: got %v, want it wrapped with the bridge ID", err)
	}
	if readFile(t, filepath.Join(dir, "index.html")) != before {
		t.Error("a failed write changed the previous report")
	}
	entries, _ := os.ReadDir(parent)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("left behind %s", e.Name())
		}
	}

	// A new run with nothing flagged replaces the report whole: the old page goes.
	clean := make([]BridgeRow, len(f.Rows))
	for i, r := range f.Rows {
		r.Flags = nil
		clean[i] = r
	}
	if err := WriteSite(dir, f.Run, clean, f.bridge); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "bridge-NER-90001.html")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the previous report's bridge page is still there: %v", err)
	}
}

// TestSiteImperial writes the report in ft and kip: headings name the units, and the span
// and the dead-load forces are the SI ones divided by the exact factors, rounded to 0.1.
func TestSiteImperial(t *testing.T) {
	f := smallFleet(t)
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSiteIn(dir, f.Run, f.Rows, f.bridge, units.Imperial); err != nil {
		t.Fatal(err)
	}
	index := readFile(t, filepath.Join(dir, "index.html"))
	// exact definition: 48 m / 0.3048 = 157.48 ft, 31.5 m = 103.35 ft; rounded to 0.1 ft.
	for _, s := range []string{"span ft", ">157.5<", ">103.3<", "lengths in ft", Caution[0]} {
		if !strings.Contains(index, s) {
			t.Errorf("imperial index lacks %q", s)
		}
	}
	link := regexp.MustCompile(`href="(bridge-[^"]+)"`).FindStringSubmatch(index)
	if link == nil {
		t.Fatal("no bridge page linked")
	}
	page := readFile(t, filepath.Join(dir, link[1]))
	for _, s := range []string{"D kip", "held kip", "157.5 ft", "kip/ft per truss", Caution[0]} {
		if !strings.Contains(page, s) {
			t.Errorf("imperial bridge page lacks %q", s)
		}
	}
	b := f.Bridges[f.Rows[0].BridgeID]
	rows := memRow.FindAllStringSubmatch(page, -1)
	if !strings.Contains(page, b.Row.BridgeID) || len(rows) != len(b.Members) {
		t.Fatalf("bridge page of %s: %d member rows, want %d", b.Row.BridgeID, len(rows), len(b.Members))
	}
	for _, r := range rows {
		c := cells(r[2])
		m := b.Members[b.indexOf(r[1])]
		// exact definition: 1 kip = 4.4482216 kN; D rounded to 0.1 kip.
		if got, want := parseNum(t, c[2]), m.DeadKN/4.4482216; math.Abs(got-want) > 0.05+1e-9 {
			t.Errorf("%s: D %v kip, want %.3f (%v kN)", r[1], got, want, m.DeadKN)
		}
	}
}
