package main

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"

	"github.com/spf13/pflag"
	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/importers"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgserver"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// faultConfig is a configuration with small chunks and short timeouts, so that a killed
// worker's jobs are handed on quickly.
func faultConfig(t *testing.T, url string) (string, Config) {
	t.Helper()
	return faultConfigChunks(t, url, 4)
}

func faultConfigChunks(t *testing.T, url string, chunk int) (string, Config) {
	t.Helper()
	p := filepath.Join(t.TempDir(), "trussfleet.yaml")
	text := fmt.Sprintf("database:\n  url: %q\nchunk_size: %d\njobs: 2\nworkers: 1\njob_timeout: 5s\nrescue_after: 6s\n", url, chunk)
	if err := os.WriteFile(p, []byte(text), 0o600); err != nil {
		t.Fatal(err)
	}
	cfg, err := loadConfig(p, pflag.NewFlagSet("test", pflag.ContinueOnError))
	if err != nil {
		t.Fatal(err)
	}
	return p, cfg
}

// seedDemoFleet imports the example trains and an invented fleet of n bridges.
func seedDemoFleet(t *testing.T, db *store.DB, n int) {
	t.Helper()
	ctx := context.Background()
	dir := t.TempDir()
	ref, err := traffic.ParseSpec("northmoor-freight-today", configs.Trains())
	if err != nil {
		t.Fatal(err)
	}
	opt := fleetgen.Defaults(n)
	opt.Reference = ref
	if err := writeFleet(opt, dir, func(string, string) {}); err != nil {
		t.Fatal(err)
	}
	if _, err := importers.ImportTrains(ctx, db, filepath.Join(pkgDir, "..", "..", "configs", "trains"), importers.Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := importers.ImportBridgesFile(ctx, db, filepath.Join(dir, "bridges.csv"), importers.Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := importers.ImportTrussTablesFile(ctx, db, filepath.Join(dir, "trusses.csv"), importers.Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := importers.ImportMembersFile(ctx, db, filepath.Join(dir, "members.csv"), importers.Options{}); err != nil {
		t.Fatal(err)
	}
}

func newRun(t *testing.T, db *store.DB, cfg Config) int64 {
	t.Helper()
	ctx := context.Background()
	plan, err := buildPlan(ctx, db, cfg)
	if err != nil {
		t.Fatal(err)
	}
	ic, err := fleetrun.NewInsertClient(db)
	if err != nil {
		t.Fatal(err)
	}
	id, err := ic.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: "test", Config: cfg, Plan: plan, PlanHash: plan.Hash(), ChunkSize: cfg.Screen.ChunkSize})
	if err != nil {
		t.Fatal(err)
	}
	return id
}

// checkOnce asserts that a completed run holds exactly one result set per bridge: two
// scenario rows per member of the geometry, no key twice, no bridge with two sets.
func checkOnce(t *testing.T, db *store.DB, id int64, bridges int) {
	t.Helper()
	ctx := context.Background()
	var status string
	var rows, distinct, nb, done, expected, sets, twice int
	if err := db.Pool.QueryRow(ctx, `SELECT status FROM runs WHERE id = $1`, id).Scan(&status); err != nil {
		t.Fatal(err)
	}
	if err := db.Pool.QueryRow(ctx, `SELECT count(*), count(DISTINCT (r.bridge_id, m.scenario, m.member)), count(DISTINCT r.bridge_id)
		FROM run_picture($1) r JOIN member_results m ON m.set_id = r.set_id`, id).Scan(&rows, &distinct, &nb); err != nil {
		t.Fatal(err)
	}
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_picture($1) WHERE status = 'done'`, id).Scan(&done); err != nil {
		t.Fatal(err)
	}
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_picture($1) r JOIN member_assessments a ON a.set_id = r.set_id`,
		id).Scan(&expected); err != nil {
		t.Fatal(err)
	}
	if err := db.Pool.QueryRow(ctx, `SELECT count(*), count(*) - count(DISTINCT bridge_id) FROM result_sets`).Scan(&sets, &twice); err != nil {
		t.Fatal(err)
	}
	if status != store.RunCompleted || done != bridges || nb != bridges || rows != distinct || rows != 2*expected ||
		sets != bridges || twice != 0 {
		t.Errorf("run %d %s: %d bridges done, results for %d, %d rows (%d distinct) for %d members, %d result sets (%d twice); "+
			"want %d bridges, 2 rows per member, one set each", id, status, done, nb, rows, distinct, expected, sets, twice, bridges)
	}
}

// waitCompleted polls until the run completes, riding out a database that is restarting.
func waitCompleted(t *testing.T, db *store.DB, id int64, limit time.Duration) {
	t.Helper()
	deadline := time.Now().Add(limit)
	for time.Now().Before(deadline) {
		r, err := db.GetRun(context.Background(), id)
		if err == nil && r.Status == store.RunCompleted {
			return
		}
		time.Sleep(100 * time.Millisecond)
	}
	p, _ := db.Progress(context.Background(), id)
	t.Fatalf("run %d not completed after %v: %+v", id, limit, p)
}

// TestKilledWorkers starts real worker processes and kills them with SIGKILL at random
// moments, several times over, then lets one finish: the run must end with exactly one result
// set per bridge (nothing lost, nothing twice).
func TestKilledWorkers(t *testing.T) {
	t.Parallel()
	url := pgtest.URL(t)
	// Chunks of 25 bridges: a job lasts long enough for a kill to land inside it.
	cfgPath, cfg := faultConfigChunks(t, url, 25)
	db, err := store.Open(context.Background(), store.Options{URL: url})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	const n = 1000
	seedDemoFleet(t, db, n)
	id := newRun(t, db, cfg)
	start := func() *exec.Cmd {
		cmd := exec.Command(os.Args[0], "--", "--config", cfgPath, "worker")
		cmd.Env = append(os.Environ(), beMain+"=1")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		return cmd
	}
	// Kill each worker while it holds a job (one is marked running), so that the kill
	// orphans it; count the kills after which a job was left running by the dead process.
	running := func() int {
		var n int
		_ = db.Pool.QueryRow(context.Background(), `SELECT count(*) FROM river_job
			WHERE (args->>'run_id')::bigint = $1 AND state = 'running'`, id).Scan(&n)
		return n
	}
	r := rand.New(rand.NewPCG(7, 11))
	kills, orphaning := 0, 0
	for orphaning < 3 && kills < 15 {
		w := start()
		// Let it work a while (some chunks commit), then strike while it holds a job.
		time.Sleep(time.Duration(200+r.IntN(600)) * time.Millisecond)
		for deadline := time.Now().Add(10 * time.Second); running() == 0 && time.Now().Before(deadline); {
			time.Sleep(2 * time.Millisecond)
		}
		if err := w.Process.Signal(syscall.SIGKILL); err != nil {
			t.Fatal(err)
		}
		_ = w.Wait()
		kills++
		if running() > 0 {
			orphaning++
		}
		p, _ := db.Progress(context.Background(), id)
		t.Logf("kill %d: %d of %d bridges done, %d kills left a job running", kills, p.Done, p.Total, orphaning)
	}
	if orphaning == 0 {
		t.Fatalf("none of %d kills caught a worker holding a job", kills)
	}
	w := start()
	defer func() {
		_ = w.Process.Signal(syscall.SIGTERM)
		_ = w.Wait()
	}()
	// Jobs the killed workers held are rescued after rescue_after by River's rescuer, which
	// runs about every 30 s on the elected leader.
	waitCompleted(t, db, id, 3*time.Minute)
	checkOnce(t, db, id, n)
	// The kills landed mid-job: some jobs were worked more than once (rescued from a dead
	// worker), and still nothing was written twice.
	var rescued int
	if err := db.Pool.QueryRow(context.Background(), `SELECT count(*) FROM river_job
		WHERE (args->>'run_id')::bigint = $1 AND attempt > 1`, id).Scan(&rescued); err != nil {
		t.Fatal(err)
	}
	t.Logf("%d jobs were attempted more than once", rescued)
	if rescued == 0 {
		t.Errorf("%d kills left jobs running, but no job was attempted twice", orphaning)
	}
}

// TestDatabaseRestart restarts the PostgreSQL server in the middle of a run: the workers
// retry and finish, and nothing is lost or written twice.
func TestDatabaseRestart(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	srv, db := ownServer(t)
	url := srv.URL(pgserver.Database)
	_, cfg := faultConfig(t, url)
	const n = 600
	seedDemoFleet(t, db, n)
	id := newRun(t, db, cfg)
	wc, err := fleetrun.NewWorkerClient(db, fleetrun.WorkerOptions{Jobs: 2, Threads: 1, JobTimeout: 2 * time.Second, RescueAfter: 3 * time.Second})
	if err != nil {
		t.Fatal(err)
	}
	if err := wc.Start(ctx); err != nil {
		t.Fatal(err)
	}
	defer wc.Stop(context.Background())
	for {
		p, err := db.Progress(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		if p.Done >= 8 {
			if p.Pending == 0 {
				t.Fatalf("the run ended before the restart: nothing was tested")
			}
			t.Logf("restarting the server with %d of %d bridges done", p.Done, p.Total)
			break
		}
		time.Sleep(5 * time.Millisecond)
	}
	if err := srv.Stop(ctx); err != nil {
		t.Fatal(err)
	}
	time.Sleep(time.Second)
	if err := srv.Start(ctx); err != nil {
		t.Fatal(err)
	}
	waitCompleted(t, db, id, 3*time.Minute)
	checkOnce(t, db, id, n)
}

// TestInterruptAndResume sends SIGINT to a running `trussfleet screen`: it exits 130 with the
// run marked interrupted and its finished bridges kept; `screen --resume` finishes the run,
// every bridge once.
func TestInterruptAndResume(t *testing.T) {
	t.Parallel()
	url := pgtest.URL(t)
	cfgPath, _ := faultConfig(t, url)
	db, err := store.Open(context.Background(), store.Options{URL: url})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	const n = 1500
	seedDemoFleet(t, db, n)
	cmd := exec.Command(os.Args[0], "--", "--config", cfgPath, "screen")
	cmd.Env = append(os.Environ(), beMain+"=1")
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// Interrupt once some bridges are done.
	deadline := time.Now().Add(time.Minute)
	var id int64
	for time.Now().Before(deadline) {
		r, err := db.LatestRun(context.Background(), false)
		if err == nil {
			if p, err := db.Progress(context.Background(), r.ID); err == nil && p.Done >= 40 {
				id = r.ID
				break
			}
		}
		time.Sleep(20 * time.Millisecond)
	}
	if id == 0 {
		t.Fatal("the run never started")
	}
	if err := cmd.Process.Signal(os.Interrupt); err != nil {
		t.Fatal(err)
	}
	err = cmd.Wait()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != exitInterrupted {
		t.Fatalf("screen after SIGINT: %v, want exit code %d", err, exitInterrupted)
	}
	r, _ := db.GetRun(context.Background(), id)
	p, _ := db.Progress(context.Background(), id)
	if r.Status != store.RunInterrupted || p.Done == 0 || p.Pending == 0 {
		t.Fatalf("after the interrupt: run %s, %+v; want interrupted with some bridges kept and some left", r.Status, p)
	}
	out, err := runCmd(t, "--config", cfgPath, "screen", "--resume", strconv.FormatInt(id, 10))
	if err != nil {
		t.Fatalf("resume: %v\n%s", err, out)
	}
	checkOnce(t, db, id, n)
}
