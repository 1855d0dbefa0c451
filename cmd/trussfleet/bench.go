package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/importers"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newBenchCmd) }

// benchOptions are the flags of `bench run`.
type benchOptions struct {
	bridges          int
	dir              string
	seed             uint64
	chunk, jobs      int
	workers, streams int
	floorRepeats     int
	profile, keep    bool
}

func newBenchCmd(a *app) *cobra.Command {
	cmd := &cobra.Command{Use: "bench", Short: "Measurements of trussfleet itself (BENCHMARKS.md)", Hidden: true}
	var o benchOptions
	run := &cobra.Command{
		Use:   "run",
		Short: "Screen an invented fleet end to end and compare the time with copying its result rows alone",
		Long: `bench run generates an invented fleet of --bridges bridges (or reuses the one in its folder),
imports it with the example trains into a database of its own (DIR/n-N/pg, unless a database
URL or data directory is configured), and times "trussfleet screen" as a child process: its
wall time, bridges per second, peak resident memory (its own VmHWM) and CPU time, the embedded server's CPU
time and peak memory (proportional set size of its processes), and where the jobs' time went.
Before the run it vacuums, analyses and checkpoints the database, so that an earlier import or
deletion does not slow it. Then it copies the run's result rows alone into empty tables of the
same shape (the COPY floor), --floor-repeats times, and prints the ratio of the run's wall time
to the fastest copy. The run is deleted afterwards unless --keep.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			return a.benchRun(cmd.Context(), cmd.OutOrStdout(), o)
		},
	}
	f := run.Flags()
	f.IntVar(&o.bridges, "bridges", 10000, "number of invented bridges")
	f.StringVar(&o.dir, "dir", filepath.Join(os.TempDir(), "trussfleet-bench"), "folder for the fleet files, the database and the profiles")
	f.Uint64Var(&o.seed, "seed", 1893, "random seed of the invented fleet")
	f.IntVar(&o.chunk, "chunk-size", 0, "bridges per job (default: the chunk_size setting)")
	f.IntVar(&o.jobs, "jobs", 0, "jobs at once (default: the jobs setting)")
	f.IntVar(&o.workers, "workers", 0, "goroutines per job (default: the workers setting)")
	f.IntVar(&o.streams, "floor-streams", 0, "connections the COPY floor copies over at once (default: jobs)")
	f.IntVar(&o.floorRepeats, "floor-repeats", 3, "times the COPY floor is measured; the fastest counts")
	f.BoolVar(&o.profile, "profile", false, "write CPU and heap profiles of the screen process to the bench folder")
	f.BoolVar(&o.keep, "keep", false, "keep the benchmark's run in the database")
	cmd.AddCommand(run)
	return cmd
}

func (a *app) benchRun(ctx context.Context, out io.Writer, o benchOptions) error {
	if o.bridges < 1 {
		return fmt.Errorf("--bridges must be at least 1, got %d", o.bridges)
	}
	dir := filepath.Join(o.dir, "n-"+strconv.Itoa(o.bridges))
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if a.cfg.Database.URL == "" && a.cfg.Database.DataDir == "" {
		a.cfg.Database.DataDir = filepath.Join(dir, "pg")
	}
	jobs := a.cfg.Screen.Jobs
	if o.jobs > 0 {
		jobs = o.jobs
	}
	workers := a.cfg.Workers
	if o.workers > 0 {
		workers = o.workers
	}
	chunk := a.cfg.Screen.ChunkSize
	if o.chunk > 0 {
		chunk = o.chunk
	}
	if o.streams < 1 {
		o.streams = jobs
	}

	fleet := filepath.Join(dir, "fleet")
	if err := benchFleet(fleet, o, out); err != nil {
		return err
	}
	db, err := a.openDatabase(ctx)
	if err != nil {
		return err
	}
	defer db.Close()
	if err := benchImport(ctx, db, dir, fleet, out); err != nil {
		return err
	}
	var members int
	if err := db.Pool.QueryRow(ctx, "SELECT count(*) FROM members").Scan(&members); err != nil {
		return err
	}

	if err := db.Settle(ctx); err != nil {
		return err
	}

	// The screen command itself, as a child process, so that its memory and CPU are its own.
	exe, err := os.Executable()
	if err != nil {
		return err
	}
	args := []string{"screen", "--timings", filepath.Join(dir, "timings.json")}
	if a.cfgFile != "" {
		args = append(args, "--config", a.cfgFile)
	}
	if a.cfg.Database.URL == "" {
		args = append(args, "--data-dir", a.cfg.Database.DataDir)
	}
	if o.workers > 0 {
		args = append(args, "--workers", strconv.Itoa(o.workers))
	}
	if o.profile {
		args = append(args, "--cpuprofile", filepath.Join(dir, "cpu.pprof"), "--memprofile", filepath.Join(dir, "heap.pprof"))
	}
	logPath := filepath.Join(dir, "screen.log")
	logFile, err := os.Create(logPath)
	if err != nil {
		return err
	}
	defer logFile.Close()
	child := exec.CommandContext(ctx, exe, args...)
	child.Stdout, child.Stderr = logFile, logFile
	child.Env = os.Environ()
	if a.cfg.Database.URL != "" {
		// In the environment, not the arguments: a URL may hold a password.
		child.Env = append(child.Env, "TRUSSFLEET_DATABASE_URL="+a.cfg.Database.URL)
	}
	child.Env = append(child.Env, "TRUSSFLEET_CHUNK_SIZE="+strconv.Itoa(chunk), "TRUSSFLEET_JOBS="+strconv.Itoa(jobs))

	var server *serverSampler
	if db.Server != nil {
		server = startServerSampler(db.Server.Status().PID)
	}
	load0 := loadAverage()
	start := time.Now()
	runErr := child.Run()
	wall := time.Since(start)
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
	ru, _ := child.ProcessState.SysUsage().(*syscall.Rusage)
	run, err := db.LatestRun(ctx, true)
	if err != nil {
		return err
	}
	var phases phaseTotals
	if b, err := os.ReadFile(filepath.Join(dir, "timings.json")); err == nil {
		_ = json.Unmarshal(b, &phases)
	}

	fo := store.FloorOptions{Streams: o.streams, Repeats: o.floorRepeats}
	if db.Server != nil {
		pid := db.Server.Status().PID
		fo.ServerCPU = func() float64 { return serverCPU(pid) }
	}
	floor, err := db.MeasureCopyFloor(ctx, run.ID, dir, fo)
	if err != nil {
		return err
	}
	if !o.keep {
		if err := db.DeleteRun(ctx, run.ID); err != nil {
			return err
		}
	}

	runS := wall.Seconds()
	if run.FinishedAt != nil {
		runS = run.FinishedAt.Sub(run.StartedAt).Seconds()
	}
	fmt.Fprintf(out, "fleet run: %d bridges, %d members; chunk_size %d, jobs %d, workers %d; %d CPUs; load average %.2f before, %.2f after\n",
		run.BridgesTotal, members, chunk, jobs, workers, runtime.NumCPU(), load0, load1)
	fmt.Fprintf(out, "screen:      %.1f s wall (run %d: %.1f s from creation to completion), %.0f bridges/s\n",
		wall.Seconds(), run.ID, runS, float64(run.BridgesTotal)/wall.Seconds())
	if ru != nil {
		fmt.Fprintf(out, "  trussfleet: peak RSS %.0f MB, CPU %.1f s (user %.1f, system %.1f)\n", phases.PeakRSSKB/1024,
			tvSeconds(ru.Utime)+tvSeconds(ru.Stime), tvSeconds(ru.Utime), tvSeconds(ru.Stime))
	}
	if server != nil {
		fmt.Fprintf(out, "  server:     peak PSS %.0f MB (sum over its processes; RSS sum %.0f MB), CPU %.1f s\n",
			srv.peakPSSKB/1024, srv.peakRSSKB/1024, srv.cpuS)
	}
	fmt.Fprintf(out, "  jobs:       %d; summed over jobs: load %.1f s, screen %.1f s, copy %.1f s, update %.1f s, commit %.1f s\n",
		phases.Jobs, phases.LoadS, phases.ScreenS, phases.CopyS, phases.UpdateS, phases.CommitS)
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
	fmt.Fprintf(out, "ratio:       %.2f (screen wall time / COPY floor)\n", wall.Seconds()/floor.Elapsed.Seconds())
	if o.profile {
		fmt.Fprintf(out, "profiles:    %s, %s\n", filepath.Join(dir, "cpu.pprof"), filepath.Join(dir, "heap.pprof"))
	}
	return nil
}

// benchFleet writes the invented fleet unless the folder already holds it.
func benchFleet(dir string, o benchOptions, out io.Writer) error {
	if _, err := os.Stat(filepath.Join(dir, "members.csv")); err == nil {
		return nil
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	ref, err := traffic.ParseSpec("northmoor-freight-today", configs.Trains())
	if err != nil {
		return err
	}
	opt := fleetgen.Defaults(o.bridges)
	opt.Seed, opt.Reference = o.seed, ref
	start := time.Now()
	return writeFleet(opt, dir, func(b, m string) {
		fmt.Fprintf(out, "generated %d invented bridges in %.1f s: %s, %s\n", o.bridges, time.Since(start).Seconds(), b, m)
	})
}

// benchImport imports the example trains and the fleet; a second time it changes nothing.
func benchImport(ctx context.Context, db *store.DB, dir, fleet string, out io.Writer) error {
	trains := filepath.Join(dir, "trains")
	if err := os.RemoveAll(trains); err != nil {
		return err
	}
	if err := os.CopyFS(trains, configs.Trains()); err != nil {
		return err
	}
	start := time.Now()
	for _, step := range []func() (importers.Result, error){
		func() (importers.Result, error) { return importers.ImportTrains(ctx, db, trains, importers.Options{}) },
		func() (importers.Result, error) {
			return importers.ImportBridgesFile(ctx, db, filepath.Join(fleet, "bridges.csv"), importers.Options{})
		},
		func() (importers.Result, error) {
			return importers.ImportMembersFile(ctx, db, filepath.Join(fleet, "members.csv"), importers.Options{})
		},
	} {
		res, err := step()
		if err != nil {
			return err
		}
		if c := res.Counts; c.Inserted+c.Updated > 0 {
			fmt.Fprintf(out, "imported %s: %d inserted, %d updated (%.1f s so far)\n", res.File, c.Inserted, c.Updated, time.Since(start).Seconds())
		}
	}
	return nil
}

func tvSeconds(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }
