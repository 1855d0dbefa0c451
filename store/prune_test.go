package store_test

import (
	"context"
	"slices"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// runRows counts a run's rows in each table that holds rows of runs.
func runRows(t *testing.T, db *store.DB, id int64) [4]int {
	t.Helper()
	var n [4]int
	err := db.Pool.QueryRow(context.Background(), `SELECT
		(SELECT count(*) FROM runs WHERE id = $1), (SELECT count(*) FROM run_bridges WHERE run_id = $1),
		(SELECT count(*) FROM member_results WHERE run_id = $1), (SELECT count(*) FROM member_assessments WHERE run_id = $1)`,
		id).Scan(&n[0], &n[1], &n[2], &n[3])
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// TestPruneRuns: four completed runs, an interrupted one between them and a running one.
// Keeping two removes the runs older than the second newest completed one, every row of
// them; the kept runs' rows stay as they were; a running run is never removed.
func TestPruneRuns(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 6)
	var ids []int64
	for i := range 5 {
		_, id := createRun(t, db, 3)
		if i == 1 {
			if err := db.SetRunStatus(ctx, id, store.RunInterrupted); err != nil {
				t.Fatal(err)
			}
		} else {
			runToEnd(t, db, id, 2)
		}
		ids = append(ids, id)
	}
	_, running := createRun(t, db, 3)
	before := map[int64][4]int{}
	for _, id := range append(slices.Clone(ids), running) {
		before[id] = runRows(t, db, id)
	}
	if before[ids[0]][2] == 0 {
		t.Fatalf("run %d has no results: nothing to prune", ids[0])
	}
	// Dry run: the list, nothing removed.
	p, err := db.PruneRuns(ctx, store.Retention{Keep: 2, DryRun: true})
	if err != nil {
		t.Fatal(err)
	}
	if want := ids[:3]; !slices.Equal(p.Runs, want) {
		t.Errorf("dry run lists %v, want %v", p.Runs, want)
	}
	if got := runRows(t, db, ids[0]); got != before[ids[0]] {
		t.Errorf("dry run removed rows: %v, had %v", got, before[ids[0]])
	}
	// An age rule that lets nothing go (every run is newer) keeps everything, even with keep.
	if p, err := db.PruneRuns(ctx, store.Retention{Keep: 1, OlderThan: time.Hour}); err != nil || len(p.Runs) != 0 {
		t.Errorf("keep 1 and older than an hour removed %v (%v); want nothing", p.Runs, err)
	}
	p, err = db.PruneRuns(ctx, store.Retention{Keep: 2})
	if err != nil {
		t.Fatal(err)
	}
	if want := ids[:3]; !slices.Equal(p.Runs, want) {
		t.Errorf("pruned %v, want %v", p.Runs, want)
	}
	var removedResults int64
	for _, id := range ids[:3] {
		if got := runRows(t, db, id); got != [4]int{} {
			t.Errorf("run %d after prune: %v rows left, want none", id, got)
		}
		removedResults += int64(before[id][2])
	}
	if p.Rows["member_results"] != removedResults {
		t.Errorf("reported %d member_results removed, want %d", p.Rows["member_results"], removedResults)
	}
	for _, id := range append(slices.Clone(ids[3:]), running) {
		if got := runRows(t, db, id); got != before[id] {
			t.Errorf("kept run %d: rows %v, had %v", id, got, before[id])
		}
	}
	// Keep 1 with the latest completed run last: the one before it goes; the running run stays.
	p, err = db.PruneRuns(ctx, store.Retention{Keep: 1, Now: time.Now().Add(48 * time.Hour), OlderThan: 24 * time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	if want := ids[3:4]; !slices.Equal(p.Runs, want) {
		t.Errorf("second prune removed %v, want %v", p.Runs, want)
	}
	if r, err := db.GetRun(ctx, running); err != nil || r.Status != store.RunRunning {
		t.Errorf("running run after prunes: %+v, %v", r, err)
	}
	if err := db.VacuumRuns(ctx, false); err != nil {
		t.Fatal(err)
	}
}
