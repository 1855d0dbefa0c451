package fleetrun_test

import (
	"context"
	"encoding/json"
	"slices"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// picture is what readers see of a run: its priority list and its result rows.
type picture struct {
	ranked        string
	rows, bridges int
}

func pictureOf(t *testing.T, db *store.DB, id int64) picture {
	t.Helper()
	ranked, err := db.Ranked(context.Background(), id, 0)
	if err != nil {
		t.Fatal(err)
	}
	rows, _, bridges := countResults(t, db, id)
	text, err := json.Marshal(ranked) // the values, not the pointers' addresses
	if err != nil {
		t.Fatal(err)
	}
	return picture{string(text), rows, bridges}
}

// TestPruneRuns: a full run, nightly runs that screen only what changed (one bridge's
// capacities change twice), an interrupted run and a running one. Keeping two completed runs
// removes the older runs; the kept runs read exactly as before although their pictures
// continued in the pruned ones; the result sets only pruned runs named are gone with their
// rows, the shared ones stay; a running run is never removed.
func TestPruneRuns(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 6)
	ic, full := createRun(t, db, 3)
	runToEnd(t, db, full, 2)
	bridges, err := db.Bridges(ctx)
	if err != nil {
		t.Fatal(err)
	}
	victim := bridges[2].BridgeID
	halve := func() {
		t.Helper()
		if _, err := db.Pool.Exec(ctx, `UPDATE members SET capacity_tension_kn = capacity_tension_kn / 2,
			capacity_compression_kn = capacity_compression_kn / 2, rating_factor = rating_factor / 2 WHERE bridge_id = $1`, victim); err != nil {
			t.Fatal(err)
		}
	}
	plan := testPlan(t, db)
	nightly := func() int64 {
		t.Helper()
		id, err := ic.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{}, Plan: plan,
			PlanHash: plan.Hash(), ChunkSize: 3, Changed: true})
		if err != nil {
			t.Fatal(err)
		}
		runToEnd(t, db, id, 1)
		return id
	}
	halve()
	second := nightly()
	_, interrupted := createRun(t, db, 3)
	if err := db.SetRunStatus(ctx, interrupted, store.RunInterrupted); err != nil {
		t.Fatal(err)
	}
	halve()
	third := nightly()
	fourth := nightly() // nothing changed: no row of its own
	_, running := createRun(t, db, 3)
	kept := []int64{third, fourth}
	before := map[int64]picture{}
	for _, id := range kept {
		before[id] = pictureOf(t, db, id)
	}
	var sets, setRows int
	if err := db.Pool.QueryRow(ctx, `SELECT count(*), (SELECT count(*) FROM member_results) FROM result_sets`).Scan(&sets, &setRows); err != nil {
		t.Fatal(err)
	}
	if sets != 8 {
		t.Fatalf("%d result sets before pruning, want 8: one per bridge, two more for the changed bridge", sets)
	}
	// Dry run: the list, nothing removed.
	p, err := db.PruneRuns(ctx, store.Retention{Keep: 2, DryRun: true})
	if err != nil {
		t.Fatal(err)
	}
	if want := []int64{full, second, interrupted}; !slices.Equal(p.Runs, want) {
		t.Errorf("dry run lists %v, want %v", p.Runs, want)
	}
	// An age rule that lets nothing go (every run is newer) keeps everything, even with keep.
	if p, err := db.PruneRuns(ctx, store.Retention{Keep: 1, OlderThan: time.Hour}); err != nil || len(p.Runs) != 0 {
		t.Errorf("keep 1 and older than an hour removed %v (%v); want nothing", p.Runs, err)
	}
	p, err = db.PruneRuns(ctx, store.Retention{Keep: 2})
	if err != nil {
		t.Fatal(err)
	}
	if want := []int64{full, second, interrupted}; !slices.Equal(p.Runs, want) {
		t.Errorf("pruned %v, want %v", p.Runs, want)
	}
	for _, id := range kept {
		if got := pictureOf(t, db, id); got != before[id] || got.bridges != 6 {
			t.Errorf("kept run %d after prune: %d rows for %d bridges, had %d for %d (or its list changed)",
				id, got.rows, got.bridges, before[id].rows, before[id].bridges)
		}
	}
	var setsAfter, setRowsAfter, own int
	if err := db.Pool.QueryRow(ctx, `SELECT count(*), (SELECT count(*) FROM member_results) FROM result_sets`).Scan(&setsAfter, &setRowsAfter); err != nil {
		t.Fatal(err)
	}
	// The two sets of the changed bridge's earlier capacities were named only by pruned runs.
	if setsAfter != 6 || p.Rows["result_sets"] != 2 || int64(setRows-setRowsAfter) != p.Rows["member_results"] || p.Rows["member_results"] == 0 {
		t.Errorf("result sets %d -> %d, member rows %d -> %d, reported %v; want 8 -> 6 and the reported rows gone",
			sets, setsAfter, setRows, setRowsAfter, p.Rows)
	}
	// A set's line categories (one row a category, testPlan rates them) go with it.
	var catRows int
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM category_results`).Scan(&catRows); err != nil ||
		catRows != 11*setsAfter || p.Rows["category_results"] != 22 {
		t.Errorf("category rows %d for %d sets, %d removed with the pruned sets (%v); want 11 a set, 22 removed", catRows, setsAfter, p.Rows["category_results"], err)
	}
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_bridges WHERE run_id = $1`, fourth).Scan(&own); err != nil || own != 0 {
		t.Errorf("the unchanged nightly run holds %d rows of its own (%v), want 0", own, err)
	}
	for _, id := range []int64{full, second, interrupted} {
		if _, err := db.GetRun(ctx, id); err == nil {
			t.Errorf("run %d still there", id)
		}
	}
	// Keep 1 and older than a day, a day from now: the third run goes and passes its picture
	// on to the fourth; the running run stays.
	p, err = db.PruneRuns(ctx, store.Retention{Keep: 1, Now: time.Now().Add(48 * time.Hour), OlderThan: 24 * time.Hour})
	if err != nil {
		t.Fatal(err)
	}
	if want := []int64{third}; !slices.Equal(p.Runs, want) {
		t.Errorf("second prune removed %v, want %v", p.Runs, want)
	}
	if got := pictureOf(t, db, fourth); got != before[fourth] {
		t.Errorf("run %d after its base was pruned: %d rows for %d bridges, had %d for %d", fourth, got.rows, got.bridges,
			before[fourth].rows, before[fourth].bridges)
	}
	if r, err := db.GetRun(ctx, running); err != nil || r.Status != store.RunRunning {
		t.Errorf("running run after prunes: %+v, %v", r, err)
	}
	if err := db.VacuumRuns(ctx, false); err != nil {
		t.Fatal(err)
	}
}
