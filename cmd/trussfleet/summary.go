package main

import (
	"context"
	"fmt"
	"io"
	"text/tabwriter"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/store"
)

// printSummary prints a run's counts per flag and its ten highest-priority bridges; inventory
// text goes through safetext.
func (a *app) printSummary(ctx context.Context, db *store.DB, w io.Writer, id int64) error {
	run, err := db.GetRun(ctx, id)
	if err != nil {
		return err
	}
	p, err := db.Progress(ctx, id)
	if err != nil {
		return err
	}
	counts, flagged, err := db.FlagTotals(ctx, id)
	if err != nil {
		return err
	}
	fmt.Fprintf(w, "\nRun %d %s: %s (%d screened, %d carried forward, %d failed), %d with flags.\n",
		id, run.Status, plural(p.Total, "bridge"), p.Done, p.Carried, p.Failed, flagged)
	fmt.Fprint(w, "Members flagged:")
	for _, f := range rating.Flags {
		fmt.Fprintf(w, "  %s %d", f, counts[string(f)])
	}
	fmt.Fprintln(w)
	unrated, onBridges, err := db.UnratedTotals(ctx, id)
	if err != nil {
		return err
	}
	if unrated > 0 {
		// The run's own settings decide whether they were flagged (the counts above).
		fmt.Fprintf(w, "Members unrated (dead plus live force acting in a sense with no capacity and no stored RF rated in it): %d on %d bridges; flagged no-capacity only with thresholds.flag_unrated.\n", unrated, onBridges)
	}
	if n, err := db.NoRockingTotal(ctx, id); err != nil {
		return err
	} else if n > 0 {
		// Said once for the run, not per bridge: the priority list marks which bridges.
		fmt.Fprintf(w, "AREMA's rocking term left out on %s: their rows give no truss spacing (truss_spacing_m); `trussfleet rank` marks them.\n", plural(n, "bridge"))
	}
	rows, err := db.Ranked(ctx, id, 10)
	if err != nil {
		return err
	}
	fmt.Fprintln(w, "\nTop of the priority list:")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "rank\tbridge\tname\tworst member\tkind\tRF existing\tRF proposed\tflags\tunrated")
	cell := safetext.Cell
	for _, r := range rows {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%d\n", r.Rank, cell(r.BridgeID), cell(r.Name), cell(r.WorstMember), worstKind(r.WorstMember), fmtRF(r.RFExisting), fmtRF(r.RFProposed), flagsText(r), r.Unrated)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	printFatigueNotes(w, rows, counts)
	if err := printFailed(ctx, db, w, id); err != nil {
		return err
	}
	fmt.Fprintln(w)
	printCaution(w)
	return nil
}

// printFailed lists the bridges a run could not screen: they are not cleared, they are
// unknown, and their data need fixing.
func printFailed(ctx context.Context, db *store.DB, w io.Writer, id int64) error {
	failed, n, err := db.FailedBridges(ctx, id, 10)
	if err != nil || n == 0 {
		return err
	}
	fmt.Fprintf(w, "\n%s could not be screened (not cleared: fix their data and run again):\n", plural(n, "bridge"))
	for _, f := range failed {
		fmt.Fprintf(w, "  %s %s: %s\n", safetext.Terminal(f.BridgeID), safetext.Terminal(f.Name), safetext.Terminal(f.Error))
	}
	if n > len(failed) {
		fmt.Fprintf(w, "  ... and %d more (trussfleet rank lists them all)\n", n-len(failed))
	}
	return nil
}

func fmtRF(v *float64) string {
	if v == nil {
		return "—"
	}
	return fmt.Sprintf("%.2f", *v)
}
