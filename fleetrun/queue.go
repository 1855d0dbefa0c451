package fleetrun

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"sync"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/riverqueue/river"
	"github.com/riverqueue/river/riverdriver/riverpgxv5"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/store"
)

// ScreenQueue is the River queue the screening jobs go to.
const ScreenQueue = "screening"

// ChunkArgs is a River job: screen these bridges of this run.
type ChunkArgs struct {
	RunID   int64    `json:"run_id"`
	Bridges []string `json:"bridges"`
}

// Kind names the job kind in River's tables.
func (ChunkArgs) Kind() string { return store.ScreenJobKind }

// InsertOpts puts the job on the screening queue.
func (ChunkArgs) InsertOpts() river.InsertOpts {
	return river.InsertOpts{Queue: ScreenQueue, MaxAttempts: chunkMaxAttempts}
}

// chunkMaxAttempts bounds the retries of a failing job; its last attempt records the error
// on its bridges instead of failing again.
const chunkMaxAttempts = 8

// WorkerOptions configure a process's share of the work.
type WorkerOptions struct {
	// Jobs is the number of jobs worked at once; Threads the goroutines each job screens
	// its bridges with.
	Jobs, Threads int
	// JobTimeout bounds one job; a job running longer than RescueAfter (its worker died) is
	// handed to another worker.
	JobTimeout, RescueAfter time.Duration
	// Logger receives River's log lines; nil discards them.
	Logger *slog.Logger
	// OnChunk is told, after each committed job, how many bridges it wrote.
	OnChunk func(runID int64, bridges int)
	// OnTiming, when set, is told after each committed job where its time went.
	OnTiming func(ChunkTiming)
}

// ChunkTiming is where one job's wall time went.
type ChunkTiming struct {
	Bridges int // bridges written
	// Load reads the bridges and members; Screen computes them; Copy writes the result rows
	// (locking the bridges' run_bridges rows first); Update writes the bridges' summaries;
	// Commit finishes the run if it is done, completes the job and commits.
	Load, Screen, Copy, Update, Commit time.Duration
}

// Client is a River client that works screening jobs (or, with NewInsertClient, only
// inserts them).
type Client struct {
	db    *store.DB
	river *river.Client[pgx.Tx]
}

func riverLogger(l *slog.Logger) *slog.Logger {
	if l != nil {
		return l
	}
	return slog.New(slog.NewTextHandler(io.Discard, nil))
}

// NewInsertClient gives a client that creates runs but works no jobs.
func NewInsertClient(db *store.DB) (*Client, error) {
	rc, err := river.NewClient(riverpgxv5.New(db.Pool), &river.Config{Logger: riverLogger(nil)})
	if err != nil {
		return nil, err
	}
	return &Client{db: db, river: rc}, nil
}

// NewWorkerClient gives a client that works the screening jobs of every open run; Start it.
func NewWorkerClient(db *store.DB, opt WorkerOptions) (*Client, error) {
	return newWorkerClient(db, opt, screening.ScreenAll)
}

// newWorkerClient is NewWorkerClient with the function that screens a chunk's bridges (the
// fault tests give one that hangs on chosen bridges).
func newWorkerClient(db *store.DB, opt WorkerOptions, screen screenFunc) (*Client, error) {
	w := &chunkWorker{db: db, opt: opt, screen: screen, runs: map[int64]runPlan{}}
	workers := river.NewWorkers()
	if err := river.AddWorkerSafely(workers, w); err != nil {
		return nil, err
	}
	cfg := &river.Config{
		Logger:               riverLogger(opt.Logger),
		Queues:               map[string]river.QueueConfig{ScreenQueue: {MaxWorkers: max(opt.Jobs, 1)}},
		Workers:              workers,
		JobTimeout:           opt.JobTimeout,
		RescueStuckJobsAfter: opt.RescueAfter,
		FetchCooldown:        10 * time.Millisecond,
		FetchPollInterval:    500 * time.Millisecond,
		MaxAttempts:          chunkMaxAttempts,
	}
	rc, err := river.NewClient(riverpgxv5.New(db.Pool), cfg)
	if err != nil {
		return nil, err
	}
	return &Client{db: db, river: rc}, nil
}

// Start begins working jobs until Stop.
func (c *Client) Start(ctx context.Context) error { return c.river.Start(ctx) }

// Stop lets running jobs finish (until ctx ends, then cancels them) and stops.
func (c *Client) Stop(ctx context.Context) error { return c.river.Stop(ctx) }

// StopAndCancel cancels running jobs (their transactions roll back; they run again later)
// and stops.
func (c *Client) StopAndCancel(ctx context.Context) error { return c.river.StopAndCancel(ctx) }

// QueueChunk queues one more job for bridges of a run. Bridges already written are skipped
// when it runs, so queueing a chunk twice (or re-queueing one a rescued worker finished) is
// harmless.
func (c *Client) QueueChunk(ctx context.Context, args ChunkArgs) error {
	_, err := c.river.Insert(ctx, args, nil)
	return err
}

// screenFunc screens a chunk's bridges: screening.ScreenAll.
type screenFunc func(ctx context.Context, bridges []screening.Bridge, s *screening.Settings, threads int) ([]screening.Result, error)

// chunkWorker works ChunkArgs jobs.
type chunkWorker struct {
	river.WorkerDefaults[ChunkArgs]
	db     *store.DB
	opt    WorkerOptions
	screen screenFunc

	mu   sync.Mutex
	runs map[int64]runPlan
}

// runPlan is what a worker keeps of a run it works on: the settings from its plan and the
// plan's share of the input hashes.
type runPlan struct {
	set      *screening.Settings
	planHash string
}

// Timeout bounds one job.
func (w *chunkWorker) Timeout(*river.Job[ChunkArgs]) time.Duration { return w.opt.JobTimeout }

func (w *chunkWorker) runPlan(ctx context.Context, runID int64) (runPlan, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	if rp, ok := w.runs[runID]; ok {
		return rp, nil
	}
	run, err := w.db.GetRun(ctx, runID)
	if err != nil {
		return runPlan{}, err
	}
	var plan screening.Plan
	if err := json.Unmarshal(run.Plan, &plan); err != nil {
		return runPlan{}, fmt.Errorf("run %d plan: %w", runID, err)
	}
	s, err := plan.Settings()
	if err != nil {
		return runPlan{}, fmt.Errorf("run %d plan: %w", runID, err)
	}
	s.ShareTrains()
	rp := runPlan{set: s, planHash: run.PlanHash}
	w.runs[runID] = rp
	return rp, nil
}

// Work screens the job's bridges that are still pending and commits their results together
// with the job's completion, so that a bridge's results are written exactly once.
//
// Every way a job ends leaves each of its bridges done, failed with its reason, or in another
// open job: a failure is retried until the last attempt, which records it on the bridges; a
// job whose screening outlasts its timeout is split into one job per bridge, and a one-bridge
// job that does is recorded as failed (the computation would only time out again). Jobs that
// River itself ends without Work (rescued too often, discarded, cancelled) are swept up by
// RecoverRuns.
func (w *chunkWorker) Work(ctx context.Context, job *river.Job[ChunkArgs]) error {
	a := job.Args
	var tm ChunkTiming
	t0 := time.Now()
	rp, err := w.runPlan(ctx, a.RunID)
	if err != nil {
		return w.retryOrFail(ctx, job, err)
	}
	inputs, hashes, err := chunkInputs(ctx, w.db, a.RunID, rp.planHash, a.Bridges)
	if err != nil {
		return w.retryOrFail(ctx, job, err)
	}
	t1 := time.Now()
	results, err := w.screen(ctx, inputs, rp.set, w.opt.Threads)
	if err != nil {
		if errors.Is(ctx.Err(), context.DeadlineExceeded) {
			return w.timedOut(ctx, job, inputs, time.Since(t1))
		}
		return err // the process is stopping: the job runs again
	}
	t2 := time.Now()
	tm.Load, tm.Screen = t1.Sub(t0), t2.Sub(t1)
	err = pgx.BeginFunc(ctx, w.db.Pool, func(tx pgx.Tx) error {
		if err := store.Durable(ctx, tx); err != nil {
			return err
		}
		n, err := writeResults(ctx, tx, a.RunID, results, hashes, &tm)
		if err != nil {
			return err
		}
		tm.Bridges = n
		_, err = river.JobCompleteTx[*riverpgxv5.Driver](ctx, tx, job)
		return err
	})
	if err != nil {
		return w.retryOrFail(ctx, job, fmt.Errorf("writing results: %w", err))
	}
	w.finishRun(ctx, a.RunID)
	tm.Commit = time.Since(t2) - tm.Copy - tm.Update
	if w.opt.OnChunk != nil {
		w.opt.OnChunk(a.RunID, tm.Bridges)
	}
	if w.opt.OnTiming != nil {
		w.opt.OnTiming(tm)
	}
	return nil
}

// endingTimeout bounds the transaction that records how a job ended; it runs on a context of
// its own, since the job's may have run out.
const endingTimeout = 30 * time.Second

// endJob runs fn and completes the job in one durable transaction on a fresh context, then
// completes the run if nothing is left pending.
func (w *chunkWorker) endJob(ctx context.Context, job *river.Job[ChunkArgs], fn func(context.Context, pgx.Tx) error) error {
	ectx, cancel := context.WithTimeout(context.WithoutCancel(ctx), endingTimeout)
	defer cancel()
	err := pgx.BeginFunc(ectx, w.db.Pool, func(tx pgx.Tx) error {
		if err := store.Durable(ectx, tx); err != nil {
			return err
		}
		if err := fn(ectx, tx); err != nil {
			return err
		}
		_, err := river.JobCompleteTx[*riverpgxv5.Driver](ectx, tx, job)
		return err
	})
	if err != nil {
		return err
	}
	w.finishRun(ectx, job.Args.RunID)
	return nil
}

// retryOrFail returns cause for River to retry the job, except on its last attempt: then it
// records the error on the job's pending bridges, so that the run can end. A job cancelled
// because its process is stopping is always left to run again.
func (w *chunkWorker) retryOrFail(ctx context.Context, job *river.Job[ChunkArgs], cause error) error {
	if errors.Is(ctx.Err(), context.Canceled) || job.Attempt < job.MaxAttempts {
		return cause
	}
	why := failReason("job failed after %d attempts: %v", job.Attempt, cause)
	err := w.endJob(ctx, job, func(ctx context.Context, tx pgx.Tx) error {
		return store.FailBridges(ctx, tx, job.Args.RunID, job.Args.Bridges, why)
	})
	if err != nil {
		// River discards the job; RecoverRuns records its error on the bridges later.
		return errors.Join(cause, err)
	}
	return nil
}

// timedOut ends a job whose screening outlasted its timeout. Screening is deterministic, so
// trying the same chunk again would time out again: a chunk of several bridges is split into
// one job per bridge (the slow bridge then fails alone and the others are screened), and a
// one-bridge job records the timeout on its bridge.
func (w *chunkWorker) timedOut(ctx context.Context, job *river.Job[ChunkArgs], inputs []screening.Bridge, took time.Duration) error {
	ids := make([]string, len(inputs))
	for i, b := range inputs {
		ids[i] = b.ID
	}
	err := w.endJob(ctx, job, func(ctx context.Context, tx pgx.Tx) error {
		if len(ids) > 1 {
			// The client working this job inserts the new ones (River puts it in the context).
			rc, err := river.ClientFromContextSafely[pgx.Tx](ctx)
			if err != nil {
				return err
			}
			return insertChunks(ctx, rc, tx, job.Args.RunID, ids, 1)
		}
		return store.FailBridges(ctx, tx, job.Args.RunID, ids, failReason(
			"screening took longer than the job timeout (%v, stopped after %v): check its trains and geometry, or raise job_timeout",
			w.opt.JobTimeout, took.Round(time.Millisecond)))
	})
	if err != nil {
		return fmt.Errorf("job timed out, and ending it failed: %w", err)
	}
	return nil
}

// finishRun completes the run if this job's commit left no bridge pending. It runs after
// the commit, in a statement of its own: of two jobs committing at once, the one committing
// later looks after both commits and sees every bridge done, so no lock is needed (a lock on
// the run's row, held to the commit, made every job wait for the one before). Should this
// process die between the commit and the check, FinishRuns completes the run later.
func (w *chunkWorker) finishRun(ctx context.Context, runID int64) {
	if err := w.db.FinishRuns(context.WithoutCancel(ctx), runID); err != nil && w.opt.Logger != nil {
		w.opt.Logger.Warn("completing the run", "run", runID, "err", err)
	}
}
