package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"os"
	"os/signal"
	"runtime/debug"
	"syscall"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newScreenCmd) }

// Exit codes a scheduler can act on.
const (
	exitBridgesFailed = 3   // the run completed, but some bridges could not be screened
	exitRunFailed     = 4   // the run could not complete
	exitInterrupted   = 130 // stopped by a signal; finished bridges are kept
)

func newScreenCmd(a *app) *cobra.Command {
	var changed bool
	var resume int64
	cmd := &cobra.Command{
		Use:   "screen",
		Short: "Screen every bridge against the existing and the proposed traffic",
		Long: `screen creates a run, queues its bridges as jobs in PostgreSQL and works them in this
process (other "trussfleet worker" processes on the same database share the work). Each
bridge's results are committed with its job, exactly once. Ctrl-C stops cleanly: finished
bridges stay, the run is marked interrupted, and --resume ID finishes it.

Exit codes: 0 completed; 3 completed with bridges that could not be screened; 4 the run
failed; 130 interrupted.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx, stop := signal.NotifyContext(cmd.Context(), os.Interrupt, syscall.SIGTERM)
			defer stop()
			db, err := a.openDatabase(ctx)
			if err != nil {
				return err
			}
			defer db.Close()
			return a.screen(ctx, db, cmd.OutOrStdout(), cmd.ErrOrStderr(), changed, resume)
		},
	}
	cmd.Flags().BoolVar(&changed, "changed", false, "screen only bridges whose inputs changed since the last completed run; carry the others forward")
	cmd.Flags().Int64Var(&resume, "resume", 0, "finish an interrupted run instead of starting a new one")
	cmd.Flags().Int("workers", 0, "goroutines screening bridges in this process (default: CPUs)")
	return cmd
}

// screeningGC lets the heap grow further between collections while bridges are screened:
// the garbage is short-lived per bridge, the live heap small (tens of MB), so collecting
// four times less often trades little memory for CPU. GOGC, when set, wins.
func screeningGC() {
	if os.Getenv("GOGC") == "" {
		debug.SetGCPercent(400)
	}
}

// workerOptions are this process's share of the work, as configured.
func (a *app) workerOptions() fleetrun.WorkerOptions {
	s := a.cfg.Screen
	return fleetrun.WorkerOptions{Jobs: s.Jobs, Threads: a.cfg.Workers, JobTimeout: s.JobTimeout, RescueAfter: s.RescueAfter}
}

// screen runs (or resumes) a run to its end in this process and prints its summary.
func (a *app) screen(ctx context.Context, db *store.DB, out, errw io.Writer, changed bool, resume int64) error {
	screeningGC()
	s := a.cfg.Screen
	opt := fleetrun.Options{
		Worker: a.workerOptions(), ChunkSize: s.ChunkSize, Logger: slog.Default(), Progress: progressPrinter(errw),
		Recovered: func(id int64, rec fleetrun.Recovered) {
			fmt.Fprintf(errw, "run %d: %s without a job queued again, %d recorded as failed\n", id, plural(rec.Requeued, "bridge"), rec.Failed)
		},
	}
	id, err := resume, error(nil) // the run's id: resume's, or the new run's
	if resume == 0 {
		plan, perr := buildPlan(ctx, db, a.cfg)
		if perr != nil {
			return perr
		}
		id, err = fleetrun.Run(ctx, db, fleetrun.NewRun{ProgramVersion: version, Config: a.cfg.Redacted(), Plan: plan,
			PlanHash: plan.Hash(), ChunkSize: s.ChunkSize, Changed: changed}, opt)
	} else {
		err = fleetrun.Resume(ctx, db, resume, opt)
	}
	var interrupted *fleetrun.Interrupted
	var failed *fleetrun.Failed
	switch {
	case errors.Is(err, fleetrun.ErrAlreadyComplete):
		fmt.Fprintf(out, "run %d is already complete\n", resume)
		return a.printSummary(ctx, db, out, resume)
	case errors.As(err, &interrupted):
		fmt.Fprintf(out, "\nrun %d interrupted: %d of %s kept; finish it with `trussfleet screen --resume %d`\n",
			id, interrupted.Kept, plural(interrupted.Total, "bridge"), id)
		return &exitError{code: exitInterrupted, err: err}
	case errors.As(err, &failed):
		return &exitError{code: exitRunFailed, err: err}
	case err != nil:
		return err
	}
	if err := a.printSummary(ctx, db, out, id); err != nil {
		return err
	}
	if r, ok, _ := a.cfg.Retention.retention(); ok {
		// Retention after a completed run: a failure to prune does not fail the run.
		if err := pruneRuns(ctx, errw, db, r, a.cfg.Retention.Vacuum, false); err != nil {
			slog.Warn("pruning old runs", "err", err)
		}
	}
	if p, err := db.Progress(ctx, id); err == nil && p.Failed > 0 {
		return &exitError{code: exitBridgesFailed, err: fmt.Errorf("run %d: %s could not be screened (see `trussfleet rank --run %d`)", id, plural(p.Failed, "bridge"), id)}
	}
	return nil
}
