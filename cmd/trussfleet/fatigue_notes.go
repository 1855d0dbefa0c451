package main

import (
	"fmt"
	"io"
	"text/tabwriter"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/store"
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
		fmt.Fprintf(w, "%s here had no area (a floor element: no section modulus) or no fatigue category and were not checked for fatigue.\n", plural(noData, "member"))
	}
}

// printFatigueChanges lists, under a runs diff, the bridges whose shortest remaining fatigue
// life changed by a tenth of a year or more (or appeared or went), in run B's order.
func printFatigueChanges(w io.Writer, ids [2]int64, changes []store.BridgeChange) {
	life := func(v *float64) string {
		if v == nil {
			return "—"
		}
		return fmt.Sprintf("%.1f", *v)
	}
	var rows []store.BridgeChange
	for _, c := range changes {
		if life(c.LifeA) != life(c.LifeB) {
			rows = append(rows, c)
		}
	}
	if len(rows) == 0 {
		return
	}
	fmt.Fprintf(w, "\nShortest remaining fatigue life changed (years under the proposed traffic; — none runs out or not checked):\n")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "bridge\tname\tlife %d\tlife %d\n", ids[0], ids[1])
	for _, c := range rows {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\n", safetext.Cell(c.BridgeID), safetext.Cell(c.Name), life(c.LifeA), life(c.LifeB))
	}
	_ = tw.Flush()
}
