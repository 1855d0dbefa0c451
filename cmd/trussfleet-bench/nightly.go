package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"time"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/cmd/trussfleet-bench/internal/benchdb"
)

// nightlyOptions are the flags of `nightly`.
type nightlyOptions struct {
	bridges    int
	dir        string
	seed       uint64
	nights     int
	change     float64
	keepRuns   int
	trussfleet string
}

func newNightlyCmd(b *bench) *cobra.Command {
	var o nightlyOptions
	cmd := &cobra.Command{
		Use:   "nightly",
		Short: "Nightly runs that screen what changed: their time, the rows they write and the database's growth",
		Long: `nightly prepares an invented fleet as run does, screens it in full once (a plain
"trussfleet screen"), then runs "trussfleet screen --changed" once with nothing changed and
--nights times after changing the stored capacities of --change of the bridges (a different
share each night). For each run it prints the wall time, the rows the run tables gained and
the size of the run tables (runs, run_bridges, result_sets, member_results,
member_assessments, river_job, with their indexes) against the size after the full run.
With --keep-runs K each nightly run prunes (retention.keep K, vacuuming after) as the
nightly job would. Its database is its own (DIR/nightly-N/pg) and starts empty of runs.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			db, err := resolveDatabase(b.cfgFile, cmd.Flags())
			if err != nil {
				return err
			}
			return benchNightly(cmd.Context(), cmd.OutOrStdout(), b.cfgFile, db, o)
		},
	}
	f := cmd.Flags()
	f.IntVar(&o.bridges, "bridges", 10000, "number of invented bridges")
	f.StringVar(&o.dir, "dir", filepath.Join(os.TempDir(), "trussfleet-bench"), "folder for the fleet files, the database and the logs")
	f.Uint64Var(&o.seed, "seed", 1893, "random seed of the invented fleet")
	f.IntVar(&o.nights, "nights", 30, "nightly runs after the one with nothing changed")
	f.Float64Var(&o.change, "change", 0.01, "share of the bridges changed before each nightly run")
	f.IntVar(&o.keepRuns, "keep-runs", 0, "prune after each nightly run, keeping this many completed runs (0: no pruning)")
	f.StringVar(&o.trussfleet, "trussfleet", "", "the trussfleet binary to measure (default: the one next to this program)")
	return cmd
}

func benchNightly(ctx context.Context, out io.Writer, cfgFile string, dbc database, o nightlyOptions) error {
	if o.bridges < 1 || o.nights < 0 || !(o.change > 0 && o.change <= 1) || o.keepRuns < 0 {
		return fmt.Errorf("need --bridges >= 1, --nights >= 0, 0 < --change <= 1, --keep-runs >= 0")
	}
	dir, tf, db, err := prepareFleet(ctx, out, cfgFile, dbc, filepath.Join(o.dir, "nightly-"+strconv.Itoa(o.bridges)),
		o.bridges, o.seed, o.trussfleet)
	if err != nil {
		return err
	}
	defer db.Close()
	// Start from no runs, so that the first run is a full one on an empty result store.
	for {
		r, err := db.LatestRun(ctx, false)
		if err != nil {
			break
		}
		if err := db.DeleteRun(ctx, r.ID); err != nil {
			return fmt.Errorf("clearing earlier runs: %w", err)
		}
	}
	if err := benchdb.Settle(ctx, db.Pool); err != nil {
		return err
	}
	logFile, err := os.Create(filepath.Join(dir, "nightly.log"))
	if err != nil {
		return err
	}
	defer logFile.Close()
	var env []string
	if o.keepRuns > 0 {
		env = append(env, "TRUSSFLEET_RETENTION_KEEP="+strconv.Itoa(o.keepRuns))
	}
	screen := func(args ...string) (time.Duration, error) {
		c := tf.command(ctx, env, append([]string{"screen"}, args...)...)
		c.Stdout, c.Stderr = logFile, logFile
		t0 := time.Now()
		err := c.Run()
		var ee *exec.ExitError
		if errors.As(err, &ee) && ee.ExitCode() == exitBridgesFailed {
			err = nil
		}
		return time.Since(t0), err
	}

	f0, err := benchdb.Footprint(ctx, db.Pool)
	if err != nil {
		return err
	}
	fullWall, err := screen()
	if err != nil {
		return fmt.Errorf("full run: %w (log: %s)", err, logFile.Name())
	}
	full, err := benchdb.Footprint(ctx, db.Pool)
	if err != nil {
		return err
	}
	fullRows := full.ResultRows() - f0.ResultRows()
	fmt.Fprintf(out, "nightly: %d bridges; %d nights changing %.1f %% of the bridges each; pruning: %s\n",
		o.bridges, o.nights, 100*o.change, pruning(o.keepRuns))
	fmt.Fprintf(out, "%-24s %9s %9s %11s %9s %12s %7s\n", "run", "wall s", "of full", "rows added", "of full", "run tables", "of full")
	line := func(what string, wall time.Duration, before, after benchdb.RunFootprint) {
		added := after.ResultRows() - before.ResultRows()
		fmt.Fprintf(out, "%-24s %9.2f %8.1f%% %11d %8.2f%% %9.1f MB %6.2fx\n", what, wall.Seconds(),
			100*wall.Seconds()/fullWall.Seconds(), added, 100*float64(added)/float64(max(fullRows, 1)),
			float64(after.Bytes)/1e6, float64(after.Bytes)/float64(max(full.Bytes, 1)))
	}
	line("full run", fullWall, f0, full)
	prev := full
	wall, err := screen("--changed")
	if err != nil {
		return fmt.Errorf("nightly run, nothing changed: %w (log: %s)", err, logFile.Name())
	}
	now, err := benchdb.Footprint(ctx, db.Pool)
	if err != nil {
		return err
	}
	line("nothing changed", wall, prev, now)
	fmt.Fprintf(out, "%-24s database %+d bytes (pg_database_size), run tables %+d bytes\n", "",
		now.Database-prev.Database, now.Bytes-prev.Bytes)
	prev = now
	for night := 1; night <= o.nights; night++ {
		factor := 1 - 0.01*float64(1+night%7) // each night another re-rating
		n, err := benchdb.ChangeBridges(ctx, db.Pool, o.change, night, factor)
		if err != nil {
			return err
		}
		wall, err := screen("--changed")
		if err != nil {
			return fmt.Errorf("night %d: %w (log: %s)", night, err, logFile.Name())
		}
		now, err := benchdb.Footprint(ctx, db.Pool)
		if err != nil {
			return err
		}
		line(fmt.Sprintf("night %d (%d changed)", night, n), wall, prev, now)
		prev = now
	}
	return nil
}

func pruning(keep int) string {
	if keep == 0 {
		return "none"
	}
	return fmt.Sprintf("keep %d completed runs after each nightly run", keep)
}
