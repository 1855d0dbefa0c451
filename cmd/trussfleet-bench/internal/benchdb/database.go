package benchdb

import (
	"context"
	"fmt"

	"github.com/jackc/pgx/v5/pgxpool"
)

// Settle vacuums and analyses the inventory and result tables and writes a checkpoint, so
// that a benchmark that follows is not slowed by the autovacuum of an earlier import or
// deletion, nor by its checkpoint (which a role without the right to CHECKPOINT skips). It
// may take a while after a large deletion.
func Settle(ctx context.Context, pool *pgxpool.Pool) error {
	if _, err := pool.Exec(ctx, "VACUUM (ANALYZE) bridges, members, trains, runs, run_bridges, result_sets, member_results, member_assessments, category_results"); err != nil {
		return fmt.Errorf("settling the database: %w", err)
	}
	_, _ = pool.Exec(ctx, "CHECKPOINT")
	return nil
}

// CountMembers is the number of members in the inventory (the size of the fleet measured).
func CountMembers(ctx context.Context, pool *pgxpool.Pool) (int, error) {
	var n int
	err := pool.QueryRow(ctx, "SELECT count(*) FROM members").Scan(&n)
	return n, err
}
