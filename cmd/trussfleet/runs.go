package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newRunsCmd) }

func newRunsCmd(a *app) *cobra.Command {
	cmd := &cobra.Command{Use: "runs", Short: "List, show and compare screening runs"}
	var limit int
	list := &cobra.Command{
		Use:   "list",
		Short: "List the runs, newest first",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx := cmd.Context()
			return a.withDatabase(ctx, func(db *store.DB) error { return listRuns(ctx, cmd.OutOrStdout(), db, limit) })
		},
	}
	list.Flags().IntVar(&limit, "limit", 20, "how many runs")
	show := &cobra.Command{
		Use:   "show ID",
		Short: "Show a run: its trains, settings and summary",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			ids, err := runIDs(args)
			if err != nil {
				return err
			}
			ctx := cmd.Context()
			return a.withDatabase(ctx, func(db *store.DB) error { return a.showRun(ctx, cmd.OutOrStdout(), db, ids[0]) })
		},
	}
	diff := &cobra.Command{
		Use:   "diff [A B]",
		Short: "What changed from run A to run B (default: the two latest completed runs)",
		Args: func(cmd *cobra.Command, args []string) error {
			if len(args) != 0 && len(args) != 2 {
				return fmt.Errorf("runs diff takes two run ids, or none for the two latest completed runs")
			}
			return nil
		},
		RunE: func(cmd *cobra.Command, args []string) error {
			ids, err := runIDs(args)
			if err != nil {
				return err
			}
			ctx := cmd.Context()
			return a.withDatabase(ctx, func(db *store.DB) error { return diffRuns(ctx, cmd.OutOrStdout(), db, ids) })
		},
	}
	cmd.AddCommand(list, show, diff, newPruneCmd(a))
	return cmd
}

func runIDs(args []string) ([]int64, error) {
	ids := make([]int64, len(args))
	for i, s := range args {
		v, err := strconv.ParseInt(s, 10, 64)
		if err != nil || v < 1 {
			return nil, fmt.Errorf("run id %q: not a run number", s)
		}
		ids[i] = v
	}
	return ids, nil
}

func listRuns(ctx context.Context, w io.Writer, db *store.DB, limit int) error {
	runs, err := db.Runs(ctx, limit)
	if err != nil {
		return err
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "run\tstatus\tmode\tstarted\tfinished\tbridges\tscreened\tcarried\tfailed")
	for _, r := range runs {
		p, err := db.Progress(ctx, r.ID)
		if err != nil {
			return err
		}
		fin := "—"
		if r.FinishedAt != nil {
			fin = r.FinishedAt.Format("2006-01-02 15:04:05")
		}
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%s\t%d\t%d\t%d\t%d\n", r.ID, r.Status, r.Mode, r.StartedAt.Format("2006-01-02 15:04:05"), fin, p.Total, p.Done, p.Carried, p.Failed)
	}
	return tw.Flush()
}

// showRun prints a run's trains, settings and summary.
func (a *app) showRun(ctx context.Context, w io.Writer, db *store.DB, id int64) error {
	r, err := db.GetRun(ctx, id)
	if err != nil {
		return err
	}
	var plan screening.Plan
	if err := json.Unmarshal(r.Plan, &plan); err != nil {
		return fmt.Errorf("run %d plan: %w", id, err)
	}
	fmt.Fprintf(w, "Run %d: %s (%s), program %s, configuration %s\n", r.ID, r.Status, r.Mode, r.ProgramVersion, r.ConfigHash[:12])
	if r.BaseRunID != nil {
		fmt.Fprintf(w, "Unchanged bridges carried forward from run %d\n", *r.BaseRunID)
	}
	// Train names come from train files: written through safetext.
	names := func(refs []screening.TrainRef) string {
		return safetext.Terminal(strings.Join(screening.TrainNames(refs), ", "))
	}
	fmt.Fprintf(w, "Existing traffic: %s\nProposed traffic: %s\n", names(plan.Existing), names(plan.Proposed))
	if len(plan.References) > 0 {
		fmt.Fprintf(w, "Reference trains of stored ratings: %s\n", names(plan.References))
	}
	fmt.Fprintf(w, "Dynamic allowance %s; rating %s; flag below %.2f, review below %.2f, worse beyond %.0f %%\n",
		plan.Dynamic, plan.Method, plan.Flag, plan.Review, 100*plan.Worse)
	return a.printSummary(ctx, db, w, id)
}

// diffRuns prints what changed between two runs; no ids: the two latest completed runs.
func diffRuns(ctx context.Context, w io.Writer, db *store.DB, ids []int64) error {
	if len(ids) == 0 {
		last, err := db.LatestCompletedRuns(ctx, 2)
		if err != nil {
			return err
		}
		if len(last) < 2 {
			return fmt.Errorf("runs diff needs two completed runs; there are %d", len(last))
		}
		ids = []int64{last[1], last[0]}
	}
	for _, id := range ids {
		if _, err := db.GetRun(ctx, id); err != nil {
			return err
		}
	}
	changes, err := db.DiffRuns(ctx, ids[0], ids[1])
	if err != nil {
		return err
	}
	return printDiff(w, [2]int64{ids[0], ids[1]}, changes)
}

// printDiff prints the changes as the table shows them: a change in the worst RF alone that
// does not show at the two decimals printed (1.404 to 1.396, both 1.40) is left out, so that
// no line reads "1.40 -> 1.40". Ranks, flags and failures are compared exactly.
func printDiff(w io.Writer, ids [2]int64, changes []store.BridgeChange) error {
	var failed, flagged, cleared, other []store.BridgeChange
	for _, c := range changes {
		if !visibleChange(c) {
			continue
		}
		switch {
		case c.StatusB == "failed" && c.StatusA != "failed":
			// Not screened is not cleared: the bridge needs its data fixed and a new run.
			failed = append(failed, c)
		case len(c.FlagsB) > 0 && len(c.FlagsA) == 0:
			flagged = append(flagged, c)
		case len(c.FlagsA) > 0 && len(c.FlagsB) == 0:
			cleared = append(cleared, c)
		default:
			other = append(other, c)
		}
	}
	fmt.Fprintf(w, "From run %d to run %d: %d could not be screened, %d newly flagged, %d cleared, %s.\n",
		ids[0], ids[1], len(failed), len(flagged), len(cleared), plural(len(other), "other change"))
	for _, g := range []struct {
		title string
		rows  []store.BridgeChange
	}{{"Could not be screened in run " + strconv.FormatInt(ids[1], 10) + " (see its priority list for the reasons)", failed},
		{"Newly flagged", flagged}, {"Cleared", cleared}, {"Rank, RF or status changed", other}} {
		if len(g.rows) == 0 {
			continue
		}
		fmt.Fprintf(w, "\n%s:\n", g.title)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintf(tw, "bridge\tname\trank %d\trank %d\tRF %d\tRF %d\tflags %d\tflags %d\n", ids[0], ids[1], ids[0], ids[1], ids[0], ids[1])
		cell := safetext.Cell
		for _, c := range g.rows {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", cell(c.BridgeID), cell(c.Name), rankText(c.RankA, c.StatusA), rankText(c.RankB, c.StatusB),
				fmtRF(c.RFA), fmtRF(c.RFB), cell(strings.Join(c.FlagsA, ",")), cell(strings.Join(c.FlagsB, ",")))
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	printFatigueChanges(w, ids, changes)
	fmt.Fprintln(w)
	printCaution(w)
	return nil
}

// visibleChange reports whether c shows in the printed table: a different rank, flags or
// failure, or a worst RF that differs at the printed precision (fmtRF).
func visibleChange(c store.BridgeChange) bool {
	return !equalPtr(c.RankA, c.RankB) || !slices.Equal(c.FlagsA, c.FlagsB) ||
		(c.StatusA == "failed") != (c.StatusB == "failed") || fmtRF(c.RFA) != fmtRF(c.RFB)
}

func equalPtr[T comparable](a, b *T) bool {
	return (a == nil) == (b == nil) && (a == nil || *a == *b)
}

func rankText(r *int, status string) string {
	switch {
	case r == nil:
		return "—"
	case status == "failed":
		return strconv.Itoa(*r) + " (failed)"
	}
	return strconv.Itoa(*r)
}
