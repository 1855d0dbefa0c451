package store_test

import (
	"context"
	"testing"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestPruneKeepsFailuresFailed: a run based on a pruned run takes its picture over; a bridge
// that failed there stays failed (a failure is not a result to carry: the next nightly run
// screens it again), a screened one becomes carried, and a bridge the later run removed stays
// gone. Reads of a removed bridge's set say "not found".
func TestPruneKeepsFailuresFailed(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	exec := execer(t, db)
	exec(`INSERT INTO runs (id, status, program_version, config, config_hash, trains, bridges_total)
		OVERRIDING SYSTEM VALUE VALUES (1, 'completed', 't', '{}', 'c', '{}', 3)`)
	exec(`INSERT INTO runs (id, status, mode, base_run_id, complete, program_version, config, config_hash, trains, bridges_total)
		OVERRIDING SYSTEM VALUE VALUES (2, 'completed', 'changed', 1, false, 't', '{}', 'c', '{}', 2)`)
	exec(`INSERT INTO result_sets (id, bridge_id, digest) OVERRIDING SYSTEM VALUE VALUES (7, 'NER-1', '\x01')`)
	exec(`INSERT INTO run_bridges (run_id, bridge_id, input_hash, status, error, set_id, rf_proposed)
		VALUES (1, 'NER-1', 'h1', 'done', '', 7, 0.9), (1, 'NER-2', 'h2', 'failed', 'geometry: panels must be even', NULL, NULL),
		       (1, 'NER-3', 'h3', 'done', '', 7, 1.2)`)
	exec(`INSERT INTO run_bridges (run_id, bridge_id, input_hash, status) VALUES (2, 'NER-3', '', 'removed')`)
	if set, err := db.BridgeSet(ctx, 2, "NER-3"); err == nil {
		t.Errorf("set of a removed bridge: %v, want not found", set)
	}
	p, err := db.PruneRuns(ctx, store.Retention{Keep: 1})
	if err != nil || len(p.Runs) != 1 || p.Runs[0] != 1 {
		t.Fatalf("prune: %+v, %v; want run 1 removed", p, err)
	}
	rows, err := db.Pool.Query(ctx, `SELECT bridge_id, status FROM run_bridges WHERE run_id = 2 ORDER BY bridge_id`)
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]string{}
	for rows.Next() {
		var b, s string
		if err := rows.Scan(&b, &s); err != nil {
			t.Fatal(err)
		}
		got[b] = s
	}
	if len(got) != 2 || got["NER-1"] != "carried" || got["NER-2"] != "failed" {
		t.Errorf("run 2 after its base was pruned: %v; want NER-1 carried, NER-2 failed, NER-3 gone", got)
	}
	if pr, err := db.Progress(ctx, 2); err != nil || pr.Failed != 1 || pr.Carried != 1 || pr.Total != 2 {
		t.Errorf("progress %+v (%v); want 2 bridges: 1 carried, 1 failed", pr, err)
	}
}
