package benchdb

import (
	"context"
	"fmt"
	"strconv"

	"github.com/jackc/pgx/v5/pgxpool"
)

// runTables are the tables that hold runs and their results, with River's jobs: what a
// screening run adds to the database.
var runTables = []string{"runs", "run_bridges", "result_sets", "member_results", "member_assessments", "category_results", "river_job"}

// RunFootprint is the size of the run tables and their rows.
type RunFootprint struct {
	Bytes    int64            // the run tables with their indexes and TOAST, on disk
	Database int64            // the whole database, on disk
	Rows     map[string]int64 // rows of each run table
}

// Footprint measures the run tables.
func Footprint(ctx context.Context, pool *pgxpool.Pool) (RunFootprint, error) {
	f := RunFootprint{Rows: map[string]int64{}}
	if err := pool.QueryRow(ctx, `SELECT coalesce(sum(pg_total_relation_size(t::regclass)), 0)::bigint,
		pg_database_size(current_database()) FROM unnest($1::text[]) AS t`, runTables).Scan(&f.Bytes, &f.Database); err != nil {
		return f, fmt.Errorf("run tables' size: %w", err)
	}
	for _, t := range runTables {
		var n int64
		if err := pool.QueryRow(ctx, "SELECT count(*) FROM "+t).Scan(&n); err != nil {
			return f, err
		}
		f.Rows[t] = n
	}
	return f, nil
}

// ResultRows is the number of rows of the tables a bridge's results go to.
func (f RunFootprint) ResultRows() int64 {
	return f.Rows["run_bridges"] + f.Rows["result_sets"] + f.Rows["member_results"] + f.Rows["member_assessments"] + f.Rows["category_results"]
}

// ChangeBridges changes the stored capacities of a share of the fleet's bridges, as a night's
// re-rating would: every member of each chosen bridge gets its capacities and stored rating
// factor scaled by factor. The bridges are picked by a hash of their id and the night, so
// each night changes other bridges. It returns how many bridges changed.
func ChangeBridges(ctx context.Context, pool *pgxpool.Pool, share float64, night int, factor float64) (int64, error) {
	_, err := pool.Exec(ctx, `WITH chosen AS (
			SELECT bridge_id FROM bridges ORDER BY md5(bridge_id || ':' || $1::text)
			LIMIT greatest(1, round($2::float8 * (SELECT count(*) FROM bridges)))::bigint)
		UPDATE members m SET capacity_tension_kn = m.capacity_tension_kn * $3,
			capacity_compression_kn = m.capacity_compression_kn * $3, rating_factor = m.rating_factor * $3
		FROM chosen c WHERE m.bridge_id = c.bridge_id`, strconv.Itoa(night), share, factor)
	if err != nil {
		return 0, fmt.Errorf("changing bridges: %w", err)
	}
	var n int64
	err = pool.QueryRow(ctx, `SELECT count(*) FROM (SELECT bridge_id FROM bridges
		ORDER BY md5(bridge_id || ':' || $1::text) LIMIT greatest(1, round($2::float8 * (SELECT count(*) FROM bridges)))::bigint) c`,
		strconv.Itoa(night), share).Scan(&n)
	return n, err
}
