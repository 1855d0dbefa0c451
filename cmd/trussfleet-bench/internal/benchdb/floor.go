package benchdb

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgxpool"
	"golang.org/x/sync/errgroup"
)

// CopyFloor is the time to write a run's result rows with nothing else: no screening, no
// job claims, no run_bridges updates, no foreign-key checks. A run cannot write its results
// faster than this on the same server, so it is the floor a run's time is compared with.
type CopyFloor struct {
	// Streams is the number of connections the rows were copied over at once.
	Streams int
	// Rows and Bytes count the member_results, member_assessments and category_results rows copied and their
	// size in PostgreSQL's binary copy format.
	Rows, Bytes int64
	// Elapsed is the wall time of the COPY statements and their commit: the fastest of
	// Times, one per repeat.
	Elapsed time.Duration
	Times   []time.Duration
	// ServerCPU is what FloorOptions.ServerCPU measured around the fastest copy.
	ServerCPU float64
}

// FloorOptions say how to measure a copy floor.
type FloorOptions struct {
	// Streams is the number of connections copying at once (at least 1).
	Streams int
	// Repeats is the number of times the copy is made, into fresh tables each time; the
	// fastest is the floor (at least 1). A machine shared with other work makes single
	// timings vary by a third either way.
	Repeats int
	// ServerCPU, when set, reads the server's CPU seconds so far; it is read just before and
	// after each timed copy.
	ServerCPU func() float64
}

// resultTables are the tables a run writes its result rows into, in the order they are
// copied (sql/migrations/002_screening.sql; category_results: 015_network.sql).
var resultTables = []string{"member_results", "member_assessments", "category_results"}

// MeasureCopyFloor copies the result rows of run runID into empty copies of their tables
// (same columns, defaults, checks and indexes; no foreign keys) and times the copy. The
// rows are first read back into files under dir, untimed, so that memory stays flat
// however big the run; the bridges are split between opt.Streams connections copying at
// once. The copies are dropped afterwards.
func MeasureCopyFloor(ctx context.Context, pool *pgxpool.Pool, runID int64, dir string, opt FloorOptions) (CopyFloor, error) {
	streams := max(opt.Streams, 1)
	f := CopyFloor{Streams: streams}
	tmp, err := os.MkdirTemp(dir, "copy-floor-")
	if err != nil {
		return f, err
	}
	defer os.RemoveAll(tmp)
	defer dropFloorTables(context.WithoutCancel(ctx), pool)
	// Statistics that know the run's rows, untimed: without them the dump's join may scan a
	// result table once per bridge.
	if _, err := pool.Exec(ctx, "ANALYZE run_bridges, result_sets, member_results, member_assessments, category_results"); err != nil {
		return f, fmt.Errorf("copy floor: %w", err)
	}
	// Dump each stream's share of each table: bridges split by a hash of their id.
	paths := make([][]string, streams)
	for s := range streams {
		for _, t := range resultTables {
			p := filepath.Join(tmp, fmt.Sprintf("%s-%d.bin", t, s))
			// The rows of the result sets the run's picture names.
			n, err := dumpRows(ctx, pool, p, fmt.Sprintf(`COPY (SELECT m.* FROM %s m JOIN run_picture(%d) r ON r.set_id = m.set_id
				AND abs(hashtext(r.bridge_id)) %% %d = %d) TO STDOUT (FORMAT binary)`, t, runID, streams, s))
			if err != nil {
				return f, fmt.Errorf("copy floor: reading %s back: %w", t, err)
			}
			f.Bytes += n
			paths[s] = append(paths[s], p)
		}
	}
	for r := range max(opt.Repeats, 1) {
		elapsed, rows, cpu, err := copyOnce(ctx, pool, paths, opt.ServerCPU)
		if err != nil {
			return f, err
		}
		f.Times = append(f.Times, elapsed)
		if r == 0 || elapsed < f.Elapsed {
			f.Elapsed, f.Rows, f.ServerCPU = elapsed, rows, cpu
		}
	}
	return f, nil
}

// copyOnce copies the dumped rows (paths[stream][table]) into fresh, empty floor tables,
// one connection per stream, and returns the time it took, the rows copied and the server
// CPU seconds serverCPU (when set) saw go by.
func copyOnce(ctx context.Context, pool *pgxpool.Pool, paths [][]string, serverCPU func() float64) (time.Duration, int64, float64, error) {
	if err := dropFloorTables(ctx, pool); err != nil {
		return 0, 0, 0, err
	}
	for _, t := range resultTables {
		if _, err := pool.Exec(ctx, fmt.Sprintf("CREATE TABLE %s (LIKE %s INCLUDING ALL)", floorTable(t), t)); err != nil {
			return 0, 0, 0, fmt.Errorf("copy floor: %w", err)
		}
	}
	rows := make([]int64, len(paths))
	var cpu0 float64
	if serverCPU != nil {
		cpu0 = serverCPU()
	}
	start := time.Now()
	g, gctx := errgroup.WithContext(ctx)
	for s := range paths {
		g.Go(func() error {
			return pgx.BeginFunc(gctx, pool, func(tx pgx.Tx) error {
				for i, t := range resultTables {
					n, err := copyFile(gctx, tx, paths[s][i], floorTable(t))
					if err != nil {
						return fmt.Errorf("copy floor: copying into %s: %w", floorTable(t), err)
					}
					rows[s] += n
				}
				return nil
			})
		})
	}
	err := g.Wait()
	elapsed := time.Since(start)
	var cpu float64
	if serverCPU != nil {
		cpu = serverCPU() - cpu0
	}
	var total int64
	for _, n := range rows {
		total += n
	}
	return elapsed, total, cpu, err
}

func floorTable(t string) string { return "copy_floor_" + t }

func dropFloorTables(ctx context.Context, pool *pgxpool.Pool) error {
	for _, t := range resultTables {
		if _, err := pool.Exec(ctx, "DROP TABLE IF EXISTS "+floorTable(t)); err != nil {
			return err
		}
	}
	return nil
}

// dumpRows writes the output of a COPY ... TO STDOUT to a file and returns its size.
func dumpRows(ctx context.Context, pool *pgxpool.Pool, path, copySQL string) (int64, error) {
	out, err := os.Create(path)
	if err != nil {
		return 0, err
	}
	conn, err := pool.Acquire(ctx)
	if err != nil {
		out.Close()
		return 0, err
	}
	defer conn.Release()
	_, err = conn.Conn().PgConn().CopyTo(ctx, out, copySQL)
	if cerr := out.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return 0, err
	}
	st, err := os.Stat(path)
	if err != nil {
		return 0, err
	}
	return st.Size(), nil
}

// copyFile sends a file in binary copy format to a table and returns the rows copied.
func copyFile(ctx context.Context, tx pgx.Tx, path, table string) (int64, error) {
	in, err := os.Open(path)
	if err != nil {
		return 0, err
	}
	defer in.Close()
	tag, err := tx.Conn().PgConn().CopyFrom(ctx, io.Reader(in), "COPY "+table+" FROM STDIN (FORMAT binary)")
	if err != nil {
		return 0, err
	}
	return tag.RowsAffected(), nil
}
