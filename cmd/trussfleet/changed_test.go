package main

import (
	"context"
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestChangedRunEqualsFullRun: after a full run, three bridges' capacities change and one
// bridge leaves the inventory. A nightly `screen --changed` (which screens the three and
// carries the rest forward from the full run) and a plain `screen` of the same inputs export
// the same priority lists, byte for byte (reference: the full recomputation).
func TestChangedRunEqualsFullRun(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db, _, mustRun := fleetWithCommands(t, 60)
	mustRun("screen")
	bridges, err := db.Bridges(ctx)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range bridges[10:13] {
		if _, err := db.Pool.Exec(ctx, `UPDATE members SET capacity_tension_kn = capacity_tension_kn * 0.8,
			capacity_compression_kn = capacity_compression_kn * 0.8, rating_factor = rating_factor * 0.8
			WHERE bridge_id = $1`, b.BridgeID); err != nil {
			t.Fatal(err)
		}
	}
	gone := bridges[20].BridgeID
	for _, q := range []string{"DELETE FROM members WHERE bridge_id = $1", "DELETE FROM bridges WHERE bridge_id = $1"} {
		if _, err := db.Pool.Exec(ctx, q, gone); err != nil {
			t.Fatal(err)
		}
	}
	mustRun("screen", "--changed")
	changed, err := db.LatestRun(ctx, true)
	if err != nil {
		t.Fatal(err)
	}
	p, err := db.Progress(ctx, changed.ID)
	if err != nil {
		t.Fatal(err)
	}
	if p.Done != 3 || p.Carried != 56 || p.Total != 59 {
		t.Fatalf("the nightly run screened %d and carried %d of %d; want 3 screened, 56 carried of 59", p.Done, p.Carried, p.Total)
	}
	mustRun("screen")
	full, err := db.LatestRun(ctx, true)
	if err != nil {
		t.Fatal(err)
	}
	exports := map[int64]string{}
	for _, id := range []int64{changed.ID, full.ID} {
		dir := t.TempDir()
		mustRun("export", "--format", "csv", "--run", strconv.FormatInt(id, 10), "--out", dir)
		exports[id] = dir
	}
	for _, f := range []string{"priority-bridges.csv", "priority-members.csv"} {
		a, err := os.ReadFile(filepath.Join(exports[changed.ID], f))
		if err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(exports[full.ID], f))
		if err != nil {
			t.Fatal(err)
		}
		if string(a) != string(b) || len(a) < 200 {
			t.Errorf("%s: the nightly run's export (%d bytes) differs from the full run's (%d bytes)", f, len(a), len(b))
		}
	}
}

// TestKilledPrune kills `runs prune` with SIGKILL at random moments while it removes a chain
// of nightly runs. After every kill each run is whole or gone: a run still there reads exactly
// as before (its priority list and its result rows), no result row is left without its set,
// and no set without a run that names it. The last prune finishes the work.
func TestKilledPrune(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db, cfgPath, mustRun := fleetWithCommands(t, 150)
	mustRun("screen")
	for night := range 7 {
		if _, err := db.Pool.Exec(ctx, `UPDATE members SET capacity_tension_kn = capacity_tension_kn * 0.95
			WHERE bridge_id IN (SELECT bridge_id FROM bridges ORDER BY md5(bridge_id || $1) LIMIT 15)`, strconv.Itoa(night)); err != nil {
			t.Fatal(err)
		}
		if night%3 == 2 {
			mustRun("screen") // a full run in the chain now and then
		} else {
			mustRun("screen", "--changed")
		}
	}
	runs, err := db.Runs(ctx, 100)
	if err != nil {
		t.Fatal(err)
	}
	type picture struct{ ranked, rows string }
	read := func(id int64) picture {
		t.Helper()
		var pr picture
		if ranked, err := db.Ranked(ctx, id, 0); err == nil {
			pr.ranked = rankedText(ranked)
		}
		var rows, sets int
		if err := db.Pool.QueryRow(ctx, `SELECT count(*), count(DISTINCT r.set_id) FROM run_picture($1) r
			JOIN member_results m ON m.set_id = r.set_id`, id).Scan(&rows, &sets); err != nil {
			t.Fatal(err)
		}
		pr.rows = strconv.Itoa(rows) + " rows in " + strconv.Itoa(sets) + " sets"
		return pr
	}
	before := map[int64]picture{}
	for _, r := range runs {
		before[r.ID] = read(r.ID)
	}
	rnd := rand.New(rand.NewPCG(3, 5))
	midway := 0
	for kill := 0; kill < 12; kill++ {
		var had int
		if err := db.Pool.QueryRow(ctx, "SELECT count(*) FROM runs").Scan(&had); err != nil {
			t.Fatal(err)
		}
		cmd := startMain(t, "--config", cfgPath, "runs", "prune", "--keep", "1", "--no-vacuum")
		// Strike once the prune has removed a run (or at the latest after 5 s), a few
		// milliseconds into its work on the next.
		for deadline := time.Now().Add(5 * time.Second); time.Now().Before(deadline); time.Sleep(time.Millisecond) {
			var n int
			if err := db.Pool.QueryRow(ctx, "SELECT count(*) FROM runs").Scan(&n); err == nil && n < had {
				break
			}
		}
		time.Sleep(time.Duration(rnd.IntN(4000)) * time.Microsecond)
		_ = cmd.Process.Signal(syscall.SIGKILL)
		_ = cmd.Wait()
		left, err := db.Runs(ctx, 100)
		if err != nil {
			t.Fatal(err)
		}
		if len(left) > 1 && len(left) < len(runs) {
			midway++
		}
		for _, r := range left {
			if got := read(r.ID); got != before[r.ID] {
				t.Fatalf("after kill %d, run %d reads %s, had %s (or its list changed)", kill+1, r.ID, got.rows, before[r.ID].rows)
			}
		}
		var orphanRows, unnamedSets int
		if err := db.Pool.QueryRow(ctx, `SELECT
			(SELECT count(*) FROM member_results m WHERE NOT EXISTS (SELECT 1 FROM result_sets s WHERE s.id = m.set_id)),
			(SELECT count(*) FROM result_sets s WHERE NOT EXISTS (SELECT 1 FROM run_bridges r WHERE r.set_id = s.id))`).
			Scan(&orphanRows, &unnamedSets); err != nil {
			t.Fatal(err)
		}
		if orphanRows != 0 || unnamedSets != 0 {
			t.Fatalf("after kill %d: %d result rows without a set, %d sets no run names", kill+1, orphanRows, unnamedSets)
		}
		if len(left) == 1 {
			break
		}
	}
	t.Logf("%d kills landed with the prune part done", midway)
	if midway == 0 {
		t.Error("no kill landed in the middle of a prune: nothing was tested")
	}
	mustRun("runs", "prune", "--keep", "1")
	left, err := db.Runs(ctx, 100)
	if err != nil {
		t.Fatal(err)
	}
	last := runs[0].ID // newest first
	if len(left) != 1 || left[0].ID != last || read(last) != before[last] {
		t.Errorf("after the last prune: %d runs left, want only run %d reading as before", len(left), last)
	}
}

// fleetWithCommands gives a fresh database holding an invented fleet of n bridges, its
// config file, and a runner of trussfleet commands on it that fails the test on an error.
func fleetWithCommands(t *testing.T, n int) (*store.DB, string, func(args ...string)) {
	t.Helper()
	url := pgtest.URL(t)
	cfgPath, _ := faultConfig(t, url)
	db, err := store.Open(context.Background(), store.Options{URL: url})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(db.Close)
	seedDemoFleet(t, db, n)
	return db, cfgPath, func(args ...string) {
		t.Helper()
		if out, err := runCmd(t, append([]string{"--config", cfgPath}, args...)...); err != nil {
			t.Fatalf("%v: %v\n%s", args, err, out)
		}
	}
}

// rankedText is a priority list as text: its values, not the addresses of its pointers.
func rankedText(rows any) string {
	b, err := json.Marshal(rows)
	if err != nil {
		return err.Error()
	}
	return string(b)
}
