package store

import (
	"context"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
	"github.com/riverqueue/river"
)

// maxRequeues bounds how often one bridge of a run is queued again after it was found
// pending with no job: past it the bridge is recorded as failed, so that no sequence of
// faults keeps a run open for ever.
const maxRequeues = 3

// openJobStates are River's states of a job that is still to be worked.
var openJobStates = []string{"available", "running", "retryable", "scheduled", "pending"}

// recoverLock names the advisory lock that serialises the sweeps of one run (its second key
// is the run's id), so that two processes sweeping at once do not both queue a bridge.
const recoverLock = 7_307_141

// Recovered is what a sweep did to a run's orphaned bridges.
type Recovered struct {
	Requeued int // queued again in new jobs
	Failed   int // recorded as failed, with the reason their last job ended
}

// RecoverRuns finds, in the given run (or with id 0 in every running run), the bridges that
// are pending but in no job still to be worked, and ends or requeues each of them:
//
//   - a bridge whose last job was discarded (its attempts ran out, or River's rescuer gave it
//     up) or cancelled is recorded as failed with that job's last error;
//   - a bridge whose last job completed without its results (a commit a crash lost), or whose
//     jobs are gone altogether, is queued again in a new job, at most maxRequeues times; after
//     that it is recorded as failed.
//
// After a sweep every bridge of the run is done, failed, or in an open job: the run can end.
// It is idempotent and safe to call from several processes at once.
func (c *Client) RecoverRuns(ctx context.Context, runID int64, chunkSize int) (Recovered, error) {
	var ids []int64
	if runID != 0 {
		ids = []int64{runID}
	} else {
		rows, err := c.db.Pool.Query(ctx, `SELECT r.id FROM runs r WHERE r.status = 'running'
			AND EXISTS (SELECT 1 FROM run_bridges b WHERE b.run_id = r.id AND b.status = 'pending')`)
		if err != nil {
			return Recovered{}, err
		}
		if ids, err = pgx.CollectRows(rows, pgx.RowTo[int64]); err != nil {
			return Recovered{}, err
		}
	}
	var total Recovered
	for _, id := range ids {
		r, err := c.recoverRun(ctx, id, chunkSize)
		if err != nil {
			return total, fmt.Errorf("run %d: recovering bridges without a job: %w", id, err)
		}
		total.Requeued += r.Requeued
		total.Failed += r.Failed
	}
	return total, nil
}

// orphan is a pending bridge in no open job, with the last job that held it (if any).
type orphan struct {
	bridge   string
	requeues int
	jobState *string
	attempt  *int
	lastErr  *string
}

func (c *Client) recoverRun(ctx context.Context, runID int64, chunkSize int) (Recovered, error) {
	var rec Recovered
	err := pgx.BeginFunc(ctx, c.db.Pool, func(tx pgx.Tx) error {
		if err := durable(ctx, tx); err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, "SELECT pg_advisory_xact_lock($1, $2)", recoverLock, int32(runID)); err != nil {
			return err
		}
		// One statement, one snapshot: a job's results and its completion commit together,
		// so a bridge seen pending here is either in an open job or orphaned.
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
			ORDER BY r.bridge_id`, ChunkArgs{}.Kind(), runID, openJobStates)
		if err != nil {
			return err
		}
		orphans, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (orphan, error) {
			var o orphan
			err := r.Scan(&o.bridge, &o.requeues, &o.jobState, &o.attempt, &o.lastErr)
			return o, err
		})
		if err != nil {
			return err
		}
		var requeue, failIDs, failWhy []string
		for _, o := range orphans {
			if why, ends := orphanFate(o); ends {
				failIDs, failWhy = append(failIDs, o.bridge), append(failWhy, why)
			} else {
				requeue = append(requeue, o.bridge)
			}
		}
		if len(failIDs) > 0 {
			if _, err := tx.Exec(ctx, `UPDATE run_bridges r SET status = 'failed', error = f.why, screened_at = now()
				FROM unnest($2::text[], $3::text[]) AS f(bridge_id, why)
				WHERE r.run_id = $1 AND r.bridge_id = f.bridge_id AND r.status = 'pending'`, runID, failIDs, failWhy); err != nil {
				return err
			}
		}
		if len(requeue) > 0 {
			if _, err := tx.Exec(ctx, `UPDATE run_bridges SET requeues = requeues + 1
				WHERE run_id = $1 AND bridge_id = ANY($2)`, runID, requeue); err != nil {
				return err
			}
			if err := insertChunks(ctx, c.river, tx, runID, requeue, chunkSize); err != nil {
				return err
			}
		}
		rec = Recovered{Requeued: len(requeue), Failed: len(failIDs)}
		return nil
	})
	if err != nil {
		return Recovered{}, err
	}
	if rec.Failed > 0 {
		// Failing the last pending bridges may have ended the run.
		return rec, c.db.FinishRuns(ctx, runID)
	}
	return rec, nil
}

// orphanFate says whether an orphaned bridge ends as failed (and why) or is queued again.
func orphanFate(o orphan) (string, bool) {
	if o.jobState != nil && (*o.jobState == "discarded" || *o.jobState == "cancelled") {
		why := "no error recorded"
		if o.lastErr != nil && *o.lastErr != "" {
			why = *o.lastErr
		}
		attempts := 0
		if o.attempt != nil {
			attempts = *o.attempt
		}
		return fmt.Sprintf("its job was %s after %d attempts: %s", *o.jobState, attempts, why), true
	}
	if o.requeues >= maxRequeues {
		return fmt.Sprintf("left without results %d times (its job's commit lost, or its job gone); not queued again", o.requeues+1), true
	}
	return "", false
}

// insertChunks queues jobs for the bridges of a run, chunkSize bridges a job, in tx.
func insertChunks(ctx context.Context, rc *river.Client[pgx.Tx], tx pgx.Tx, runID int64, bridges []string, chunkSize int) error {
	chunk := max(chunkSize, 1)
	var jobs []river.InsertManyParams
	for start := 0; start < len(bridges); start += chunk {
		ids := bridges[start:min(start+chunk, len(bridges))]
		jobs = append(jobs, river.InsertManyParams{Args: ChunkArgs{RunID: runID, Bridges: ids}})
	}
	if len(jobs) == 0 {
		return nil
	}
	if _, err := rc.InsertManyFastTx(ctx, tx, jobs); err != nil {
		return fmt.Errorf("queueing jobs: %w", err)
	}
	return nil
}

// durable makes the transaction's commit wait until its WAL is on disk, whatever the
// server's synchronous_commit. A job's results and its completion are one transaction; were
// that commit acknowledged and then lost in a crash of the server, River would complete the
// job again on the recovered server (its completer retries) and the bridges would stay
// pending with no job. Every transaction that ends a bridge or queues work is durable.
func durable(ctx context.Context, tx pgx.Tx) error {
	_, err := tx.Exec(ctx, "SET LOCAL synchronous_commit = on")
	return err
}

// failReason shortens an error for a bridge's recorded reason.
func failReason(format string, args ...any) string {
	s := fmt.Sprintf(format, args...)
	if len(s) > 2000 {
		s = s[:2000] + "…"
	}
	return strings.ToValidUTF8(s, "?")
}
