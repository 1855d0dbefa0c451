package main

import (
	"context"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgserver"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// ownServer starts a PostgreSQL server of the test's own (not the shared throwaway one), so
// that the test may stop or crash it, and returns it with an open, migrated database.
func ownServer(t *testing.T) (*pgserver.Server, *store.DB) {
	t.Helper()
	ctx := context.Background()
	dir, err := os.MkdirTemp("", "tf-crash-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(dir) })
	srv, err := pgserver.New(pgserver.Options{DataDir: filepath.Join(dir, "pg"), SearchPath: os.Getenv("PATH")})
	if err != nil {
		t.Fatal(err)
	}
	if err := srv.Start(ctx); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("no PostgreSQL server: %v", err)
		}
		t.Skipf("no PostgreSQL server: %v", err)
	}
	t.Cleanup(func() { _ = srv.Stop(context.Background()) })
	db, err := store.Open(ctx, store.Options{URL: srv.URL(pgserver.Database)})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(db.Close)
	if _, err := db.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	return srv, db
}

// startMain starts the test binary as the trussfleet command with args.
func startMain(t *testing.T, args ...string) *exec.Cmd {
	t.Helper()
	cmd := exec.Command(os.Args[0], append([]string{"--"}, args...)...)
	cmd.Env = append(os.Environ(), beMain+"=1")
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	return cmd
}

// TestDatabaseCrash crashes the database server twice in the middle of a run (pg_ctl's
// immediate mode: every server process killed, no checkpoint, recovery from the WAL at the
// next start) while `screen` and two `worker` processes work one-bridge jobs. Every commit a
// worker was told of must survive; the run must end, with each bridge's results exactly once,
// and screen must exit 0.
func TestDatabaseCrash(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	srv, db := ownServer(t)
	// One bridge a job: the more commits, the more of them a crash can catch in flight.
	cfgPath, _ := faultConfigChunks(t, srv.URL(pgserver.Database), 1)
	const n = 600
	seedDemoFleet(t, db, n)
	screen := startMain(t, "--config", cfgPath, "--workers", "1", "screen")
	var workers []*exec.Cmd
	for range 2 {
		workers = append(workers, startMain(t, "--config", cfgPath, "--workers", "1", "worker"))
	}
	defer func() {
		for _, w := range workers {
			_ = w.Process.Signal(os.Interrupt)
			_ = w.Wait()
		}
	}()
	var id int64
	for crash, at := range []int{100, 250} {
		for deadline := time.Now().Add(2 * time.Minute); ; time.Sleep(5 * time.Millisecond) {
			if time.Now().After(deadline) {
				t.Fatalf("crash %d: the run did not reach %d bridges", crash+1, at)
			}
			r, err := db.LatestRun(ctx, false)
			if err != nil {
				continue
			}
			p, err := db.Progress(ctx, r.ID)
			if err == nil && p.Done >= at {
				id = r.ID
				if p.Pending == 0 {
					t.Fatalf("the run ended before crash %d: nothing was tested", crash+1)
				}
				t.Logf("crash %d with %d of %d bridges done", crash+1, p.Done, p.Total)
				break
			}
		}
		if err := srv.Crash(ctx); err != nil {
			t.Fatal(err)
		}
		time.Sleep(500 * time.Millisecond)
		if err := srv.Start(ctx); err != nil {
			t.Fatal(err)
		}
	}
	done := make(chan error, 1)
	go func() { done <- screen.Wait() }()
	select {
	case err := <-done:
		var ee *exec.ExitError
		if errors.As(err, &ee) {
			t.Errorf("screen exited %d after the crashes, want 0", ee.ExitCode())
		} else if err != nil {
			t.Fatal(err)
		}
	case <-time.After(4 * time.Minute):
		_ = screen.Process.Kill()
		p, _ := db.Progress(ctx, id)
		t.Fatalf("screen still running 4 minutes after the crashes: %+v", p)
	}
	checkOnce(t, db, id, n)
}

// TestResumeAfterJobsGone: every job of a run is gone (deleted, as River's cleaner does with
// old jobs, or by hand) before any bridge was screened. `screen --resume` queues the bridges
// again and finishes the run, every bridge once.
func TestResumeAfterJobsGone(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	url := pgtest.URL(t)
	cfgPath, cfg := faultConfig(t, url)
	db, err := store.Open(ctx, store.Options{URL: url})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	const n = 40
	seedDemoFleet(t, db, n)
	id := newRun(t, db, cfg)
	if _, err := db.Pool.Exec(ctx, `DELETE FROM river_job WHERE (args->>'run_id')::bigint = $1`, id); err != nil {
		t.Fatal(err)
	}
	out, err := runCmd(t, "--config", cfgPath, "screen", "--resume", strconv.FormatInt(id, 10))
	if err != nil {
		t.Fatalf("resume: %v\n%s", err, out)
	}
	checkOnce(t, db, id, n)
}
