package benchdb

import (
	"context"
	"fmt"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgxpool"
	"github.com/trussfleet/trussfleet/store"
)

// Settle vacuums and analyses the inventory and result tables and writes a checkpoint, so
// that a benchmark that follows is not slowed by the autovacuum of an earlier import or
// deletion, nor by its checkpoint (which a role without the right to CHECKPOINT skips). It
// may take a while after a large deletion.
func Settle(ctx context.Context, pool *pgxpool.Pool) error {
	if _, err := pool.Exec(ctx, "VACUUM (ANALYZE) bridges, members, trains, runs, run_bridges, member_results, member_assessments"); err != nil {
		return fmt.Errorf("settling the database: %w", err)
	}
	_, _ = pool.Exec(ctx, "CHECKPOINT")
	return nil
}

// DeleteRun removes a run with its bridges and results (benchmark runs, which would
// otherwise fill the disk). It refuses a run that is still running. The result tables have
// no foreign key to cascade from (sql/migrations/004): their rows are deleted here.
func DeleteRun(ctx context.Context, pool *pgxpool.Pool, id int64) error {
	return pgx.BeginFunc(ctx, pool, func(tx pgx.Tx) error {
		tag, err := tx.Exec(ctx, "DELETE FROM runs WHERE id = $1 AND status <> 'running'", id)
		if err != nil {
			return err
		}
		if tag.RowsAffected() == 0 {
			return fmt.Errorf("run %d: %w (or still running)", id, store.ErrNotFound)
		}
		for _, t := range resultTables {
			if _, err := tx.Exec(ctx, "DELETE FROM "+t+" WHERE run_id = $1", id); err != nil {
				return err
			}
		}
		return nil
	})
}

// CountMembers is the number of members in the inventory (the size of the fleet measured).
func CountMembers(ctx context.Context, pool *pgxpool.Pool) (int, error) {
	var n int
	err := pool.QueryRow(ctx, "SELECT count(*) FROM members").Scan(&n)
	return n, err
}
