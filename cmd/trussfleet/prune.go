package main

import (
	"context"
	"fmt"
	"io"
	"slices"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/store"
)

func newPruneCmd(a *app) *cobra.Command {
	var keep int
	var olderThan string
	var dryRun, full, noVacuum bool
	cmd := &cobra.Command{
		Use:   "prune",
		Short: "Remove old runs with their results (--keep N, --older-than AGE)",
		Long: `prune removes the runs that the rules let go, each with its bridges, results and queued
jobs, one run per transaction: a prune stopped at any moment leaves every run whole or gone.
--keep N keeps the N most recent completed runs (and every run newer than them); --older-than
removes runs finished longer ago than the age (90d, 720h). With both, a run goes only when
both let it go. Running runs and the latest completed run are never removed.

Deleted rows leave space that PostgreSQL reuses once the tables are vacuumed; prune runs
VACUUM itself (unless --no-vacuum). The files shrink only with --full (VACUUM FULL), which
locks the run tables while it works: use it when no run is going on.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			age, err := parseAge(olderThan)
			if err != nil {
				return fmt.Errorf("--older-than: %w", err)
			}
			if keep < 0 {
				return fmt.Errorf("--keep: must not be negative, got %d", keep)
			}
			r := store.Retention{Keep: keep, OlderThan: age, DryRun: dryRun}
			ctx := cmd.Context()
			return a.withDatabase(ctx, func(db *store.DB) error {
				return pruneRuns(ctx, cmd.OutOrStdout(), db, r, !noVacuum, full)
			})
		},
	}
	cmd.Flags().IntVar(&keep, "keep", 0, "keep this many most recent completed runs")
	cmd.Flags().StringVar(&olderThan, "older-than", "", "remove runs finished longer ago than this age (90d, 720h)")
	cmd.Flags().BoolVar(&dryRun, "dry-run", false, "list the runs that would be removed; remove nothing")
	cmd.Flags().BoolVar(&noVacuum, "no-vacuum", false, "leave vacuuming to the autovacuum")
	cmd.Flags().BoolVar(&full, "full", false, "VACUUM FULL: return the space to the operating system (locks the run tables)")
	return cmd
}

// pruneRuns prunes by r, vacuums when asked and something went, and reports what went and
// the database's size before and after.
func pruneRuns(ctx context.Context, w io.Writer, db *store.DB, r store.Retention, vacuum, full bool) error {
	before, err := db.DatabaseSize(ctx)
	if err != nil {
		return err
	}
	p, err := db.PruneRuns(ctx, r)
	if r.DryRun && err == nil {
		if len(p.Runs) == 0 {
			fmt.Fprintln(w, "prune: no run would be removed")
			return nil
		}
		fmt.Fprintf(w, "prune: would remove %s: %s\n", plural(len(p.Runs), "run"), runList(p.Runs))
		return nil
	}
	if len(p.Runs) > 0 {
		tables := make([]string, 0, len(p.Rows))
		for t := range p.Rows {
			if t != store.PassedOn {
				tables = append(tables, t)
			}
		}
		slices.Sort(tables)
		var rows []string
		for _, t := range tables {
			rows = append(rows, fmt.Sprintf("%s %d", t, p.Rows[t]))
		}
		fmt.Fprintf(w, "prune: removed %s (%s); rows removed: %s\n", plural(len(p.Runs), "run"), runList(p.Runs), strings.Join(rows, ", "))
		if n := p.Rows[store.PassedOn]; n > 0 {
			fmt.Fprintf(w, "prune: %d bridge rows passed on (as carried) to the runs based on the removed ones\n", n)
		}
	} else if err == nil {
		fmt.Fprintln(w, "prune: no run to remove")
	}
	if err != nil {
		return err // the runs listed above are gone; the others are whole
	}
	if len(p.Runs) == 0 || !vacuum {
		if len(p.Runs) > 0 {
			fmt.Fprintln(w, "prune: the space becomes reusable when the autovacuum has vacuumed the run tables")
		}
		return nil
	}
	if err := db.VacuumRuns(ctx, full); err != nil {
		return fmt.Errorf("vacuuming the run tables: %w", err)
	}
	after, err := db.DatabaseSize(ctx)
	if err != nil {
		return err
	}
	if full {
		fmt.Fprintf(w, "prune: database %s before, %s after VACUUM FULL (%s returned to the system)\n",
			mib(before), mib(after), mib(before-after))
	} else {
		fmt.Fprintf(w, "prune: database %s (%s before); the removed rows' space is vacuumed and reused by the next runs; --full returns it to the system\n",
			mib(after), mib(before))
	}
	return nil
}

func runList(ids []int64) string {
	s := make([]string, len(ids))
	for i, id := range ids {
		s[i] = fmt.Sprint(id)
	}
	if len(s) > 12 {
		return strings.Join(s[:6], ", ") + ", …, " + strings.Join(s[len(s)-3:], ", ")
	}
	return strings.Join(s, ", ")
}

// plural is "1 run", "2 runs".
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

func mib(b int64) string { return fmt.Sprintf("%.1f MiB", float64(b)/(1<<20)) }
