package fleetrun

import (
	"context"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
	"github.com/riverqueue/river"
	"github.com/trussfleet/trussfleet/store"
)

// maxRequeues bounds how often one bridge of a run is queued again after it was found
// pending with no job: past it the bridge is recorded as failed, so that no sequence of
// faults keeps a run open for ever.
const maxRequeues = 3

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
	ids := []int64{runID}
	if runID == 0 {
		var err error
		if ids, err = c.db.RunsWithPendingBridges(ctx); err != nil {
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

func (c *Client) recoverRun(ctx context.Context, runID int64, chunkSize int) (Recovered, error) {
	var rec Recovered
	err := pgx.BeginFunc(ctx, c.db.Pool, func(tx pgx.Tx) error {
		if err := store.Durable(ctx, tx); err != nil {
			return err
		}
		orphans, err := store.OrphanedBridges(ctx, tx, runID)
		if err != nil {
			return err
		}
		var requeue, failIDs, failWhy []string
		for _, o := range orphans {
			if why, ends := orphanFate(o); ends {
				failIDs, failWhy = append(failIDs, o.BridgeID), append(failWhy, why)
			} else {
				requeue = append(requeue, o.BridgeID)
			}
		}
		if len(failIDs) > 0 {
			if err := store.FailBridgesEach(ctx, tx, runID, failIDs, failWhy); err != nil {
				return err
			}
		}
		if len(requeue) > 0 {
			if err := store.CountRequeues(ctx, tx, runID, requeue); err != nil {
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
func orphanFate(o store.Orphan) (string, bool) {
	if o.JobState != nil && (*o.JobState == "discarded" || *o.JobState == "cancelled") {
		why := "no error recorded"
		if o.LastErr != nil && *o.LastErr != "" {
			why = *o.LastErr
		}
		attempts := 0
		if o.Attempt != nil {
			attempts = *o.Attempt
		}
		return fmt.Sprintf("its job was %s after %d attempts: %s", *o.JobState, attempts, why), true
	}
	if o.Requeues >= maxRequeues {
		return fmt.Sprintf("left without results %d times (its job's commit lost, or its job gone); not queued again", o.Requeues+1), true
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

// failReason shortens an error for a bridge's recorded reason.
func failReason(format string, args ...any) string {
	s := fmt.Sprintf(format, args...)
	if len(s) > 2000 {
		s = s[:2000] + "…"
	}
	return strings.ToValidUTF8(s, "?")
}
