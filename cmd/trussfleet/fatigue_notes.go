package main

import (
	"fmt"
	"io"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/report"
)

// printFatigueNotes tells, under a priority list, which bridges' ranks fatigue sets (their
// shortest remaining fatigue life over the planning horizon is below their lowest proposed RF:
// internal/ranking), with counts of the fatigue flags where counts are given (nil: not), and
// of the members the fatigue check could not check. It prints nothing for a run that checked
// no fatigue.
func printFatigueNotes(w io.Writer, rows []report.BridgeRow, counts map[string]int) {
	checked, noData, governs := false, 0, 0
	for _, r := range rows {
		if r.Fatigue.NoData != nil {
			checked = true
			noData += *r.Fatigue.NoData
		}
		if r.Fatigue.Governs {
			governs++
		}
	}
	if !checked {
		return
	}
	fmt.Fprintln(w)
	if counts != nil {
		fmt.Fprintf(w, "Members flagged for fatigue:  %s %d  %s %d\n", fatigue.FlagLife, counts[string(fatigue.FlagLife)],
			fatigue.FlagRise, counts[string(fatigue.FlagRise)])
	}
	if governs > 0 {
		fmt.Fprintf(w, "Fatigue sets the rank of %s here (shortest remaining fatigue life over the planning horizon below the lowest proposed RF):\n", plural(governs, "bridge"))
		for _, r := range rows {
			if r.Fatigue.Governs && r.Fatigue.LifeYears != nil {
				fmt.Fprintf(w, "  %d %s: member %s, %.1f years of fatigue life left under the proposed traffic\n",
					r.Rank, safetext.Cell(r.BridgeID), safetext.Cell(r.Fatigue.Member), *r.Fatigue.LifeYears)
			}
		}
	}
	if noData > 0 {
		fmt.Fprintf(w, "%s here had no area or fatigue category and were not checked for fatigue.\n", plural(noData, "member"))
	}
}
