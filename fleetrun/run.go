package fleetrun

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"time"

	"github.com/trussfleet/trussfleet/store"
)

// Options configure a process's part in runs: its share of the work, and how it tells what
// happens.
type Options struct {
	Worker WorkerOptions
	// ChunkSize is the number of bridges a job screens.
	ChunkSize int
	// Logger receives what a person watching should know of (the database lost and back,
	// bridges found with no job); nil discards it.
	Logger *slog.Logger
	// Progress, when set, is told the run's progress each time it is looked at: every half
	// second, at once when a job of this process commits, and a last time with the status
	// the run ended in.
	Progress func(Progress)
	// Recovered, when set, is told what Resume's sweep did when it queued or failed bridges.
	Recovered func(runID int64, r Recovered)
	// Started, when set, is called when this process begins working jobs.
	Started func()
}

func (o Options) logger() *slog.Logger {
	if o.Logger != nil {
		return o.Logger
	}
	return slog.New(slog.NewTextHandler(io.Discard, nil))
}

// Progress is how far a run is.
type Progress struct {
	RunID  int64
	Status string // a store.Run* status
	// Done counts the bridges no longer pending (screened, failed or carried forward) of
	// Total, the run's bridges; Pending = Total - Done.
	Done, Total, Pending int
	// PerSecond is the rate of this process's share: bridges done since it began, per
	// second.
	PerSecond float64
}

// Interrupted is the error of a run stopped by its context: the jobs running in this process
// were cancelled (their transactions roll back; they run again on resume), the run is marked
// interrupted, and Kept of its Total bridges are done, failed or carried forward.
type Interrupted struct {
	RunID       int64
	Kept, Total int
}

func (e *Interrupted) Error() string { return fmt.Sprintf("run %d interrupted", e.RunID) }

// Failed is the error of a run that could not complete: the database stayed away, or the
// run ended in another status than completed.
type Failed struct {
	RunID int64
	Err   error
}

func (e *Failed) Error() string { return e.Err.Error() }
func (e *Failed) Unwrap() error { return e.Err }

// ErrAlreadyComplete is Resume's error for a run that needs no resuming.
var ErrAlreadyComplete = errors.New("already complete")

// Run creates a run and works it to its end in this process (other processes working the
// same database share its jobs), and returns its id. Its error is *Interrupted when ctx
// ended first, *Failed when the run could not complete, and any other error when the run
// could not be created or started.
func Run(ctx context.Context, db *store.DB, nr NewRun, opt Options) (int64, error) {
	w, err := newWatch(db, opt)
	if err != nil {
		return 0, err
	}
	id, err := w.client.CreateRun(ctx, nr)
	if err != nil {
		return 0, err
	}
	return id, w.toEnd(ctx, id)
}

// Resume finishes an interrupted (or otherwise unfinished) run in this process: it marks the
// run running, sweeps up the bridges whose jobs are gone (ended by River, cleaned away, or
// lost in a crash: queued again or recorded as failed, so that the run can finish) and works
// the run to its end, as Run does. A run already completed gives ErrAlreadyComplete.
func Resume(ctx context.Context, db *store.DB, id int64, opt Options) error {
	w, err := newWatch(db, opt)
	if err != nil {
		return err
	}
	run, err := db.GetRun(ctx, id)
	if err != nil {
		return err
	}
	if run.Status == store.RunCompleted {
		return fmt.Errorf("run %d: %w", id, ErrAlreadyComplete)
	}
	if err := db.SetRunStatus(ctx, id, store.RunRunning); err != nil {
		return err
	}
	rec, err := w.client.RecoverRuns(ctx, id, opt.ChunkSize)
	if err != nil {
		return err
	}
	if rec != (Recovered{}) && opt.Recovered != nil {
		opt.Recovered(id, rec)
	}
	return w.toEnd(ctx, id)
}

// watch is a worker client of this process and what it needs to see a run to its end.
type watch struct {
	db     *store.DB
	opt    Options
	client *Client
	// wake is signalled after each committed job of this process: the wait then looks at
	// once whether the run has ended instead of at its next poll.
	wake chan struct{}
}

func newWatch(db *store.DB, opt Options) (*watch, error) {
	w := &watch{db: db, opt: opt, wake: make(chan struct{}, 1)}
	wo := opt.Worker
	onChunk := wo.OnChunk
	wo.OnChunk = func(run int64, n int) {
		select {
		case w.wake <- struct{}{}:
		default:
		}
		if onChunk != nil {
			onChunk(run, n)
		}
	}
	c, err := NewWorkerClient(db, wo)
	if err != nil {
		return nil, err
	}
	w.client = c
	return w, nil
}

// stopTimeout bounds the stop of this process's jobs once the run has ended or was
// interrupted.
const stopTimeout = 30 * time.Second

// toEnd starts the worker client, waits for the run to end, and stops the client.
func (w *watch) toEnd(ctx context.Context, id int64) error {
	// Progress counts from here: what the run had before this process started does not
	// count toward its rate.
	run, pending, err := w.look(ctx, id)
	if err != nil {
		return err
	}
	if run.Status == store.RunCompleted {
		return nil // nothing to screen: a nightly run with nothing changed is complete at creation
	}
	start := time.Now()
	if err := w.client.Start(context.WithoutCancel(ctx)); err != nil {
		return err
	}
	if w.opt.Started != nil {
		w.opt.Started()
	}
	status, err := w.wait(ctx, id, run.BridgesTotal-pending, start)
	stopCtx, cancel := context.WithTimeout(context.Background(), stopTimeout)
	defer cancel()
	if errors.Is(err, context.Canceled) {
		// Running jobs are cancelled: their transactions roll back and they run again on resume.
		_ = w.client.StopAndCancel(stopCtx)
		if err := w.db.SetRunStatus(stopCtx, id, store.RunInterrupted); err != nil {
			return err
		}
		p, _ := w.db.Progress(stopCtx, id)
		return &Interrupted{RunID: id, Kept: p.Done + p.Failed + p.Carried, Total: p.Total}
	}
	if serr := w.client.Stop(stopCtx); serr != nil && err == nil {
		err = serr
	}
	if err != nil {
		return &Failed{RunID: id, Err: err}
	}
	if status != store.RunCompleted {
		return &Failed{RunID: id, Err: fmt.Errorf("run %d ended %s", id, status)}
	}
	if pending >= analyzeFrom {
		// Statistics that know the new rows, for the readers that come next (the summary,
		// export, report); 0.1 to 0.5 s.
		if err := w.db.AnalyzeResults(ctx); err != nil {
			w.opt.logger().Warn("analysing the result tables", "err", err)
		}
	}
	return nil
}

// jobCheckEvery is how often a waiting run looks for bridges left without a job.
const jobCheckEvery = 5 * time.Second

// dbGrace is how long a run waits for a database that went away before it gives up.
const dbGrace = 2 * time.Minute

// wait polls the run until it is no longer running, telling its progress, and returns the
// status it ended in. first is the number of bridges done when this process began, at
// start. A database that went away (restarting, say) is waited for, up to dbGrace: the
// workers retry their jobs meanwhile.
func (w *watch) wait(ctx context.Context, id int64, first int, start time.Time) (string, error) {
	var lastSweep, lostSince time.Time
	tick := time.NewTicker(500 * time.Millisecond)
	defer tick.Stop()
	for {
		select {
		case <-ctx.Done():
			return "", ctx.Err()
		case <-tick.C:
		case <-w.wake:
			if r, err := w.db.GetRun(ctx, id); err != nil || r.Status == store.RunRunning {
				continue // the next tick reports progress, or the loss of the database
			}
		}
		run, pending, err := w.look(ctx, id)
		if err != nil {
			if ctx.Err() != nil {
				return "", ctx.Err()
			}
			if lostSince.IsZero() {
				lostSince = time.Now()
				w.opt.logger().Warn("lost the database; waiting for it", "run", id, "err", err)
			}
			if time.Since(lostSince) > dbGrace {
				return "", fmt.Errorf("database unreachable for %v: %w", dbGrace, err)
			}
			continue
		}
		lostSince = time.Time{}
		done := run.BridgesTotal - pending
		if w.opt.Progress != nil {
			w.opt.Progress(Progress{RunID: id, Status: run.Status, Done: done, Total: run.BridgesTotal, Pending: pending,
				PerSecond: float64(done-first) / max(time.Since(start).Seconds(), 1e-3)})
		}
		if run.Status != store.RunRunning {
			return run.Status, nil
		}
		w.tend(ctx, id, pending, &lastSweep)
	}
}

// look reads the run and counts its pending bridges: a count on their partial index, cheap
// at any fleet size.
func (w *watch) look(ctx context.Context, id int64) (store.Run, int, error) {
	run, err := w.db.GetRun(ctx, id)
	if err != nil {
		return run, 0, err
	}
	pending, err := w.db.PendingBridges(ctx, id)
	return run, pending, err
}

// tend keeps a running run going. With every bridge written but the run still open (the
// process of its last job died between the job's commit and its check) it completes the
// run. Otherwise, every jobCheckEvery since lastSweep, when no job is left to work the
// pending bridges, the sweep (RecoverRuns) ends or requeues them.
func (w *watch) tend(ctx context.Context, id int64, pending int, lastSweep *time.Time) {
	log := w.opt.logger()
	if pending == 0 {
		if err := w.db.FinishRuns(ctx, id); err != nil {
			log.Warn("completing the run", "run", id, "err", err)
		}
		return
	}
	if time.Since(*lastSweep) <= jobCheckEvery {
		return
	}
	*lastSweep = time.Now()
	if n, err := w.db.OpenJobs(ctx, id); err != nil || n > 0 {
		return
	}
	rec, err := w.client.RecoverRuns(ctx, id, w.opt.ChunkSize)
	if err != nil {
		log.Warn("recovering bridges without a job", "run", id, "err", err)
		return
	}
	log.Warn("bridges pending with no job left", "run", id, "requeued", rec.Requeued, "failed", rec.Failed)
}

// sweepEvery is how often a worker completes runs whose last job's process died and sweeps
// up bridges left without a job.
const sweepEvery = 30 * time.Second

// Work works the screening jobs of every open run in this process until ctx ends, then lets
// its running jobs finish (up to the job timeout) and stops. A job completes its run after
// its commit; a worker that died in between leaves the run open with nothing pending, so
// every sweepEvery (and at once) Work completes such runs and ends or requeues the bridges
// of any run that are pending with no job left to work them.
func Work(ctx context.Context, db *store.DB, opt Options) error {
	c, err := NewWorkerClient(db, opt.Worker)
	if err != nil {
		return err
	}
	if err := c.Start(context.WithoutCancel(ctx)); err != nil {
		return err
	}
	if opt.Started != nil {
		opt.Started()
	}
	log := opt.logger()
	tick := time.NewTicker(sweepEvery)
	defer tick.Stop()
	for done := false; !done; {
		if err := db.FinishRuns(ctx, 0); err != nil && ctx.Err() == nil {
			log.Warn("completing finished runs", "err", err)
		}
		if rec, err := c.RecoverRuns(ctx, 0, opt.ChunkSize); err != nil && ctx.Err() == nil {
			log.Warn("recovering bridges without a job", "err", err)
		} else if rec != (Recovered{}) {
			log.Warn("bridges pending with no job left", "requeued", rec.Requeued, "failed", rec.Failed)
		}
		select {
		case <-ctx.Done():
			done = true
		case <-tick.C:
		}
	}
	stopCtx, cancel := context.WithTimeout(context.Background(), opt.Worker.JobTimeout+10*time.Second)
	defer cancel()
	return c.Stop(stopCtx)
}
