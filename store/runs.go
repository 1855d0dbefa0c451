package store

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
)

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
	Plan           json.RawMessage // screening.Plan: the trains and settings as used
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

// NewRun describes a run to create.
type NewRun struct {
	ProgramVersion string
	Config         any    // marshalled to JSON
	Plan           any    // marshalled to JSON
	PlanHash       string // part of every bridge's input hash
	ChunkSize      int
	// Changed screens only the bridges whose inputs differ from the latest completed run's
	// and carries the others' results forward from it.
	Changed bool
}

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

// RunProgress counts a run's bridges by status.
type RunProgress struct {
	Total, Pending, Done, Failed, Carried int
}

// Progress reads a run's progress over its picture: Done counts the bridges the run itself
// screened, Carried those whose results it carried forward from an earlier run.
func (db *DB) Progress(ctx context.Context, id int64) (RunProgress, error) {
	var p RunProgress
	err := db.Pool.QueryRow(ctx, `SELECT count(*),
		count(*) FILTER (WHERE status = 'pending'), count(*) FILTER (WHERE status = 'done' AND run_id = $1),
		count(*) FILTER (WHERE status = 'failed'),
		count(*) FILTER (WHERE status = 'carried' OR (status = 'done' AND run_id <> $1))
		FROM run_picture($1)`, id).Scan(&p.Total, &p.Pending, &p.Done, &p.Failed, &p.Carried)
	return p, err
}

// PendingBridges counts a run's bridges still to be screened (an index-only count).
func (db *DB) PendingBridges(ctx context.Context, id int64) (int, error) {
	var n int
	err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_bridges WHERE run_id = $1 AND status = 'pending'`, id).Scan(&n)
	return n, err
}

// ReferenceTrains lists the distinct reference trains that stored rating factors name.
func (db *DB) ReferenceTrains(ctx context.Context) ([]string, error) {
	rows, err := db.Pool.Query(ctx, `SELECT DISTINCT reference_train FROM members
		WHERE reference_train IS NOT NULL ORDER BY 1`)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, pgx.RowTo[string])
}

// bridgeSet is the result set of a bridge in a run's picture: its own row's, or the nearest
// base run's (nil where the bridge has none, as a failed one).
func (db *DB) bridgeSet(ctx context.Context, runID int64, bridgeID string) (*int64, error) {
	var set *int64
	err := db.Pool.QueryRow(ctx, `WITH RECURSIVE chain (id, base, complete, depth) AS (
			SELECT id, base_run_id, complete, 0 FROM runs WHERE id = $1
			UNION ALL
			SELECT r.id, r.base_run_id, r.complete, c.depth + 1 FROM chain c JOIN runs r ON r.id = c.base
			WHERE NOT c.complete)
		SELECT b.set_id FROM chain c JOIN run_bridges b ON b.run_id = c.id AND b.bridge_id = $2
		ORDER BY c.depth LIMIT 1`, runID, bridgeID).Scan(&set)
	if errors.Is(err, pgx.ErrNoRows) {
		return nil, fmt.Errorf("bridge %q in run %d: %w", bridgeID, runID, ErrNotFound)
	}
	return set, err
}
