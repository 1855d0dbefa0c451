package main

import (
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store"
)

// TestDiffAtPrintedPrecision: runs diff lists a change only where the table shows one; a
// worst RF that moves below the printed two decimals (1.404 to 1.396, both "1.40") is no
// change, one that moves across them (1.40 to 1.41) is. Hand-made changes.
func TestDiffAtPrintedPrecision(t *testing.T) {
	rf := func(v float64) *float64 { return &v }
	rank := func(v int) *int { return &v }
	for _, c := range []struct {
		name    string
		changes []store.BridgeChange
		summary string
		shown   []string
		hidden  []string
	}{
		{"below the printed precision", []store.BridgeChange{
			{BridgeID: "NER-00007", Name: "Hollin Gill", RankA: rank(3), RankB: rank(3), RFA: rf(1.404), RFB: rf(1.396), StatusA: "done", StatusB: "done"},
		}, "0 cleared, 0 other changes.", nil, []string{"NER-00007", "1.40"}},
		{"one visible change", []store.BridgeChange{
			{BridgeID: "NER-00007", Name: "Hollin Gill", RankA: rank(3), RankB: rank(3), RFA: rf(1.404), RFB: rf(1.396), StatusA: "done", StatusB: "done"},
			{BridgeID: "NER-00008", Name: "Scarth Beck", RankA: rank(4), RankB: rank(4), RFA: rf(1.40), RFB: rf(1.41), StatusA: "done", StatusB: "done"},
		}, "0 cleared, 1 other change.", []string{"NER-00008", "1.40", "1.41"}, []string{"NER-00007"}},
		{"rank alone", []store.BridgeChange{
			{BridgeID: "NER-00009", Name: "Wath Bridge", RankA: rank(2), RankB: rank(5), RFA: rf(0.9), RFB: rf(0.9), StatusA: "done", StatusB: "done"},
		}, "1 other change.", []string{"NER-00009"}, nil},
	} {
		var sb strings.Builder
		if err := printDiff(&sb, [2]int64{1, 2}, c.changes); err != nil {
			t.Fatal(err)
		}
		out := sb.String()
		if !strings.Contains(out, c.summary) {
			t.Errorf("%s: summary lacks %q:\n%s", c.name, c.summary, out)
		}
		for _, s := range c.shown {
			if !strings.Contains(out, s) {
				t.Errorf("%s: %q not shown:\n%s", c.name, s, out)
			}
		}
		for _, s := range c.hidden {
			if strings.Contains(out, s) {
				t.Errorf("%s: %q shown:\n%s", c.name, s, out)
			}
		}
	}
}
