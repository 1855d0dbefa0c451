package fleetrun_test

import (
	"bytes"
	"context"
	"encoding/json"
	"io/fs"
	"strings"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/importers"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// seedFleet loads an invented fleet straight into the tables (the importers have tests of
// their own) and stores the example trains.
func seedFleet(t *testing.T, db *store.DB, n int) {
	t.Helper()
	ctx := context.Background()
	ref, err := traffic.ParseSpec("northmoor-freight-today", configs.Trains())
	if err != nil {
		t.Fatal(err)
	}
	var bridges, members bytes.Buffer
	opt := fleetgen.Defaults(n)
	opt.Reference = ref
	if err := fleetgen.Generate(opt, &bridges, &members); err != nil {
		t.Fatal(err)
	}
	conn, err := db.Pool.Acquire(ctx)
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Release()
	// The bridges through the importer: the cross-section columns of fleetgen's rows (a list
	// of offsets, shares left empty) are its to read.
	if _, err := importers.ImportBridges(ctx, db, "bridges.csv", &bridges, importers.Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := conn.Conn().PgConn().CopyFrom(ctx, &members, "COPY members ("+strings.Join(fleetgen.MemberHeader, ", ")+") FROM STDIN (FORMAT csv, HEADER true, FORCE_NOT_NULL (fatigue_category))"); err != nil {
		t.Fatal(err)
	}
	names, _ := fs.Glob(configs.Trains(), "*.yaml")
	for _, f := range names {
		src, _ := fs.ReadFile(configs.Trains(), f)
		tr, err := traffic.ParseTrainFile(f, src)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := conn.Exec(ctx, "INSERT INTO trains (name, file_name, source, sha256) VALUES ($1, $2, $3, $4)",
			tr.Name, f, string(src), "0000000000000000000000000000000000000000000000000000000000000000"); err != nil {
			t.Fatal(err)
		}
	}
}

func testPlan(t *testing.T, db *store.DB) screening.Plan {
	t.Helper()
	ctx := context.Background()
	p := screening.Plan{Dynamic: "phi3", Method: "working-stress", Flag: 1, Review: 1.1, Worse: 0.2, Network: true}
	for _, n := range []string{"northmoor-freight-today", "eastfell-multiple-unit"} {
		r, err := fleetrun.ResolveTrain(ctx, db, n)
		if err != nil {
			t.Fatal(err)
		}
		p.Existing = append(p.Existing, r)
	}
	for _, n := range []string{"northmoor-freight-proposed", "lm71:alpha=1"} {
		r, err := fleetrun.ResolveTrain(ctx, db, n)
		if err != nil {
			t.Fatal(err)
		}
		p.Proposed = append(p.Proposed, r)
	}
	refs, err := db.ReferenceTrains(ctx)
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range refs {
		r, err := fleetrun.ResolveTrain(ctx, db, n)
		if err != nil {
			t.Fatal(err)
		}
		p.References = append(p.References, r)
	}
	return p
}

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
	// The jobs' own errors say why (a worker's failure is retried, not logged).
	var errs []string
	if err := db.Pool.QueryRow(ctx, "SELECT coalesce(array_agg(e::text), '{}') FROM river_job, unnest(errors) e").Scan(&errs); err != nil {
		t.Logf("reading job errors: %v", err)
	}
	t.Fatalf("run %d did not complete; job errors: %s", id, strings.Join(errs, "\n"))
}

// TestRunScreensEveryBridgeOnce: a run over an invented fleet ends with exactly one result
// set per bridge, and its stored numbers are the ones screening computes for that bridge.
func TestRunScreensEveryBridgeOnce(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 23)
	plan := testPlan(t, db)
	ic, err := fleetrun.NewInsertClient(db)
	if err != nil {
		t.Fatal(err)
	}
	id, err := ic.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{"k": 1}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 4})
	if err != nil {
		t.Fatal(err)
	}
	if n, err := db.OpenJobs(ctx, id); err != nil || n != 6 {
		t.Fatalf("open jobs %d (%v), want 6 chunks of up to 4 bridges", n, err)
	}
	runToEnd(t, db, id, 2)
	p, err := db.Progress(ctx, id)
	if err != nil || p.Done != 23 || p.Pending != 0 {
		t.Fatalf("progress %+v, %v", p, err)
	}
	var members int
	results, distinct, _ := countResults(t, db, id)
	// Every member of every bridge: the geometry's member count, per scenario.
	set, err := plan.Settings()
	if err != nil {
		t.Fatal(err)
	}
	bridges, err := db.Bridges(ctx)
	if err != nil {
		t.Fatal(err)
	}
	for _, b := range bridges {
		ms, err := db.Members(ctx, b.BridgeID)
		if err != nil {
			t.Fatal(err)
		}
		res := screening.ScreenBridge(fleetrun.ScreeningInput(b, ms), set)
		if res.Err != nil {
			t.Fatal(res.Err)
		}
		members += len(res.Members)
		var rfp *float64
		if err := db.Pool.QueryRow(ctx, `SELECT rf_proposed FROM run_bridges WHERE run_id = $1 AND bridge_id = $2`, id, b.BridgeID).Scan(&rfp); err != nil {
			t.Fatal(err)
		}
		if rfp == nil || *rfp != res.Summary.WorstPr.RF {
			t.Errorf("%s: stored RF %v, computed %v", b.BridgeID, rfp, res.Summary.WorstPr.RF)
		}
	}
	if results != 2*members || distinct != results {
		t.Errorf("member results %d (distinct %d), want %d", results, distinct, 2*members)
	}
	ranked, err := db.Ranked(ctx, id, 0)
	if err != nil || len(ranked) != 23 {
		t.Fatalf("ranked %d, %v", len(ranked), err)
	}
	for i := 1; i < len(ranked); i++ {
		a, b := ranked[i-1].RFProposed, ranked[i].RFProposed
		if a != nil && b != nil && *a > *b {
			t.Errorf("rank %d RF %v above rank %d RF %v", i, *a, i+1, *b)
		}
	}
	// The jobs hashed each bridge's inputs as they loaded them.
	var unhashed int
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_bridges WHERE run_id = $1 AND input_hash = ''`, id).Scan(&unhashed); err != nil || unhashed != 0 {
		t.Errorf("%d bridges without an input hash (%v)", unhashed, err)
	}
	// A nightly run with nothing changed carries every bridge forward, queues nothing and
	// writes no row of its own: the hashes it takes of every bridge when it is created equal
	// those the jobs took.
	id2, err := ic.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{"k": 1}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 4, Changed: true})
	if err != nil {
		t.Fatal(err)
	}
	r2, _ := db.GetRun(ctx, id2)
	p2, _ := db.Progress(ctx, id2)
	var own int
	_ = db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_bridges WHERE run_id = $1`, id2).Scan(&own)
	carried, _, _ := countResults(t, db, id2)
	if r2.Status != store.RunCompleted || p2.Carried != 23 || own != 0 || carried != results {
		t.Errorf("unchanged nightly run: status %s, %+v, %d rows of its own, %d results", r2.Status, p2, own, carried)
	}
	var raw json.RawMessage = r2.Plan
	if len(raw) == 0 {
		t.Error("run has no plan")
	}
	if d, err := db.DiffRuns(ctx, id, id2); err != nil || len(d) != 0 {
		t.Errorf("diff of a carried run: %v, %v", d, err)
	}
	// Halve one bridge's capacities: the next nightly run screens that bridge alone, and the
	// diff names it with its lower RF (RF = (C − D)/L falls when C does).
	victim := ranked[len(ranked)-1].BridgeID
	if _, err := db.Pool.Exec(ctx, `UPDATE members SET capacity_tension_kn = capacity_tension_kn / 2,
		capacity_compression_kn = capacity_compression_kn / 2, rating_factor = rating_factor / 2 WHERE bridge_id = $1`, victim); err != nil {
		t.Fatal(err)
	}
	id3, err := ic.CreateRun(ctx, fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{"k": 1}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 4, Changed: true})
	if err != nil {
		t.Fatal(err)
	}
	runToEnd(t, db, id3, 1)
	p3, _ := db.Progress(ctx, id3)
	if p3.Done != 1 || p3.Carried != 22 {
		t.Errorf("after one change: %+v, want 1 screened and 22 carried", p3)
	}
	d, err := db.DiffRuns(ctx, id2, id3)
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, c := range d {
		if c.BridgeID == victim {
			found = c.RFA != nil && c.RFB != nil && *c.RFB < *c.RFA
		}
	}
	if !found {
		t.Errorf("diff %+v does not show %s with a lower RF", d, victim)
	}
}

// TestFinishRunsAfterALostCheck: a run whose bridges are all written but which is still
// open (the process of its last job died between the job's commit and its check) is
// completed by FinishRuns; a run with a bridge pending is left running.
func TestFinishRunsAfterALostCheck(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 5)
	plan := testPlan(t, db)
	ic, err := fleetrun.NewInsertClient(db)
	if err != nil {
		t.Fatal(err)
	}
	nr := fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{}, Plan: plan, PlanHash: plan.Hash(), ChunkSize: 5}
	done, err := ic.CreateRun(ctx, nr)
	if err != nil {
		t.Fatal(err)
	}
	runToEnd(t, db, done, 1)
	if _, err := db.Pool.Exec(ctx, `UPDATE runs SET status = 'running', finished_at = NULL WHERE id = $1`, done); err != nil {
		t.Fatal(err)
	}
	open, err := ic.CreateRun(ctx, nr)
	if err != nil {
		t.Fatal(err)
	}
	if err := db.FinishRuns(ctx, 0); err != nil {
		t.Fatal(err)
	}
	for id, want := range map[int64]string{done: store.RunCompleted, open: store.RunRunning} {
		if r, err := db.GetRun(ctx, id); err != nil || r.Status != want {
			t.Errorf("run %d: %s (%v), want %s", id, r.Status, err, want)
		}
	}
}
