package main

import (
	"encoding/csv"
	"strings"
	"testing"
	"time"

	"github.com/jackc/pgx/v5/pgtype"
	"github.com/trussfleet/trussfleet/internal/ranking"
	"github.com/trussfleet/trussfleet/runreport"
	"github.com/trussfleet/trussfleet/store"
)

// TestCorridorsHostileText prints the corridors of a line whose name and bridges' names act
// on a terminal or a spreadsheet (common practice: ECMA-48 control sequences, Unicode UAX #9
// overrides, OWASP CSV injection): the table shows them harmless, the CSV quotes a formula,
// and both keep the weakest link with its RF and limiting member.
func TestCorridorsHostileText(t *testing.T) {
	rf := func(v float64) *float64 { return &v }
	rows := []ranking.Row{
		{Rank: 1, BridgeID: "W-1", Name: colourName, Line: "=HYPERLINK(\"x\")" + bellLine, ChainageKm: rf(4), RFProposed: rf(0.9),
			Categories: []string{"C2"}, ERating: rf(41), Flags: []string{"exceeds"}, Status: "done"},
		{Rank: 2, BridgeID: "W-2", Name: "+cmd|' /C calc'!A0", Line: "=HYPERLINK(\"x\")" + bellLine, ChainageKm: rf(1), RFProposed: rf(1.5),
			Categories: []string{"E5"}, ERating: rf(90), Status: "done"},
	}
	cats := map[string][]store.CategoryResult{"W-1": {
		{Category: "C3", Status: "fails", RF: pgtype.Float8{Float64: 0.95, Valid: true}, Member: "L2-L3", LimitBy: "mass per metre"},
	}}
	cs := runreport.CorridorsOf(rows, cats)
	if len(cs) != 1 || len(cs[0].Stops) != 2 || cs[0].Stops[0].BridgeID != "W-2" {
		t.Fatalf("corridors %+v", cs)
	}
	byID := map[string]ranking.Row{"W-1": rows[0], "W-2": rows[1]}
	var tab strings.Builder
	if err := corridorsTable(&tab, store.Run{ID: 3, Status: "completed", StartedAt: time.Date(2031, 3, 4, 1, 0, 0, 0, time.UTC)}, cs, byID); err != nil {
		t.Fatal(err)
	}
	checkTerminal(t, "corridors", tab.String())
	// The line carries C2 (W-1's highest); C3's weakest link is W-1 (EN 15528 order, from
	// memory: C2 < C3), whose stored outcome is shown.
	checkShown(t, "corridors", tab.String(), "the whole line carries C2", "W-1 (RF 0.95, L2-L3, mass per metre)", "CAUTION")
	var out strings.Builder
	if err := corridorsCSV(&out, cs, byID); err != nil {
		t.Fatal(err)
	}
	body := out.String()
	if !strings.HasPrefix(body, "# CAUTION") {
		t.Errorf("CSV starts %q", body[:min(40, len(body))])
	}
	recs, err := csv.NewReader(strings.NewReader(body[strings.Index(body, "\n")+1:])).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, r := range recs[1:] {
		if !strings.HasPrefix(r[0], "'=") {
			t.Errorf("line cell %q is not quoted against a spreadsheet", r[0])
		}
		if r[1] == "C3" && r[4] == "W-1" {
			found = r[8] == "0.9500" && r[9] == "L2-L3" && r[10] == "mass per metre" && r[2] == "false"
		}
	}
	if !found {
		t.Errorf("no C3 row for W-1 with its RF, member and limit:\n%s", body)
	}
}
