package store

import (
	"context"

	"github.com/jackc/pgx/v5"
)

// Table river_job: River's own (its migrations, river.go). trussfleet reads and deletes its
// screening jobs there; River inserts, works and ends them.

// ScreenJobKind is the kind of a screening job in river_job; its args hold the run's id
// (run_id) and the bridges' ids (bridges).
const ScreenJobKind = "trussfleet.screen_chunk"

// openJobStates are River's states of a job that is still to be worked (OpenJobs spells
// them in its SQL, for the planner).
var openJobStates = []string{"available", "running", "retryable", "scheduled", "pending"}

// OpenJobs counts the jobs of a run that are still to be worked (available, running, waiting
// to retry or scheduled).
func (db *DB) OpenJobs(ctx context.Context, runID int64) (int, error) {
	var n int
	err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM river_job WHERE kind = $1
		AND state IN ('available', 'running', 'retryable', 'scheduled', 'pending')
		AND (args->>'run_id')::bigint = $2`, ScreenJobKind, runID).Scan(&n)
	return n, err
}

// recoverLock names the advisory lock that serialises the sweeps of one run (its second key
// is the run's id), so that two processes sweeping at once do not both queue a bridge.
const recoverLock = 7_307_141

// Orphan is a pending bridge of a run in no job still to be worked, with the last job that
// held it, if any.
type Orphan struct {
	BridgeID string
	Requeues int     // how often it was queued again before (run_bridges.requeues)
	JobState *string // the last job's River state; nil when no job holds it
	Attempt  *int    // the last job's attempts
	LastErr  *string // the last job's last error
}

// OrphanedBridges locks the sweep of the run until the transaction ends (one sweep of a run
// at a time), then lists the run's orphaned bridges in bridge order. One statement, one
// snapshot: a job's results and its completion commit together, so a bridge seen pending
// here is either in an open job or orphaned.
func OrphanedBridges(ctx context.Context, tx pgx.Tx, runID int64) ([]Orphan, error) {
	if _, err := tx.Exec(ctx, "SELECT pg_advisory_xact_lock($1, $2)", recoverLock, int32(runID)); err != nil {
		return nil, err
	}
	rows, err := tx.Query(ctx, `WITH held AS (
			SELECT b.bridge_id, j.id, j.state::text AS state, j.attempt,
				j.errors[array_length(j.errors, 1)]->>'error' AS last_error
			FROM river_job j CROSS JOIN LATERAL jsonb_array_elements_text(j.args->'bridges') AS b(bridge_id)
			WHERE j.kind = $1 AND (j.args->>'run_id')::bigint = $2
		), last AS (
			SELECT DISTINCT ON (bridge_id) bridge_id, state, attempt, last_error
			FROM held ORDER BY bridge_id, id DESC
		)
		SELECT r.bridge_id, r.requeues, l.state, l.attempt, l.last_error
		FROM run_bridges r LEFT JOIN last l ON l.bridge_id = r.bridge_id
		WHERE r.run_id = $2 AND r.status = 'pending'
		AND NOT EXISTS (SELECT 1 FROM held h JOIN river_job j ON j.id = h.id
			WHERE h.bridge_id = r.bridge_id AND j.state::text = ANY($3))
		ORDER BY r.bridge_id`, ScreenJobKind, runID, openJobStates)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (Orphan, error) {
		var o Orphan
		err := r.Scan(&o.BridgeID, &o.Requeues, &o.JobState, &o.Attempt, &o.LastErr)
		return o, err
	})
}

// deleteIdleJobs deletes the run's jobs that are not being worked (a job still queued for an
// interrupted run would find nothing to do; a running one finds its bridges gone).
func deleteIdleJobs(ctx context.Context, tx pgx.Tx, runID int64) (int64, error) {
	tag, err := tx.Exec(ctx, `DELETE FROM river_job WHERE kind = $1 AND (args->>'run_id')::bigint = $2
		AND state <> 'running'`, ScreenJobKind, runID)
	return tag.RowsAffected(), err
}
