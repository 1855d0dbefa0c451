package store_test

import (
	"context"
	"testing"

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
	ic, err := db.NewInsertClient()
	if err != nil {
		t.Fatal(err)
	}
	plan := testPlan(t, db)
	id, err := ic.CreateRun(ctx, store.NewRun{ProgramVersion: "test", Config: map[string]any{}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 4})
	if err != nil {
		t.Fatal(err)
	}
	runToEnd(t, db, id, 2)
	count := func(table string) int64 {
		var n int64
		if err := db.Pool.QueryRow(ctx, "SELECT count(*) FROM "+table+" WHERE run_id = $1", id).Scan(&n); err != nil {
			t.Fatal(err)
		}
		return n
	}
	want := count("member_results") + count("member_assessments")
	if want == 0 {
		t.Fatal("the run wrote no result rows")
	}
	f, err := db.MeasureCopyFloor(ctx, id, t.TempDir(), store.FloorOptions{Streams: 2, Repeats: 2})
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
	for _, table := range []string{"member_results", "member_assessments", "run_bridges"} {
		if n := count(table); n != 0 {
			t.Errorf("%s: %d rows of the deleted run left", table, n)
		}
	}
	if err := db.DeleteRun(ctx, id); err == nil {
		t.Error("deleting the run again: no error")
	}
}
