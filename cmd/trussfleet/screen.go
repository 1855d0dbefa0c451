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
	"time"

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

// screen runs (or resumes) a run to its end in this process and prints its summary.
func (a *app) screen(ctx context.Context, db *store.DB, out, errw io.Writer, changed bool, resume int64) error {
	screeningGC()
	s := a.cfg.Screen
	// Each committed job wakes the wait below, which then looks at once whether the run
	// has ended instead of at its next poll.
	wake := make(chan struct{}, 1)
	wc, err := fleetrun.NewWorkerClient(db, fleetrun.WorkerOptions{
		Jobs: s.Jobs, Threads: a.cfg.Workers, JobTimeout: s.JobTimeout, RescueAfter: s.RescueAfter,
		OnChunk: func(int64, int) {
			select {
			case wake <- struct{}{}:
			default:
			}
		},
	})
	if err != nil {
		return err
	}
	id := resume
	if resume == 0 {
		plan, err := buildPlan(ctx, db, a.cfg)
		if err != nil {
			return err
		}
		id, err = wc.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: version, Config: a.cfg.Redacted(), Plan: plan,
			PlanHash: plan.Hash(), ChunkSize: s.ChunkSize, Changed: changed})
		if err != nil {
			return err
		}
	} else {
		run, err := db.GetRun(ctx, resume)
		if err != nil {
			return err
		}
		if run.Status == store.RunCompleted {
			fmt.Fprintf(out, "run %d is already complete\n", resume)
			return a.printSummary(ctx, db, out, resume)
		}
		if err := db.SetRunStatus(ctx, resume, store.RunRunning); err != nil {
			return err
		}
		// Bridges whose jobs are gone (ended by River, cleaned away, or lost in a crash)
		// are queued again or recorded as failed, so that the run can finish.
		if rec, err := wc.RecoverRuns(ctx, resume, s.ChunkSize); err != nil {
			return err
		} else if rec != (fleetrun.Recovered{}) {
			fmt.Fprintf(errw, "run %d: %d bridges without a job queued again, %d recorded as failed\n", resume, rec.Requeued, rec.Failed)
		}
	}
	// Progress counts from here: what the run had before this process started does not
	// count toward its rate.
	p0, err := db.Progress(ctx, id)
	if err != nil {
		return err
	}
	start := time.Now()
	if err := wc.Start(context.WithoutCancel(ctx)); err != nil {
		return err
	}
	sweep := func(ctx context.Context) (fleetrun.Recovered, error) { return wc.RecoverRuns(ctx, id, s.ChunkSize) }
	status, err := waitForRun(ctx, db, id, errw, p0.Total-p0.Pending, start, wake, sweep)
	stopCtx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
	defer cancel()
	if errors.Is(err, context.Canceled) {
		// Running jobs are cancelled: their transactions roll back and they run again on resume.
		_ = wc.StopAndCancel(stopCtx)
		if serr := db.SetRunStatus(stopCtx, id, store.RunInterrupted); serr != nil {
			return serr
		}
		p, _ := db.Progress(stopCtx, id)
		fmt.Fprintf(out, "\nrun %d interrupted: %d of %d bridges kept; finish it with `trussfleet screen --resume %d`\n",
			id, p.Done+p.Failed+p.Carried, p.Total, id)
		return &exitError{code: exitInterrupted, err: fmt.Errorf("run %d interrupted", id)}
	}
	if serr := wc.Stop(stopCtx); serr != nil && err == nil {
		err = serr
	}
	if err != nil {
		return &exitError{code: exitRunFailed, err: err}
	}
	if status != store.RunCompleted {
		return &exitError{code: exitRunFailed, err: fmt.Errorf("run %d ended %s", id, status)}
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
		return &exitError{code: exitBridgesFailed, err: fmt.Errorf("run %d: %d bridges could not be screened (see `trussfleet rank --run %d`)", id, p.Failed, id)}
	}
	return nil
}

// waitForRun polls the run until it is no longer running, showing progress: a bar on a
// terminal, a log line every few seconds otherwise. A signal on wake (a job of this process
// committed) makes it look at the run's status at once. Every few seconds, when bridges are
// pending but no job is left to work them, sweep ends or requeues them.
func waitForRun(ctx context.Context, db *store.DB, id int64, errw io.Writer, first int, start time.Time, wake <-chan struct{},
	sweep func(context.Context) (fleetrun.Recovered, error)) (string, error) {
	tty := isTerminal(errw)
	var lastLog, lastJobCheck time.Time
	var lostSince time.Time
	// Each poll is a count on the pending bridges' partial index, cheap at any fleet size.
	tick := time.NewTicker(500 * time.Millisecond)
	defer tick.Stop()
	for {
		select {
		case <-ctx.Done():
			return "", ctx.Err()
		case <-tick.C:
		case <-wake:
			if r, err := db.GetRun(ctx, id); err != nil || r.Status == store.RunRunning {
				continue // the next tick reports progress, or the loss of the database
			}
		}
		run, err := db.GetRun(ctx, id)
		var pending int
		if err == nil {
			pending, err = db.PendingBridges(ctx, id)
		}
		if err != nil {
			// The database may be restarting: the workers retry their jobs, so wait for it.
			if ctx.Err() != nil {
				return "", ctx.Err()
			}
			if lostSince.IsZero() {
				lostSince = time.Now()
				slog.Warn("lost the database; waiting for it", "run", id, "err", err)
			}
			if time.Since(lostSince) > dbGrace {
				return "", fmt.Errorf("database unreachable for %v: %w", dbGrace, err)
			}
			continue
		}
		lostSince = time.Time{}
		total := run.BridgesTotal
		done := total - pending
		el := time.Since(start).Seconds()
		rate := float64(done-first) / max(el, 1e-3)
		eta := "?"
		if rate > 0 {
			eta = (time.Duration(float64(pending)/rate) * time.Second).Round(time.Second).String()
		}
		switch {
		case tty:
			fmt.Fprintf(errw, "\r%s %d/%d bridges  %.0f/s  ETA %s   ", bar(done, total, 30), done, total, rate, eta)
		case time.Since(lastLog) > 5*time.Second || run.Status != store.RunRunning:
			slog.Info("screening", "run", id, "done", done, "total", total, "per_s", fmt.Sprintf("%.0f", rate), "eta", eta)
			lastLog = time.Now()
		}
		if run.Status != store.RunRunning {
			if tty {
				fmt.Fprintln(errw)
			}
			return run.Status, nil
		}
		if pending == 0 {
			// Every bridge is written but the run is still open: the process of its last
			// job died between the job's commit and its check. Complete it here.
			if err := db.FinishRuns(ctx, id); err != nil {
				slog.Warn("completing the run", "run", id, "err", err)
			}
			continue
		}
		if time.Since(lastJobCheck) > jobCheckEvery {
			lastJobCheck = time.Now()
			if n, err := db.OpenJobs(ctx, id); err == nil && n == 0 {
				rec, err := sweep(ctx)
				if err != nil {
					slog.Warn("recovering bridges without a job", "run", id, "err", err)
				} else {
					slog.Warn("bridges pending with no job left", "run", id, "requeued", rec.Requeued, "failed", rec.Failed)
				}
			}
		}
	}
}

// jobCheckEvery is how often a waiting run looks for bridges left without a job.
const jobCheckEvery = 5 * time.Second

// dbGrace is how long a run waits for a database that went away before it gives up.
const dbGrace = 2 * time.Minute

func bar(done, total, width int) string {
	n := 0
	if total > 0 {
		n = done * width / total
	}
	b := make([]byte, width)
	for i := range b {
		b[i] = '.'
		if i < n {
			b[i] = '#'
		}
	}
	return "[" + string(b) + "]"
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
