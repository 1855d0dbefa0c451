package store_test

import (
	"context"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// countResults gives the member result rows of a run and how many distinct keys they have.
func countResults(t *testing.T, db *store.DB, id int64) (rows, distinct, bridges int) {
	t.Helper()
	err := db.Pool.QueryRow(context.Background(), `SELECT count(*), count(DISTINCT (bridge_id, scenario, member)),
		count(DISTINCT bridge_id) FROM member_results WHERE run_id = $1`, id).Scan(&rows, &distinct, &bridges)
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
	ic, err := db.NewInsertClient()
	if err != nil {
		t.Fatal(err)
	}
	// A run whose first chunk's bridges are queued again before any worker starts.
	id, err := ic.CreateRun(ctx, store.NewRun{ProgramVersion: "test", Config: map[string]any{}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 3})
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
		if err := ic.QueueChunk(ctx, store.ChunkArgs{RunID: id, Bridges: ids}); err != nil {
			t.Fatal(err)
		}
	}
	var clients []*store.Client
	for range 3 {
		wc, err := db.NewWorkerClient(store.WorkerOptions{Jobs: 2, Threads: 1, JobTimeout: time.Minute, RescueAfter: 2 * time.Minute})
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
