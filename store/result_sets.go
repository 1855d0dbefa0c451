package store

import (
	"context"
	"fmt"

	"github.com/jackc/pgx/v5"
)

// Table result_sets: sql/migrations/009_result_sets.sql.

// ResultSet is a row of result_sets: a bridge's member results and assessments, stored once
// and named by every run whose bridge has exactly those results. Digest is the SHA-256 of
// the set's rows as they are written, with set id 0.
type ResultSet struct {
	ID       int64
	BridgeID string
	Digest   []byte
}

// InsertResultSets stores the sets of the given bridges and digests (pairs at the same index)
// that are not stored yet, in the pairs' order, and returns those it stored. Two
// transactions storing the same set at once store it once: the second one's insert waits on
// the unique key for the first to commit, and then stores nothing. Give the pairs sorted, so
// that two transactions inserting overlapping sets lock them in the same order and cannot
// deadlock.
func InsertResultSets(ctx context.Context, tx pgx.Tx, bridges []string, digests [][]byte) ([]ResultSet, error) {
	rows, err := tx.Query(ctx, `INSERT INTO result_sets (bridge_id, digest)
		SELECT k.bridge_id, k.digest FROM unnest($1::text[], $2::bytea[]) AS k(bridge_id, digest)
		ORDER BY k.bridge_id, k.digest
		ON CONFLICT (bridge_id, digest) DO NOTHING RETURNING id, bridge_id, digest`, bridges, digests)
	if err != nil {
		return nil, fmt.Errorf("result sets: %w", err)
	}
	return collectResultSets(rows)
}

// ShareResultSets finds the stored sets of the given bridges and digests and holds them FOR
// KEY SHARE until the transaction ends: a prune that would delete a set no run refers to yet
// waits for this transaction, and then sees it referred to (dropUnusedSets). The sets are
// locked in id order, the order a prune locks them in: the two cannot deadlock.
func ShareResultSets(ctx context.Context, tx pgx.Tx, bridges []string, digests [][]byte) ([]ResultSet, error) {
	rows, err := tx.Query(ctx, `SELECT s.id, s.bridge_id, s.digest FROM result_sets s
		JOIN unnest($1::text[], $2::bytea[]) AS k(bridge_id, digest) ON s.bridge_id = k.bridge_id AND s.digest = k.digest
		ORDER BY s.id FOR KEY SHARE OF s`, bridges, digests)
	if err != nil {
		return nil, fmt.Errorf("result sets: %w", err)
	}
	return collectResultSets(rows)
}

func collectResultSets(rows pgx.Rows) ([]ResultSet, error) {
	sets, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (ResultSet, error) {
		var s ResultSet
		return s, r.Scan(&s.ID, &s.BridgeID, &s.Digest)
	})
	if err != nil {
		return nil, fmt.Errorf("result sets: %w", err)
	}
	return sets, nil
}

// dropUnusedSets deletes, of the given result sets, those no run_bridges row refers to, with
// their member rows, and adds the rows it removed to n.
func dropUnusedSets(ctx context.Context, tx pgx.Tx, sets []int64, n map[string]int64) error {
	if len(sets) == 0 {
		return nil
	}
	if _, err := tx.Exec(ctx, "SELECT 1 FROM result_sets WHERE id = ANY($1) ORDER BY id FOR UPDATE", sets); err != nil {
		return err
	}
	// A statement of its own, after the lock: it sees what the jobs that held the sets committed.
	rows, err := tx.Query(ctx, `DELETE FROM result_sets s WHERE s.id = ANY($1)
		AND NOT EXISTS (SELECT 1 FROM run_bridges r WHERE r.set_id = s.id) RETURNING s.id`, sets)
	if err != nil {
		return err
	}
	gone, err := pgx.CollectRows(rows, pgx.RowTo[int64])
	if err != nil {
		return err
	}
	n["result_sets"] = int64(len(gone))
	for _, t := range []string{"member_results", "member_assessments", "category_results"} {
		tag, err := tx.Exec(ctx, "DELETE FROM "+t+" WHERE set_id = ANY($1)", gone)
		if err != nil {
			return err
		}
		n[t] = tag.RowsAffected()
	}
	return nil
}

// AnalyzeResults renews the planner's statistics of the result tables and run_bridges. A
// first run fills them with hundreds of thousands of rows; until the autovacuum has analysed
// them the planner takes them for empty, and a reader that joins a run's picture to them (the
// member-level priority list, say) may scan a table once per bridge. A run that screened many
// bridges calls it as it ends.
func (db *DB) AnalyzeResults(ctx context.Context) error {
	_, err := db.Pool.Exec(ctx, "ANALYZE run_bridges, result_sets, member_results, member_assessments, category_results")
	return err
}
