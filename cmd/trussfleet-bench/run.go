package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/cmd/trussfleet-bench/internal/benchdb"
	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/store"
)

// runOptions are the flags of `run`.
type runOptions struct {
	bridges          int
	dir              string
	seed             uint64
	chunk, jobs      int
	workers, streams int
	floorRepeats     int
	floorShare       float64
	keep             bool
	trussfleet       string
}

func newRunCmd(b *bench) *cobra.Command {
	var o runOptions
	cmd := &cobra.Command{
		Use:   "run",
		Short: "Screen an invented fleet end to end and compare the time with copying its result rows alone",
		Long: `run generates an invented fleet of --bridges bridges with "trussfleet fleet generate" (or
reuses the one in its folder), imports it with the example trains into a database of its own
(DIR/n-N/pg, unless a database URL or data directory is configured), and times "trussfleet
screen" as a child process: its wall time, bridges per second, peak resident memory and CPU
time, the embedded server's CPU time and peak memory (proportional set size of its
processes). Before the run it vacuums, analyses and checkpoints the database, so that an
earlier import or deletion does not slow it. Then it copies the run's result rows alone into
empty tables of the same shape (the COPY floor), --floor-repeats times, and prints the ratio
of the run's wall time to the fastest copy. The run is deleted afterwards unless --keep.

The trussfleet measured is --trussfleet, or the trussfleet binary next to this program, or
one built from the module in the working directory into DIR/n-N.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			db, err := resolveDatabase(b.cfgFile, cmd.Flags())
			if err != nil {
				return err
			}
			return benchRun(cmd.Context(), cmd.OutOrStdout(), b.cfgFile, db, o)
		},
	}
	f := cmd.Flags()
	f.IntVar(&o.bridges, "bridges", 10000, "number of invented bridges")
	f.StringVar(&o.dir, "dir", filepath.Join(os.TempDir(), "trussfleet-bench"), "folder for the fleet files, the database and the screen log")
	f.Uint64Var(&o.seed, "seed", 1893, "random seed of the invented fleet")
	f.Float64Var(&o.floorShare, "floor-share", -1, "share of bridges with floor-system data (default: fleet generate's); a fleet already in --dir is reused as it is")
	f.IntVar(&o.chunk, "chunk-size", 0, "bridges per job (default: the chunk_size setting)")
	f.IntVar(&o.jobs, "jobs", 0, "jobs at once (default: the jobs setting)")
	f.IntVar(&o.workers, "workers", 0, "goroutines per job (default: the workers setting)")
	f.IntVar(&o.streams, "floor-streams", 0, "connections the COPY floor copies over at once (default: jobs)")
	f.IntVar(&o.floorRepeats, "floor-repeats", 3, "times the COPY floor is measured; the fastest counts")
	f.BoolVar(&o.keep, "keep", false, "keep the benchmark's run in the database")
	f.StringVar(&o.trussfleet, "trussfleet", "", "the trussfleet binary to measure (default: the one next to this program)")
	return cmd
}

func benchRun(ctx context.Context, out io.Writer, cfgFile string, dbc database, o runOptions) error {
	if o.bridges < 1 {
		return fmt.Errorf("--bridges must be at least 1, got %d", o.bridges)
	}
	name, gen := "n-"+strconv.Itoa(o.bridges), []string(nil)
	if o.floorShare >= 0 {
		// A fleet of its own folder: the share changes the fleet.
		share := strconv.FormatFloat(o.floorShare, 'g', -1, 64)
		name += "-floor-" + share
		gen = []string{"--floor-share", share}
	}
	dir, tf, db, err := prepareFleet(ctx, out, cfgFile, dbc, filepath.Join(o.dir, name),
		o.bridges, o.seed, o.trussfleet, gen...)
	if err != nil {
		return err
	}
	defer db.Close()
	members, err := benchdb.CountMembers(ctx, db.Pool)
	if err != nil {
		return err
	}
	if err := benchdb.Settle(ctx, db.Pool); err != nil {
		return err
	}

	// The screen command itself, as a child process, so that its memory and CPU are its own.
	var env []string
	if o.chunk > 0 {
		env = append(env, "TRUSSFLEET_CHUNK_SIZE="+strconv.Itoa(o.chunk))
	}
	if o.jobs > 0 {
		env = append(env, "TRUSSFLEET_JOBS="+strconv.Itoa(o.jobs))
	}
	args := []string{"screen"}
	if o.workers > 0 {
		args = append(args, "--workers", strconv.Itoa(o.workers))
	}
	logPath := filepath.Join(dir, "screen.log")
	logFile, err := os.Create(logPath)
	if err != nil {
		return err
	}
	defer logFile.Close()
	child := tf.command(ctx, env, args...)
	child.Stdout, child.Stderr = logFile, logFile

	var server *serverSampler
	if db.Server != nil {
		if server, err = startServerSampler(db.Server.Status().PID); err != nil {
			return err
		}
	}
	load0 := loadAverage()
	use, runErr := runMeasured(child)
	load1 := loadAverage()
	var srv serverUsage
	if server != nil {
		srv = server.stop()
	}
	if runErr != nil {
		var ee *exec.ExitError
		if !errors.As(runErr, &ee) || ee.ExitCode() != exitBridgesFailed {
			return fmt.Errorf("trussfleet screen: %w (its output: %s)", runErr, logPath)
		}
	}
	run, err := db.LatestRun(ctx, true)
	if err != nil {
		return err
	}
	set, err := settingsOf(run)
	if err != nil {
		return err
	}

	streams := o.streams
	if streams < 1 {
		streams = set.Screen.Jobs
	}
	fo := benchdb.FloorOptions{Streams: streams, Repeats: o.floorRepeats}
	if server != nil {
		fo.ServerCPU = func() float64 { return serverCPU(server.fs, server.pid) }
	}
	floor, err := benchdb.MeasureCopyFloor(ctx, db.Pool, run.ID, dir, fo)
	if err != nil {
		return err
	}
	if !o.keep {
		if err := db.DeleteRun(ctx, run.ID); err != nil {
			return err
		}
	}

	wall := use.wall.Seconds()
	runS := wall
	if run.FinishedAt != nil {
		runS = run.FinishedAt.Sub(run.StartedAt).Seconds()
	}
	fmt.Fprintf(out, "fleet run: %d bridges, %d members; chunk_size %d, jobs %d, workers %d; %d CPUs; load average %.2f before, %.2f after\n",
		run.BridgesTotal, members, set.Screen.ChunkSize, set.Screen.Jobs, set.Workers, runtime.NumCPU(), load0, load1)
	fmt.Fprintf(out, "screen:      %.1f s wall (run %d: %.1f s from creation to completion), %.0f bridges/s\n",
		wall, run.ID, runS, float64(run.BridgesTotal)/wall)
	fmt.Fprintf(out, "  trussfleet: peak RSS %s, CPU %.1f s (user %.1f, system %.1f)\n",
		peakRSS(use), use.userS+use.sysS, use.userS, use.sysS)
	if server != nil {
		fmt.Fprintf(out, "  server:     peak PSS %.0f MB (sum over its processes; RSS sum %.0f MB), CPU %.1f s\n",
			mib(srv.peakPSSBytes), mib(srv.peakRSSBytes), srv.cpuS)
	}
	fmt.Fprintf(out, "copy floor:  %d rows (%.0f MB) in %.1f s over %d connections",
		floor.Rows, float64(floor.Bytes)/1e6, floor.Elapsed.Seconds(), floor.Streams)
	if fo.ServerCPU != nil {
		fmt.Fprintf(out, ", server CPU %.1f s", floor.ServerCPU)
	}
	if len(floor.Times) > 1 {
		times := make([]string, len(floor.Times))
		for i, t := range floor.Times {
			times[i] = fmt.Sprintf("%.1f", t.Seconds())
		}
		fmt.Fprintf(out, " (fastest of %s s)", strings.Join(times, ", "))
	}
	fmt.Fprintln(out)
	fmt.Fprintf(out, "ratio:       %.2f (screen wall time / COPY floor)\n", wall/floor.Elapsed.Seconds())
	return nil
}

// prepareFleet readies a benchmark's folder dir: the trussfleet to measure, an invented
// fleet of the given size (generated unless the folder holds one), imported with the example
// trains into the configured database or one of its own (dir/pg), migrated and open.
func prepareFleet(ctx context.Context, out io.Writer, cfgFile string, dbc database, dir string, bridges int, seed uint64,
	named string, genArgs ...string) (string, trussfleet, *store.DB, error) {
	dir, err := filepath.Abs(dir)
	if err != nil {
		return "", trussfleet{}, nil, err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", trussfleet{}, nil, err
	}
	if dbc.url == "" && dbc.dataDir == "" {
		dbc.dataDir = filepath.Join(dir, "pg")
	}
	exe, err := findTrussfleet(ctx, named, dir, out)
	if err != nil {
		return "", trussfleet{}, nil, err
	}
	tf := trussfleet{exe: exe, cfgFile: cfgFile, db: dbc}
	fleet := filepath.Join(dir, "fleet")
	if _, err := os.Stat(filepath.Join(fleet, "members.csv")); err != nil {
		if err := tf.run(ctx, out, append([]string{"fleet", "generate", "--bridges", strconv.Itoa(bridges),
			"--seed", strconv.FormatUint(seed, 10), "--out", fleet}, genArgs...)...); err != nil {
			return "", tf, nil, err
		}
	}
	if err := importFleet(ctx, tf, dir, fleet, out); err != nil {
		return "", tf, nil, err
	}
	db, err := store.Open(ctx, store.Options{URL: dbc.url, DataDir: dbc.dataDir, SearchPath: os.Getenv("PATH"),
		Logf: func(format string, args ...any) { slog.Info(fmt.Sprintf(format, args...)) }})
	if err != nil {
		return "", tf, nil, err
	}
	if _, err := db.Migrate(ctx); err != nil {
		db.Close()
		return "", tf, nil, err
	}
	return dir, tf, db, nil
}

// importFleet imports the example trains and the fleet with trussfleet import; a second
// time it changes nothing.
func importFleet(ctx context.Context, tf trussfleet, dir, fleet string, out io.Writer) error {
	trains := filepath.Join(dir, "trains")
	if err := os.RemoveAll(trains); err != nil {
		return err
	}
	if err := os.CopyFS(trains, configs.Trains()); err != nil {
		return err
	}
	for _, args := range [][]string{
		{"import", "trains", trains},
		{"import", "bridges", filepath.Join(fleet, "bridges.csv")},
		{"import", "trusses", filepath.Join(fleet, "trusses.csv")},
		{"import", "members", filepath.Join(fleet, "members.csv")},
	} {
		if err := tf.run(ctx, out, args...); err != nil {
			return err
		}
	}
	return nil
}

// runSettings are the settings a run was made with, read from its record (runs.config: the
// configuration the trussfleet process that created the run resolved), so that the
// benchmark reports what the run used without resolving trussfleet's defaults itself.
type runSettings struct {
	Workers int
	Screen  struct {
		ChunkSize int
		Jobs      int
	}
}

func settingsOf(run store.Run) (runSettings, error) {
	var s runSettings
	if err := json.Unmarshal(run.Config, &s); err != nil {
		return s, fmt.Errorf("run %d: its recorded configuration: %w", run.ID, err)
	}
	if s.Workers < 1 || s.Screen.ChunkSize < 1 || s.Screen.Jobs < 1 {
		return s, fmt.Errorf("run %d: its recorded configuration names no workers, chunk size or jobs (Workers, Screen.ChunkSize, Screen.Jobs): %s",
			run.ID, run.Config)
	}
	return s, nil
}

func peakRSS(u usage) string {
	switch {
	case u.peakRSSBytes == 0:
		return "unknown"
	case u.peakExact:
		return fmt.Sprintf("%.0f MB", mib(u.peakRSSBytes))
	default:
		return fmt.Sprintf("at most %.0f MB (not told apart from the benchmark's own)", mib(u.peakRSSBytes))
	}
}

// mib is a size in MB as BENCHMARKS.md has always given them: 2^20 bytes.
func mib(b uint64) float64 { return float64(b) / (1 << 20) }
