package store

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
)

// Retention says which runs to keep. A run is pruned only when every rule given says so;
// running runs and the latest completed run are always kept.
type Retention struct {
	// Keep, when not 0, keeps the Keep most recent completed runs and every run newer than
	// the oldest of them.
	Keep int
	// OlderThan, when not 0, keeps every run that finished (or, unfinished, started) less
	// than OlderThan before Now.
	OlderThan time.Duration
	// Now is the time OlderThan counts back from; zero means the database's clock.
	Now time.Time
	// DryRun lists what would be pruned and removes nothing.
	DryRun bool
}

// Pruned is what a prune removed: the runs, and the rows of each run table and of River's
// jobs.
type Pruned struct {
	Runs []int64
	Rows map[string]int64
}

// runTables are the tables that hold a run's rows by run_id, deleted with the run: the
// result tables have no foreign key to cascade from (sql/migrations/004), run_bridges
// cascades but is counted here too.
var runTables = []string{"member_results", "member_assessments", "run_bridges"}

// PruneRuns removes the runs the retention rules let go, each with its bridges, results and
// jobs, in one transaction per run: a prune killed at any moment leaves every run whole or
// gone. It never removes a running run (checked again as each run is deleted) or the latest
// completed one. The space the rows held becomes reusable once vacuumed (Vacuum).
func (db *DB) PruneRuns(ctx context.Context, r Retention) (Pruned, error) {
	out := Pruned{Rows: map[string]int64{}}
	if r.Keep < 0 || r.OlderThan < 0 {
		return out, fmt.Errorf("retention: keep and older-than must not be negative")
	}
	if r.Keep == 0 && r.OlderThan == 0 {
		return out, errors.New("retention: give a number of runs to keep, an age, or both")
	}
	var cutoff *time.Time
	if r.OlderThan > 0 {
		now := r.Now
		if now.IsZero() {
			if err := db.Pool.QueryRow(ctx, "SELECT now()").Scan(&now); err != nil {
				return out, err
			}
		}
		c := now.Add(-r.OlderThan)
		cutoff = &c
	}
	rows, err := db.Pool.Query(ctx, `SELECT id FROM runs
		WHERE status <> 'running'
		AND id < coalesce((SELECT max(id) FROM runs WHERE status = 'completed'), 9223372036854775807)
		AND ($1 = 0 OR id < (SELECT coalesce(min(id), 0) FROM
			(SELECT id FROM runs WHERE status = 'completed' ORDER BY id DESC LIMIT $1) k))
		AND ($2::timestamptz IS NULL OR coalesce(finished_at, started_at) < $2)
		ORDER BY id`, r.Keep, cutoff)
	if err != nil {
		return out, err
	}
	ids, err := pgx.CollectRows(rows, pgx.RowTo[int64])
	if err != nil {
		return out, err
	}
	if r.DryRun {
		out.Runs = ids
		return out, nil
	}
	for _, id := range ids {
		removed, err := db.deleteRun(ctx, id, out.Rows)
		if err != nil {
			return out, fmt.Errorf("pruning run %d: %w", id, err)
		}
		if !removed {
			continue // it started running again since the selection
		}
		out.Runs = append(out.Runs, id)
	}
	return out, nil
}

// deleteRun removes one run that is not running, with its rows in every run table and its
// jobs that are not being worked, in one durable transaction, and adds the rows it removed
// to counts. It reports false when the run is running (or gone).
func (db *DB) deleteRun(ctx context.Context, id int64, counts map[string]int64) (bool, error) {
	removed := false
	n := map[string]int64{}
	err := pgx.BeginFunc(ctx, db.Pool, func(tx pgx.Tx) error {
		if err := durable(ctx, tx); err != nil {
			return err
		}
		// Lock the run's row first: a resume that sets it running waits for this
		// transaction, or this one sees it running and keeps it.
		var status string
		err := tx.QueryRow(ctx, "SELECT status FROM runs WHERE id = $1 FOR UPDATE", id).Scan(&status)
		if errors.Is(err, pgx.ErrNoRows) || (err == nil && status == RunRunning) {
			return nil
		}
		if err != nil {
			return err
		}
		for _, t := range runTables {
			tag, err := tx.Exec(ctx, "DELETE FROM "+t+" WHERE run_id = $1", id)
			if err != nil {
				return err
			}
			n[t] = tag.RowsAffected()
		}
		// A job still queued for an interrupted run would find nothing to do; a running one
		// finds its bridges gone and writes nothing.
		tag, err := tx.Exec(ctx, `DELETE FROM river_job WHERE kind = $1 AND (args->>'run_id')::bigint = $2
			AND state <> 'running'`, ChunkArgs{}.Kind(), id)
		if err != nil {
			return err
		}
		n["river_job"] = tag.RowsAffected()
		if _, err := tx.Exec(ctx, "DELETE FROM runs WHERE id = $1", id); err != nil {
			return err
		}
		removed = true
		return nil
	})
	if removed && err == nil {
		for t, v := range n {
			counts[t] += v
		}
	}
	return removed, err
}

// DatabaseSize is the size of the current database on disk, in bytes.
func (db *DB) DatabaseSize(ctx context.Context) (int64, error) {
	var n int64
	err := db.Pool.QueryRow(ctx, "SELECT pg_database_size(current_database())").Scan(&n)
	return n, err
}

// VacuumRuns vacuums the run tables, so that the space of deleted rows is reused by the next
// runs (the autovacuum would do it later). With full, VACUUM FULL rewrites them and returns
// the space to the operating system; it locks each table while it works, so no run may be
// going on.
func (db *DB) VacuumRuns(ctx context.Context, full bool) error {
	q := "VACUUM (ANALYZE) "
	if full {
		q = "VACUUM (FULL, ANALYZE) "
	}
	_, err := db.Pool.Exec(ctx, q+"runs, run_bridges, member_results, member_assessments, river_job")
	return err
}
