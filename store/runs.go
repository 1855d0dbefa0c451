package store

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
)

// Table runs: sql/migrations/002_screening.sql, 005 (plan_hash), 008 (a pruned base run),
// 009 (complete).

// Run is a row of the runs table.
type Run struct {
	ID             int64
	Status         string // running, completed, interrupted, failed
	Mode           string // full or changed
	BaseRunID      *int64
	StartedAt      time.Time
	FinishedAt     *time.Time
	ProgramVersion string
	Config         json.RawMessage // the resolved configuration
	ConfigHash     string
	Plan           json.RawMessage // the run's plan: the trains and settings as used
	BridgesTotal   int
	Note           string
	PlanHash       string // the plan's share of its bridges' input hashes ("" before migration 005)
}

// Run states.
const (
	RunRunning     = "running"
	RunCompleted   = "completed"
	RunInterrupted = "interrupted"
	RunFailed      = "failed"
)

const runColumns = `id, status, mode, base_run_id, started_at, finished_at, program_version, config, config_hash,
	trains, bridges_total, note, plan_hash`

func scanRun(r pgx.Row) (Run, error) {
	var x Run
	err := r.Scan(&x.ID, &x.Status, &x.Mode, &x.BaseRunID, &x.StartedAt, &x.FinishedAt, &x.ProgramVersion, &x.Config,
		&x.ConfigHash, &x.Plan, &x.BridgesTotal, &x.Note, &x.PlanHash)
	return x, err
}

// GetRun reads one run.
func (db *DB) GetRun(ctx context.Context, id int64) (Run, error) {
	r, err := scanRun(db.Pool.QueryRow(ctx, "SELECT "+runColumns+" FROM runs WHERE id = $1", id))
	if errors.Is(err, pgx.ErrNoRows) {
		return r, fmt.Errorf("run %d: %w", id, ErrNotFound)
	}
	return r, err
}

// LatestRun is the newest run, or the newest completed one when completed is true.
func (db *DB) LatestRun(ctx context.Context, completed bool) (Run, error) {
	q := "SELECT " + runColumns + " FROM runs"
	if completed {
		q += " WHERE status = 'completed'"
	}
	r, err := scanRun(db.Pool.QueryRow(ctx, q+" ORDER BY id DESC LIMIT 1"))
	if errors.Is(err, pgx.ErrNoRows) {
		what := "no screening run yet"
		if completed {
			what = "no completed screening run yet"
		}
		return r, fmt.Errorf("%s (run `trussfleet screen`): %w", what, ErrNotFound)
	}
	return r, err
}

// Runs lists the runs, newest first.
func (db *DB) Runs(ctx context.Context, limit int) ([]Run, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+runColumns+" FROM runs ORDER BY id DESC LIMIT $1", limit)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (Run, error) { return scanRun(r) })
}

// LatestCompletedRuns gives the ids of the newest n completed runs, newest first.
func (db *DB) LatestCompletedRuns(ctx context.Context, n int) ([]int64, error) {
	rows, err := db.Pool.Query(ctx, "SELECT id FROM runs WHERE status = 'completed' ORDER BY id DESC LIMIT $1", n)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, pgx.RowTo[int64])
}

// SetRunStatus moves a run to a new status (finished_at set for every status but running).
func (db *DB) SetRunStatus(ctx context.Context, id int64, status string) error {
	_, err := db.Pool.Exec(ctx, `UPDATE runs SET status = $2,
		finished_at = CASE WHEN $2 = 'running' THEN NULL ELSE now() END WHERE id = $1`, id, status)
	return err
}

// FinishRuns marks completed the given run, or with id 0 every run, that is running or
// interrupted with no bridge pending. It is idempotent and safe to call at any time.
func (db *DB) FinishRuns(ctx context.Context, runID int64) error {
	_, err := db.Pool.Exec(ctx, `UPDATE runs r SET status = 'completed', finished_at = now()
		WHERE ($1 = 0 OR r.id = $1) AND r.status IN ('running', 'interrupted')
		AND NOT EXISTS (SELECT 1 FROM run_bridges b WHERE b.run_id = r.id AND b.status = 'pending')`, runID)
	return err
}

// RunsWithPendingBridges lists the running runs that have a bridge pending.
func (db *DB) RunsWithPendingBridges(ctx context.Context) ([]int64, error) {
	rows, err := db.Pool.Query(ctx, `SELECT r.id FROM runs r WHERE r.status = 'running'
		AND EXISTS (SELECT 1 FROM run_bridges b WHERE b.run_id = r.id AND b.status = 'pending')`)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, pgx.RowTo[int64])
}

// NewRunRow is what a new row of runs holds; the database gives its id, its start and its
// status (running).
type NewRunRow struct {
	ProgramVersion string
	Config         []byte // JSON: the resolved configuration
	ConfigHash     string
	Plan           []byte // JSON: the run's plan
	Mode           string // full or changed
	BaseRunID      *int64
	PlanHash       string
}

// InsertRun records a new run and returns its id.
func InsertRun(ctx context.Context, tx pgx.Tx, r NewRunRow) (int64, error) {
	var id int64
	err := tx.QueryRow(ctx, `INSERT INTO runs (program_version, config, config_hash, trains, mode, base_run_id, plan_hash)
		VALUES ($1, $2, $3, $4, $5, $6, $7) RETURNING id`,
		r.ProgramVersion, r.Config, r.ConfigHash, r.Plan, r.Mode, r.BaseRunID, r.PlanHash).Scan(&id)
	return id, err
}

// LatestCompletedRun is the id of the newest completed run, nil when there is none.
func LatestCompletedRun(ctx context.Context, tx pgx.Tx) (*int64, error) {
	var id *int64
	err := tx.QueryRow(ctx, "SELECT id FROM runs WHERE status = 'completed' ORDER BY id DESC LIMIT 1").Scan(&id)
	if errors.Is(err, pgx.ErrNoRows) {
		return nil, nil
	}
	return id, err
}

// SetRunTotal records the number of bridges in a new run's inventory and, when nothing is
// left to screen, completes it.
func SetRunTotal(ctx context.Context, tx pgx.Tx, id int64, total int, completed bool) error {
	_, err := tx.Exec(ctx, `UPDATE runs SET bridges_total = $3,
		status = CASE WHEN $2 THEN 'completed' ELSE status END,
		finished_at = CASE WHEN $2 THEN now() END WHERE id = $1`, id, completed, total)
	return err
}

// MarkIncomplete records that a run's own rows are not its whole picture: it continues in its
// base run's.
func MarkIncomplete(ctx context.Context, tx pgx.Tx, id int64) error {
	_, err := tx.Exec(ctx, "UPDATE runs SET complete = false WHERE id = $1", id)
	return err
}
