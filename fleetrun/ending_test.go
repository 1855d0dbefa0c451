package fleetrun_test

import (
	"context"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// bridgeStates reads each bridge's status and recorded error in a run.
func bridgeStates(t *testing.T, db *store.DB, id int64) map[string][2]string {
	t.Helper()
	rows, err := db.Pool.Query(context.Background(), `SELECT bridge_id, status, error FROM run_bridges WHERE run_id = $1`, id)
	if err != nil {
		t.Fatal(err)
	}
	defer rows.Close()
	out := map[string][2]string{}
	for rows.Next() {
		var b, s, e string
		if err := rows.Scan(&b, &s, &e); err != nil {
			t.Fatal(err)
		}
		out[b] = [2]string{s, e}
	}
	return out
}

// jobOf is the id of the newest job of the run that holds the bridge.
func jobOf(t *testing.T, db *store.DB, id int64, bridge string) int64 {
	t.Helper()
	var job int64
	if err := db.Pool.QueryRow(context.Background(), `SELECT id FROM river_job WHERE (args->>'run_id')::bigint = $1
		AND args->'bridges' ? $2 ORDER BY id DESC LIMIT 1`, id, bridge).Scan(&job); err != nil {
		t.Fatal(err)
	}
	return job
}

// createRun creates a run of the seeded fleet with chunk bridges a job.
func createRun(t *testing.T, db *store.DB, chunk int) (*fleetrun.Client, int64) {
	t.Helper()
	plan := testPlan(t, db)
	ic, err := fleetrun.NewInsertClient(db)
	if err != nil {
		t.Fatal(err)
	}
	id, err := ic.CreateRun(context.Background(), fleetrun.NewRun{ProgramVersion: "test", Config: map[string]any{},
		Plan: plan, PlanHash: plan.Hash(), ChunkSize: chunk})
	if err != nil {
		t.Fatal(err)
	}
	return ic, id
}

// TestTimedOutChunkIsSplit: one bridge of a chunk takes longer than the job timeout (its
// screening hangs until the job's context ends). The chunk is split into one job per
// bridge; the slow bridge fails with the timeout as its reason, the others are screened, and
// the run completes: nothing waits for River's retries.
func TestTimedOutChunkIsSplit(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 12)
	_, id := createRun(t, db, 6)
	states := bridgeStates(t, db, id)
	ids := make([]string, 0, len(states))
	for b := range states {
		ids = append(ids, b)
	}
	slices.Sort(ids)
	slow := ids[2]
	hang := func(ctx context.Context, bs []screening.Bridge, s *screening.Settings, threads int) ([]screening.Result, error) {
		for _, b := range bs {
			if b.ID == slow {
				<-ctx.Done()
				return nil, ctx.Err()
			}
		}
		return screening.ScreenAll(ctx, bs, s, threads)
	}
	// The slow bridge waits for the job's end, so the timeout costs the test its own length
	// only; it is long enough that the other bridges never reach it on a loaded machine.
	wc, err := fleetrun.NewWorkerClientScreening(db, fleetrun.WorkerOptions{Jobs: 2, Threads: 1, JobTimeout: 3 * time.Second,
		RescueAfter: time.Minute}, hang)
	if err != nil {
		t.Fatal(err)
	}
	if err := wc.Start(ctx); err != nil {
		t.Fatal(err)
	}
	defer wc.Stop(ctx)
	waitRun(t, db, id, 60*time.Second)
	for b, st := range bridgeStates(t, db, id) {
		switch {
		case b == slow && (st[0] != "failed" || !strings.Contains(st[1], "longer than the job timeout")):
			t.Errorf("slow bridge %s: %s %q; want failed with the timeout as reason", b, st[0], st[1])
		case b != slow && st[0] != "done":
			t.Errorf("bridge %s: %s %q; want done", b, st[0], st[1])
		}
	}
	if _, _, nb := countResults(t, db, id); nb != 11 {
		t.Errorf("results for %d bridges, want 11", nb)
	}
	var singles int
	if err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM river_job WHERE (args->>'run_id')::bigint = $1
		AND jsonb_array_length(args->'bridges') = 1`, id).Scan(&singles); err != nil {
		t.Fatal(err)
	}
	if singles != 6 {
		t.Errorf("%d one-bridge jobs, want the timed-out chunk's 6", singles)
	}
}

// waitRun waits for the run to complete.
func waitRun(t *testing.T, db *store.DB, id int64, limit time.Duration) {
	t.Helper()
	for deadline := time.Now().Add(limit); time.Now().Before(deadline); time.Sleep(50 * time.Millisecond) {
		if r, err := db.GetRun(context.Background(), id); err == nil && r.Status == store.RunCompleted {
			return
		}
	}
	p, _ := db.Progress(context.Background(), id)
	t.Fatalf("run %d not completed after %v: %+v", id, limit, p)
}

// TestJobsEndedWithoutWork ends jobs in every way River can end them without the worker
// having its say, then works the run: each bridge ends done or failed with its reason, and
// the run completes.
//   - cancelled through River's own API (JobCancel) before any worker ran it;
//   - stuck as a killed worker leaves it on its last attempt (running, its attempts used up),
//     which River's rescuer discards after RescueAfter;
//   - gone altogether (deleted, as River's cleaner does with old jobs);
//   - completed without its results, as a crash that lost the job's commit left it when
//     River's completer then completed it: queued again, at most MaxRequeues times.
func TestJobsEndedWithoutWork(t *testing.T) {
	t.Parallel()
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 10)
	ic, id := createRun(t, db, 2) // five jobs of two bridges
	states := bridgeStates(t, db, id)
	ids := make([]string, 0, len(states))
	for b := range states {
		ids = append(ids, b)
	}
	slices.Sort(ids)
	cancelled, stuck, gone, lost, lostForGood := ids[0], ids[2], ids[4], ids[6], ids[8]
	if _, err := ic.CancelJob(ctx, jobOf(t, db, id, cancelled)); err != nil {
		t.Fatal(err)
	}
	exec := func(q string, args ...any) {
		t.Helper()
		if _, err := db.Pool.Exec(ctx, q, args...); err != nil {
			t.Fatal(err)
		}
	}
	exec(`UPDATE river_job SET state = 'running', attempt = max_attempts, attempted_at = now() - interval '1 hour',
		attempted_by = '{killed-worker}' WHERE id = $1`, jobOf(t, db, id, stuck))
	exec(`DELETE FROM river_job WHERE id = $1`, jobOf(t, db, id, gone))
	exec(`UPDATE river_job SET state = 'completed', finalized_at = now() WHERE id = $1`, jobOf(t, db, id, lost))
	// The last job's commit is lost again each time it is queued: after MaxRequeues, the
	// bridges are recorded as failed instead of queued for ever.
	for i := 0; i <= fleetrun.MaxRequeues; i++ {
		exec(`UPDATE river_job SET state = 'completed', finalized_at = now() WHERE id = $1`, jobOf(t, db, id, lostForGood))
		rec, err := ic.RecoverRuns(ctx, id, 2)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("sweep %d: %+v", i+1, rec)
	}
	wc, err := fleetrun.NewWorkerClient(db, fleetrun.WorkerOptions{Jobs: 2, Threads: 1, JobTimeout: 10 * time.Second, RescueAfter: 12 * time.Second})
	if err != nil {
		t.Fatal(err)
	}
	if err := wc.Start(ctx); err != nil {
		t.Fatal(err)
	}
	defer wc.Stop(ctx)
	// River's rescuer looks for stuck jobs about every 30 s; the sweep then fails the
	// discarded job's bridges.
	for deadline := time.Now().Add(90 * time.Second); time.Now().Before(deadline); time.Sleep(500 * time.Millisecond) {
		if _, err := wc.RecoverRuns(ctx, id, 2); err != nil {
			t.Fatal(err)
		}
		if r, err := db.GetRun(ctx, id); err == nil && r.Status == store.RunCompleted {
			break
		}
	}
	want := map[string][2]string{
		cancelled: {"failed", "cancelled"}, ids[1]: {"failed", "cancelled"},
		stuck: {"failed", "discarded"}, ids[3]: {"failed", "discarded"},
		gone: {"done", ""}, ids[5]: {"done", ""},
		lost: {"done", ""}, ids[7]: {"done", ""},
		lostForGood: {"failed", "left without results"}, ids[9]: {"failed", "left without results"},
	}
	got := bridgeStates(t, db, id)
	for b, w := range want {
		if got[b][0] != w[0] || !strings.Contains(got[b][1], w[1]) {
			t.Errorf("bridge %s: %s %q; want %s with %q", b, got[b][0], got[b][1], w[0], w[1])
		}
	}
	if r, _ := db.GetRun(ctx, id); r.Status != store.RunCompleted {
		t.Errorf("run %s, want completed", r.Status)
	}
	if rows, distinct, nb := countResults(t, db, id); rows != distinct || nb != 4 {
		t.Errorf("%d result rows (%d distinct) for %d bridges; want one set for each of 4", rows, distinct, nb)
	}
}
