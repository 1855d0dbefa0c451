package benchdb_test

import (
	"context"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/cmd/trussfleet-bench/internal/benchdb"
	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/importers"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestCopyFloorAndDeleteRun: the COPY floor copies every result row of the run, no more
// (reference: the rows counted in the run's own tables), and DeleteRun leaves no row of the
// run in any table, the result tables having no cascade to clear them.
func TestCopyFloorAndDeleteRun(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 6)
	ic, err := fleetrun.NewInsertClient(db)
	if err != nil {
		t.Fatal(err)
	}
	plan := testPlan(t, db)
	id, err := ic.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 4})
	if err != nil {
		t.Fatal(err)
	}
	runToEnd(t, db, id, 2)
	count := func(table string) int64 {
		var n int64
		q := "SELECT count(*) FROM " + table + " WHERE run_id = $1"
		if table != "run_bridges" {
			q = "SELECT count(*) FROM " + table + " m JOIN run_bridges r ON r.set_id = m.set_id AND r.run_id = $1"
		}
		if err := db.Pool.QueryRow(ctx, q, id).Scan(&n); err != nil {
			t.Fatal(err)
		}
		return n
	}
	want := count("member_results") + count("member_assessments") + count("category_results")
	if want == 0 {
		t.Fatal("the run wrote no result rows")
	}
	f, err := benchdb.MeasureCopyFloor(ctx, db.Pool, id, t.TempDir(), benchdb.FloorOptions{Streams: 2, Repeats: 2})
	if err != nil {
		t.Fatal(err)
	}
	if f.Rows != want || f.Bytes <= 0 || f.Elapsed <= 0 {
		t.Fatalf("copy floor: %d rows, %d bytes, %v; want %d rows", f.Rows, f.Bytes, f.Elapsed, want)
	}
	if len(f.Times) != 2 || f.Elapsed != min(f.Times[0], f.Times[1]) {
		t.Fatalf("copy floor %v of times %v: want the fastest of 2", f.Elapsed, f.Times)
	}
	if err := db.DeleteRun(ctx, id); err != nil {
		t.Fatal(err)
	}
	for _, table := range []string{"member_results", "member_assessments", "result_sets"} {
		var n int64
		if err := db.Pool.QueryRow(ctx, "SELECT count(*) FROM "+table).Scan(&n); err != nil || n != 0 {
			t.Errorf("%s: %d rows left after the only run was deleted (%v)", table, n, err)
		}
	}
	if n := count("run_bridges"); n != 0 {
		t.Errorf("run_bridges: %d rows of the deleted run left", n)
	}
	if err := db.DeleteRun(ctx, id); err == nil {
		t.Error("deleting the run again: no error")
	}
}

// seedFleet imports the example trains and an invented fleet of n bridges, as the benchmark
// does, through the importers.
func seedFleet(t *testing.T, db *store.DB, n int) {
	t.Helper()
	ctx := context.Background()
	dir := t.TempDir()
	trains := filepath.Join(dir, "trains")
	if err := os.CopyFS(trains, configs.Trains()); err != nil {
		t.Fatal(err)
	}
	ref, err := traffic.ParseSpec("northmoor-freight-today", configs.Trains())
	if err != nil {
		t.Fatal(err)
	}
	opt := fleetgen.Defaults(n)
	opt.Reference = ref
	bridges, members := filepath.Join(dir, "bridges.csv"), filepath.Join(dir, "members.csv")
	bf, err := os.Create(bridges)
	if err != nil {
		t.Fatal(err)
	}
	defer bf.Close()
	mf, err := os.Create(members)
	if err != nil {
		t.Fatal(err)
	}
	defer mf.Close()
	if err := fleetgen.Generate(opt, bf, mf); err != nil {
		t.Fatal(err)
	}
	if _, err := importers.ImportTrains(ctx, db, trains, importers.Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := importers.ImportBridgesFile(ctx, db, bridges, importers.Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := importers.ImportMembersFile(ctx, db, members, importers.Options{}); err != nil {
		t.Fatal(err)
	}
}

// testPlan compares the example freight and multiple-unit trains with the proposed freight
// train and LM71, with the stored rating factors' reference trains.
func testPlan(t *testing.T, db *store.DB) screening.Plan {
	t.Helper()
	ctx := context.Background()
	p := screening.Plan{Dynamic: "phi3", Method: "working-stress", Flag: 1, Review: 1.1, Worse: 0.2}
	resolve := func(names []string) []screening.TrainRef {
		var out []screening.TrainRef
		for _, n := range names {
			r, err := fleetrun.ResolveTrain(ctx, db, n)
			if err != nil {
				t.Fatal(err)
			}
			out = append(out, r)
		}
		return out
	}
	refs, err := db.ReferenceTrains(ctx)
	if err != nil {
		t.Fatal(err)
	}
	p.Existing = resolve([]string{"northmoor-freight-today", "eastfell-multiple-unit"})
	p.Proposed = resolve([]string{"northmoor-freight-proposed", "lm71:alpha=1"})
	p.References = resolve(refs)
	return p
}

// runToEnd works the run's jobs in this process until the run completes.
func runToEnd(t *testing.T, db *store.DB, id int64, jobs int) {
	t.Helper()
	ctx := context.Background()
	wc, err := fleetrun.NewWorkerClient(db, fleetrun.WorkerOptions{Jobs: jobs, Threads: 2, JobTimeout: time.Minute, RescueAfter: 2 * time.Minute})
	if err != nil {
		t.Fatal(err)
	}
	if err := wc.Start(ctx); err != nil {
		t.Fatal(err)
	}
	defer wc.Stop(ctx)
	deadline := time.Now().Add(60 * time.Second)
	for time.Now().Before(deadline) {
		r, err := db.GetRun(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		if r.Status == store.RunCompleted {
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatalf("run %d did not complete", id)
}
