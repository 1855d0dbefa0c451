package main

import (
	"context"
	"encoding/csv"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// The tests here give the commands inventory text made to act on its reader: formulas for a
// spreadsheet, control sequences and bidirectional overrides for a terminal.

// bidiControls are the bidirectional embedding, override and isolate characters
// U+202A–U+202E and U+2066–U+2069 (common practice: Unicode UAX #9, the characters that
// reorder the text after them).
const bidiControls = "\u202A\u202B\u202C\u202D\u202E\u2066\u2067\u2068\u2069"

// Names that act on a terminal (common practice, ECMA-48): a colour code (ESC [ 31 m), a
// title-setting OSC sequence (ESC ] 0 ; … BEL), backspaces, a carriage return, DEL, the C1
// CSI (U+009B), and a right-to-left override that shows "exe.1 FR" as "RF 1.exe".
const (
	colourName = "Esc\x1b[31mRed\x1b[0m Viaduct \u202Eexe.1 FR\u009b2J\x7f"
	titleName  = "Title\x1b]0;owned\x07 Bridge\b\b\r \u202Eexe.1 FR"
	bellLine   = "Fell\x07 Line \u2067Loop\u2069"
)

// longName is longer than a terminal table shows: the table shows its first 59 runes and an
// ellipsis.
var longName = "Long " + strings.Repeat("Ω", 200)

// checkTerminal fails when out holds what a terminal acts on: a byte that is not UTF-8, a
// control character other than the line feed (C0, DEL, C1), or a bidirectional control.
func checkTerminal(t *testing.T, what, out string) {
	t.Helper()
	if !utf8.ValidString(out) {
		t.Errorf("%s: output is not UTF-8", what)
	}
	for i, r := range out {
		if r != '\n' && (r < 0x20 || r == 0x7f || r >= 0x80 && r < 0xa0) || strings.ContainsRune(bidiControls, r) {
			t.Errorf("%s: %U at byte %d, in %q", what, r, i, out[max(0, i-30):min(len(out), i+30)])
			return
		}
	}
}

// checkShown fails unless out shows each text.
func checkShown(t *testing.T, what, out string, texts ...string) {
	t.Helper()
	for _, s := range texts {
		if !strings.Contains(out, s) {
			t.Errorf("%s does not show %q:\n%s", what, s, out)
		}
	}
}

// TestTerminalTablesHostileText prints the tables of rank, runs diff and bridges list from
// rows whose every text field is hostile, the member label among them.
func TestTerminalTablesHostileText(t *testing.T) {
	rf := func(v float64) *float64 { return &v }
	rows := []report.BridgeRow{
		{Rank: 1, BridgeID: "C-\x1b[2J1", Name: colourName, Line: bellLine, TrussType: "pratt", SpanM: 48, Panels: 8,
			WorstMember: "L2-L3\x1b]0;t\x07\u202E", RFExisting: rf(3.2), RFProposed: rf(0.8), Flags: []string{"exceeds"},
			GoverningTrain: "Axle \u202E400\x1b[5m", GoverningSense: "tension", GoverningDirection: "left-to-right", GoverningHeadM: rf(12.5),
			LastInspected: "2029-06-01", Status: "done"},
		{Rank: 2, BridgeID: "C-2", Name: longName, Line: "Quarnmoss Loop", TrussType: "pratt", SpanM: 48, Status: "done"},
		{Rank: 3, BridgeID: "X-1", Name: titleName, Status: "failed", Error: "geometry: \x1b[31m" + strings.Repeat("reason ", 20)},
	}
	var rank strings.Builder
	if err := printRanked(&rank, store.Run{ID: 2, Status: "completed", StartedAt: time.Date(2031, 3, 4, 1, 0, 0, 0, time.UTC)}, rows, units.SI); err != nil {
		t.Fatal(err)
	}
	checkTerminal(t, "rank", rank.String())
	checkShown(t, "rank", rank.String(), "L2-L3]0;t‹U+202E›", "Esc[31mRed[0m Viaduct ‹U+202E›exe.1 FR2J", "Axle ‹U+202E›400[5m",
		"Fell Line ‹U+2067›Loop‹U+2069›", "Long "+strings.Repeat("Ω", 54)+"…", "cut short")
	if strings.Contains(rank.String(), strings.Repeat("Ω", 55)) {
		t.Errorf("rank shows more than %d runes of a long name", 60)
	}

	var diff strings.Builder
	changes := []store.BridgeChange{
		{BridgeID: "X-1\x1b[2J", Name: titleName, RankA: nil, RankB: new(3), StatusA: "failed", StatusB: "done", FlagsB: []string{"no-capacity"}},
		{BridgeID: "C-2", Name: longName, RankA: new(2), RankB: new(1), RFA: rf(1.2), RFB: rf(0.9), StatusA: "done", StatusB: "done"},
	}
	if err := printDiff(&diff, [2]int64{1, 2}, changes); err != nil {
		t.Fatal(err)
	}
	checkTerminal(t, "runs diff", diff.String())
	checkShown(t, "runs diff", diff.String(), "Title]0;owned Bridge  ‹U+202E›exe.1 FR", "X-1[2J", "Long "+strings.Repeat("Ω", 54)+"…")

	var list strings.Builder
	bs := []store.BridgeSummary{
		{Bridge: store.Bridge{BridgeID: "C-1", Name: colourName, Line: bellLine, TrussType: "pratt", SpanM: 48, Panels: 8, DepthM: 6, Deck: "through"}},
		{Bridge: store.Bridge{BridgeID: "C-2", Name: longName, TrussType: "pratt", SpanM: 48, Panels: 8, DepthM: 6, Deck: "through"}},
	}
	if err := bridgesTable(&list, bs, units.SI); err != nil {
		t.Fatal(err)
	}
	checkTerminal(t, "bridges list", list.String())
	checkShown(t, "bridges list", list.String(), "‹U+202E›exe.1 FR", "Long "+strings.Repeat("Ω", 54)+"…")
}

// TestHostileInventoryThroughCommands stores an inventory of hostile text (through the
// store, so that the check holds whatever the importer comes to accept), screens it twice,
// and reads every output a person or a spreadsheet reads.
func TestHostileInventoryThroughCommands(t *testing.T) {
	url := pgtest.URL(t)
	dir := t.TempDir()
	ctx := context.Background()
	db, err := (&app{cfg: Config{Database: DatabaseConfig{URL: url}}}).openDatabase(ctx)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()

	// Every bridge is the Pratt truss of TestEndToEnd (span 48 m, 8 panels, depth 6 m, 10 kN/m
	// dead load per truss), so its hand-worked values hold: for F-1's L2-L3 with C = 600 kN,
	// D = 360 kN, L = 75 kN existing and 300 kN proposed, RF = (C − D)/L = 3.2 and 0.8, a
	// change of 0.8/3.2 − 1 = −75 %; L3-U3 carries D = −30 kN.
	formulas := map[string]string{ // bridge ID: name, spreadsheet formulas (common practice, OWASP CSV injection)
		"F-1": `=HYPERLINK("http://x.invalid")`,
		"F-2": `+cmd|' /C calc'!A0`,
		"F-3": "@SUM(A1)",
		"F-4": "-1+2",
		"F-5": "\tTabbed Viaduct",
	}
	var bridges []store.Bridge
	pratt := func(id, name, line string, panels int) store.Bridge {
		return store.Bridge{BridgeID: id, Name: name, Line: line, TrussType: "pratt", SpanM: 48, Panels: panels, DepthM: 6,
			Deck: "through", Trusses: 2, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 10}
	}
	for id, name := range formulas {
		bridges = append(bridges, pratt(id, name, "@Line "+id, 8))
	}
	bridges = append(bridges,
		pratt("-F-6", "Plain Bridge", "\rCR Line", 8),
		pratt("C-1", colourName, bellLine, 8),
		pratt("C-\x1b[2J2", longName, "Quarnmoss Loop", 8),
		// An odd number of panels fails the Pratt geometry: X-1 is not screened in run 1.
		pratt("X-1", titleName, "Quarnmoss Loop", 7),
	)
	storeRows(t, db, store.KindBridges, bridges)
	geometry, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	if err != nil {
		t.Fatal(err)
	}
	var members []store.Member
	for _, l := range geometry.Labels() {
		c := 100000.0
		if l == "L2-L3" {
			c = 600
		}
		members = append(members, store.Member{BridgeID: "F-1", Member: l, CapacityTensionKN: &c, CapacityCompressionKN: &c, ConditionFactor: 1})
	}
	storeRows(t, db, store.KindMembers, members)
	writeTestFile(t, dir, "trains/axle100.yaml", axleTrain("Axle \u202E100", 100))
	writeTestFile(t, dir, "trains/axle400.yaml", axleTrain("=Axle 400", 400))
	if out, err := runCmd(t, "--database-url", url, "import", "trains", filepath.Join(dir, "trains")); err != nil {
		t.Fatalf("import trains: %v\n%s", err, out)
	}
	cfg := writeTestFile(t, dir, "trussfleet.yaml", "scenarios:\n  existing:\n    trains: [axle100]\n  proposed:\n    trains: [axle400]\ndynamic: none\n")
	run := func(args ...string) string {
		t.Helper()
		out, err := runCmd(t, append([]string{"--database-url", url, "--config", cfg}, args...)...)
		if err != nil && !(args[0] == "screen" && strings.Contains(err.Error(), "could not be screened")) {
			t.Fatalf("%s: %v\n%s", strings.Join(args, " "), err, out)
		}
		return out
	}

	screen1 := run("screen", "--workers", "2")
	fixed := pratt("X-1", titleName, "Quarnmoss Loop", 8)
	storeRows(t, db, store.KindBridges, []store.Bridge{fixed})
	screen2 := run("screen", "--workers", "2")
	long := "Long " + strings.Repeat("Ω", 54) + "…"
	for _, c := range []struct {
		what, out string
		shown     []string
	}{
		{"screen (run 1) summary", screen1, []string{"Esc[31mRed[0m Viaduct ‹U+202E›exe.1 FR2J", long, "Title]0;owned Bridge  ‹U+202E›exe.1 FR"}},
		{"screen (run 2) summary", screen2, []string{"Esc[31mRed[0m Viaduct ‹U+202E›exe.1 FR2J", long}},
		{"rank", run("rank"), []string{"Esc[31mRed[0m Viaduct ‹U+202E›exe.1 FR2J", long, "Fell Line ‹U+2067›Loop‹U+2069›", "C-[2J2"}},
		{"runs show", run("runs", "show", "1"), []string{"Axle ‹U+202E›100", "Title]0;owned Bridge  ‹U+202E›exe.1 FR"}},
		{"runs diff", run("runs", "diff"), []string{"Title]0;owned Bridge  ‹U+202E›exe.1 FR"}},
		{"bridges list", run("bridges", "list"), []string{"Esc[31mRed[0m Viaduct ‹U+202E›exe.1 FR2J", long}},
		{"explain", run("explain", "C-1", "L2-L3"), []string{"Esc[31mRed[0m Viaduct ‹U+202E›exe.1 FR2J", "Axle ‹U+202E›100"}},
	} {
		checkTerminal(t, c.what, c.out)
		checkShown(t, c.what, c.out, c.shown...)
		if strings.Contains(c.out, strings.Repeat("Ω", 60)) {
			t.Errorf("%s shows the long name whole", c.what)
		}
	}

	out := filepath.Join(dir, "out")
	run("export", "--format", "csv", "--out", out)
	br := readExport(t, filepath.Join(out, "priority-bridges.csv"))
	ms := readExport(t, filepath.Join(out, "priority-members.csv"))
	byID := map[string]map[string]string{}
	for _, r := range br {
		byID[r["bridge_id"]] = r
	}
	for id, name := range formulas {
		r := byID[id]
		if r["name"] != "'"+name || r["line"] != "'@Line "+id {
			t.Errorf("%s exported as name %q, line %q; want each after a quote", id, r["name"], r["line"])
		}
	}
	if byID["'-F-6"] == nil || byID["'-F-6"]["line"] != "'\rCR Line" {
		t.Errorf("bridge -F-6 not exported with its ID and line after a quote: %v", br)
	}
	f1 := byID["F-1"]
	if f1["governing_train"] != "'=Axle 400" || f1["rf_change_pct"] != "-75.0" || f1["rf_proposed"] != "0.8000" {
		t.Errorf("F-1: governing train %q, RF change %q, proposed RF %q; want '=Axle 400, -75.0 and 0.8000 (worked by hand above)",
			f1["governing_train"], f1["rf_change_pct"], f1["rf_proposed"])
	}
	negative := 0
	for _, rows := range [][]map[string]string{br, ms} {
		for _, r := range rows {
			for col, v := range r {
				if !numericColumns[col] || v == "" {
					continue
				}
				if f, err := strconv.ParseFloat(v, 64); err != nil {
					t.Errorf("%s %s = %q: a numeric cell that is not a number", r["bridge_id"], col, v)
				} else if f < 0 {
					negative++
				}
			}
		}
	}
	deadL3U3 := ""
	for _, m := range ms {
		if m["bridge_id"] == "F-1" && m["member"] == "L3-U3" {
			deadL3U3 = m["dead_kn"]
		}
		if id := m["bridge_id"]; formulas[id] != "" && m["name"] != "'"+formulas[id] {
			t.Errorf("member list: %s name %q, want it after a quote", id, m["name"])
		}
	}
	if deadL3U3 != "-30.0" || negative == 0 { // forces to 0.1 kN (internal/units)
		t.Errorf("negative numbers altered: F-1 L3-U3 dead_kn %q (want -30.0), %d negative numeric cells", deadL3U3, negative)
	}

	// bridges list --format csv writes the same rule.
	listed := parseExport(t, "bridges list --format csv", run("bridges", "list", "--format", "csv"))
	for _, r := range listed {
		if name := formulas[r["bridge_id"]]; name != "" && r["name"] != "'"+name {
			t.Errorf("bridges list --format csv: %s name %q, want it after a quote", r["bridge_id"], r["name"])
		}
		if r["bridge_id"] == "F-1" && r["span_m"] != "48" {
			t.Errorf("bridges list --format csv: span %q altered", r["span_m"])
		}
	}
}

// TestEnvelopeCSVTrainNames gives envelope a train file whose name is a formula: the train
// cells are written after a quote, the negative forces as they are.
func TestEnvelopeCSVTrainNames(t *testing.T) {
	p := writeTestFile(t, t.TempDir(), "axle.yaml", axleTrain("=Axle 400", 400))
	body, stderr, err := runCmdErr(t, "envelope", "--type", "pratt", "--span", "48", "--panels", "8", "--depth", "6", "--train", p, "--format", "csv")
	if err != nil {
		t.Fatal(err, body)
	}
	if !strings.Contains(stderr, "CAUTION") {
		t.Errorf("no caution on standard error: %q", stderr)
	}
	recs, err := csv.NewReader(strings.NewReader(body)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	negative := false
	for _, r := range recs[1:] {
		v, err := strconv.ParseFloat(r[3], 64)
		if err != nil {
			t.Errorf("value_kn %q is not a number", r[3])
		}
		negative = negative || v < 0
		if v != 0 && r[4] != "'=Axle 400" {
			t.Errorf("%s %s: train %q, want '=Axle 400", r[0], r[2], r[4])
		}
	}
	// A Pratt truss has members in compression under a downward load (common practice).
	if !negative {
		t.Error("no negative force in the envelope: numbers altered?")
	}
}

// storeRows writes rows through a staged import of the store, as the importers do, without
// the importers' checks of the text.
func storeRows[T store.Row](t *testing.T, db *store.DB, kind store.Kind, rows []T) {
	t.Helper()
	ctx := context.Background()
	im, err := db.BeginImport(ctx, kind, "hostile.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer im.Rollback(ctx)
	if _, err := store.Stage(ctx, im, func(yield func(store.Staged[T]) bool) {
		for i, r := range rows {
			if !yield(store.Staged[T]{Line: i + 2, Row: r}) {
				return
			}
		}
	}); err != nil {
		t.Fatal(err)
	}
	c, err := im.Merge(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if err := im.Commit(ctx, strings.Repeat("ab", 32), c); err != nil {
		t.Fatal(err)
	}
}
