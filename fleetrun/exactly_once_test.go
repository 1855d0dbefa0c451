package fleetrun_test

import (
	"context"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// countResults gives the member result rows of a run's picture (through the result sets its
// bridges name) and how many distinct keys they have.
func countResults(t *testing.T, db *store.DB, id int64) (rows, distinct, bridges int) {
	t.Helper()
	err := db.Pool.QueryRow(context.Background(), `SELECT count(*), count(DISTINCT (r.bridge_id, m.scenario, m.member)),
		count(DISTINCT r.bridge_id) FROM run_picture($1) r JOIN member_results m ON m.set_id = r.set_id`, id).Scan(&rows, &distinct, &bridges)
	if err != nil {
		t.Fatal(err)
	}
	return rows, distinct, bridges
}

// TestSharedRunWritesOnce: three worker clients share one run while every chunk is queued
// twice (as a rescued job whose first attempt committed would be). Each bridge's results are
// stored once and every job ends completed, none failed.
func TestSharedRunWritesOnce(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 30)
	plan := testPlan(t, db)
	ic, err := fleetrun.NewInsertClient(db)
	if err != nil {
		t.Fatal(err)
	}
	// A run whose first chunk's bridges are queued again before any worker starts.
	id, err := ic.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 3})
	if err != nil {
		t.Fatal(err)
	}
	bridges, err := db.Bridges(ctx)
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < len(bridges); i += 3 {
		var ids []string
		for _, b := range bridges[i:min(i+3, len(bridges))] {
			ids = append(ids, b.BridgeID)
		}
		if err := ic.QueueChunk(ctx, fleetrun.ChunkArgs{RunID: id, Bridges: ids}); err != nil {
			t.Fatal(err)
		}
	}
	var clients []*fleetrun.Client
	for range 3 {
		wc, err := fleetrun.NewWorkerClient(db, fleetrun.WorkerOptions{Jobs: 2, Threads: 1, JobTimeout: time.Minute, RescueAfter: 2 * time.Minute})
		if err != nil {
			t.Fatal(err)
		}
		if err := wc.Start(ctx); err != nil {
			t.Fatal(err)
		}
		clients = append(clients, wc)
	}
	deadline := time.Now().Add(60 * time.Second)
	for {
		open, err := db.OpenJobs(ctx, id)
		if err != nil {
			t.Fatal(err)
		}
		if open == 0 {
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("%d jobs still open", open)
		}
		time.Sleep(50 * time.Millisecond)
	}
	for _, c := range clients {
		if err := c.Stop(ctx); err != nil {
			t.Fatal(err)
		}
	}
	rows, distinct, nb := countResults(t, db, id)
	if rows != distinct || nb != 30 {
		t.Errorf("%d result rows, %d distinct keys, %d bridges; want one set for each of 30", rows, distinct, nb)
	}
	var failed, completed int
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FILTER (WHERE state IN ('discarded', 'retryable')),
		count(*) FILTER (WHERE state = 'completed') FROM river_job WHERE (args->>'run_id')::bigint = $1`, id).Scan(&failed, &completed); err != nil {
		t.Fatal(err)
	}
	if failed != 0 || completed != 20 {
		t.Errorf("jobs: %d failed or retrying, %d completed; want 0 and 20", failed, completed)
	}
	r, _ := db.GetRun(ctx, id)
	if r.Status != store.RunCompleted {
		t.Errorf("run %s", r.Status)
	}
}

// TestRacingRunsStoreASetOnce: two full runs of the same fleet are worked at the same time by
// two worker clients, one bridge a job, so that jobs of both runs screen the same bridge at
// once and race to store the same result set. Each bridge ends with exactly one set, named by
// both runs, its rows stored once.
func TestRacingRunsStoreASetOnce(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 16)
	_, a := createRun(t, db, 1)
	_, b := createRun(t, db, 1)
	var clients []*fleetrun.Client
	for range 2 {
		wc, err := fleetrun.NewWorkerClient(db, fleetrun.WorkerOptions{Jobs: 4, Threads: 1, JobTimeout: time.Minute, RescueAfter: 2 * time.Minute})
		if err != nil {
			t.Fatal(err)
		}
		if err := wc.Start(ctx); err != nil {
			t.Fatal(err)
		}
		clients = append(clients, wc)
	}
	waitRun(t, db, a, time.Minute)
	waitRun(t, db, b, time.Minute)
	for _, c := range clients {
		if err := c.Stop(ctx); err != nil {
			t.Fatal(err)
		}
	}
	var sets, bridges, shared, rows, distinct int
	if err := db.Pool.QueryRow(ctx, `SELECT count(*), count(DISTINCT bridge_id) FROM result_sets`).Scan(&sets, &bridges); err != nil {
		t.Fatal(err)
	}
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_bridges x JOIN run_bridges y
		ON x.bridge_id = y.bridge_id AND x.run_id = $1 AND y.run_id = $2 AND x.set_id = y.set_id`, a, b).Scan(&shared); err != nil {
		t.Fatal(err)
	}
	if err := db.Pool.QueryRow(ctx, `SELECT count(*), count(DISTINCT (set_id, scenario, member)) FROM member_results`).Scan(&rows, &distinct); err != nil {
		t.Fatal(err)
	}
	ra, _, na := countResults(t, db, a)
	rb, _, nb := countResults(t, db, b)
	if sets != 16 || bridges != 16 || shared != 16 || rows != distinct || rows != ra || ra != rb || na != 16 || nb != 16 {
		t.Errorf("%d sets for %d bridges, %d named by both runs; %d member rows (%d distinct); runs read %d and %d rows for %d and %d bridges; "+
			"want 16 sets, each named by both runs, stored once", sets, bridges, shared, rows, distinct, ra, rb, na, nb)
	}
}
