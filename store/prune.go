package store

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
)

// Pruning: a run's rows of runs and run_bridges, the result sets only it named with their
// member rows (dropUnusedSets, result_sets.go) and its jobs in River's table (deleteIdleJobs,
// river_job.go), deleted together, one run per transaction.

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

// PassedOn is the key of Pruned.Rows that counts the rows a pruned run passed on to the runs
// based on it, rather than removed.
const PassedOn = "passed on"

// Pruned is what a prune removed: the runs, and the rows of each run table and of River's
// jobs.
type Pruned struct {
	Runs []int64
	Rows map[string]int64
}

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

// deleteRun removes one run that is not running in one durable transaction, and adds the
// rows it removed to counts. It reports false when the run is running (or gone).
//
//  1. A run that depends on it (based on it and not complete) first takes the pruned run's
//     picture as carried rows, where it has no row of its own, and becomes complete.
//  2. The run's rows go, and its jobs that are not being worked (a job still queued for an
//     interrupted run would find nothing to do; a running one finds its bridges gone).
//  3. Of the result sets its rows named, those no run refers to any more go with their
//     member rows. A job about to reuse such a set holds it FOR KEY SHARE (ShareResultSets): the
//     lock below waits for that job, and the check after it then sees its reference.
func (db *DB) deleteRun(ctx context.Context, id int64, counts map[string]int64) (bool, error) {
	removed := false
	n := map[string]int64{}
	err := pgx.BeginFunc(ctx, db.Pool, func(tx pgx.Tx) error {
		clear(n)
		if err := Durable(ctx, tx); err != nil {
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
		rows, err := tx.Query(ctx, "SELECT id FROM runs WHERE base_run_id = $1 AND NOT complete ORDER BY id FOR UPDATE", id)
		if err != nil {
			return err
		}
		dependents, err := pgx.CollectRows(rows, pgx.RowTo[int64])
		if err != nil {
			return err
		}
		for _, d := range dependents {
			carried, err := carryPicture(ctx, tx, id, d)
			if err != nil {
				return fmt.Errorf("passing run %d's results on to run %d: %w", id, d, err)
			}
			n[PassedOn] += carried
			if _, err := tx.Exec(ctx, "DELETE FROM run_bridges WHERE run_id = $1 AND status = 'removed'", d); err != nil {
				return err
			}
			if _, err := tx.Exec(ctx, "UPDATE runs SET complete = true WHERE id = $1", d); err != nil {
				return err
			}
		}
		rows, err = tx.Query(ctx, "DELETE FROM run_bridges WHERE run_id = $1 RETURNING set_id", id)
		if err != nil {
			return err
		}
		var sets []int64
		var nb int64
		var set *int64
		if _, err := pgx.ForEachRow(rows, []any{&set}, func() error {
			nb++
			if set != nil {
				sets = append(sets, *set)
			}
			return nil
		}); err != nil {
			return err
		}
		n["run_bridges"] = nb
		if n["river_job"], err = deleteIdleJobs(ctx, tx, id); err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, "DELETE FROM runs WHERE id = $1", id); err != nil {
			return err
		}
		if err := dropUnusedSets(ctx, tx, sets, n); err != nil {
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

// DeleteRun removes one run that is not running, as a prune does (the runs that depend on it
// take its picture; the result sets only it named go).
func (db *DB) DeleteRun(ctx context.Context, id int64) error {
	removed, err := db.deleteRun(ctx, id, map[string]int64{})
	if err == nil && !removed {
		err = fmt.Errorf("run %d: %w (or still running)", id, ErrNotFound)
	}
	return err
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
	_, err := db.Pool.Exec(ctx, q+"runs, run_bridges, result_sets, member_results, member_assessments, category_results, river_job")
	return err
}
