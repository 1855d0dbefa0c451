package store_test

import (
	"context"
	"testing"

	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestOldRunsReadableAfterUpgrade: a database at schema 8 (results kept per run and bridge)
// holds a completed run with two screened bridges and one that failed. After migrating to
// the current schema (result sets, migration 009) the run reads as before: its priority list,
// its flag totals, its flagged members with their forces, one result set per screened bridge.
// Going back down to 8 and up again keeps it so (the migrations' down steps).
func TestOldRunsReadableAfterUpgrade(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	if err := db.MigrateTo(ctx, 8); err != nil {
		t.Fatal(err)
	}
	exec := func(q string) {
		t.Helper()
		if _, err := db.Pool.Exec(ctx, q); err != nil {
			t.Fatalf("%s: %v", q, err)
		}
	}
	exec(`INSERT INTO bridges (bridge_id, name, truss_type, span_m, panels, depth_m, deck, dead_load_kn_per_m)
		VALUES ('NER-1', 'Quarnholm Girders', 'pratt', 48, 8, 6, 'through', 14),
		       ('NER-2', 'Thraskwick Bridge', 'pratt', 60, 10, 7, 'through', 16),
		       ('NER-3', 'Kestscar Span', 'warren', 30, 6, 4, 'through', 9)`)
	exec(`INSERT INTO runs (id, status, program_version, config, config_hash, trains, bridges_total)
		OVERRIDING SYSTEM VALUE VALUES (41, 'completed', 'old', '{}', 'c', '{}', 3)`)
	exec(`INSERT INTO run_bridges (run_id, bridge_id, input_hash, status, error, worst_member, rf_existing, rf_proposed,
		demand_increase, flags, flag_counts)
		VALUES (41, 'NER-1', 'h1', 'done', '', 'U1-U2', 1.30, 0.92, 0.41, '{exceeds}', '{"exceeds": 1}'),
		       (41, 'NER-2', 'h2', 'done', '', 'L0-L1', 1.60, 1.21, 0.30, '{}', '{}'),
		       (41, 'NER-3', 'h3', 'failed', 'geometry: panels must be even', NULL, NULL, NULL, NULL, '{}', '{}')`)
	exec(`INSERT INTO member_results (run_id, bridge_id, scenario, member, kind, dead_kn, live_max_kn, live_min_kn, impact)
		VALUES (41, 'NER-1', 'existing', 'U1-U2', 'top chord', -500, 0, -700, 1.3),
		       (41, 'NER-1', 'proposed', 'U1-U2', 'top chord', -500, 0, -990, 1.3),
		       (41, 'NER-2', 'existing', 'L0-L1', 'bottom chord', 400, 650, 0, 1.25),
		       (41, 'NER-2', 'proposed', 'L0-L1', 'bottom chord', 400, 860, 0, 1.25)`)
	exec(`INSERT INTO member_assessments (run_id, bridge_id, member, rf_existing, rf_proposed, sense_proposed, demand_increase, flags)
		VALUES (41, 'NER-1', 'U1-U2', 1.30, 0.92, 'compression', 0.41, '{exceeds}'),
		       (41, 'NER-2', 'L0-L1', 1.60, 1.21, 'tension', 0.30, '{}')`)
	check := func(when string) {
		t.Helper()
		ranked, err := db.Ranked(ctx, 41, 0)
		if err != nil {
			t.Fatalf("%s: %v", when, err)
		}
		if len(ranked) != 3 || ranked[0].BridgeID != "NER-1" || *ranked[0].RFProposed != 0.92 || ranked[2].Status != "failed" || ranked[0].Unrated != 0 {
			t.Errorf("%s: priority list %+v; want NER-1 (RF 0.92) first and NER-3 failed last", when, ranked)
		}
		members, flagged, err := db.FlagTotals(ctx, 41)
		if err != nil || flagged != 1 || members["exceeds"] != 1 {
			t.Errorf("%s: flag totals %v, %d bridges flagged (%v); want exceeds 1, 1 bridge", when, members, flagged, err)
		}
		fm, err := db.FlaggedMembers(ctx, 41)
		if err != nil || len(fm) != 1 || fm[0].Member != "U1-U2" || fm[0].LiveMinKN != -990 || fm[0].DeadKN != -500 {
			t.Errorf("%s: flagged members %+v (%v); want U1-U2 with its proposed forces", when, fm, err)
		}
		p, err := db.Progress(ctx, 41)
		if err != nil || p.Total != 3 || p.Done != 2 || p.Failed != 1 {
			t.Errorf("%s: progress %+v (%v); want 3 bridges, 2 done, 1 failed", when, p, err)
		}
	}
	// The current schema: the queries read columns of later migrations too (011's
	// unrated_members, NULL in old rows, read as 0).
	if _, err := db.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	check("after the upgrade")
	var sets int
	if err := db.Pool.QueryRow(ctx, "SELECT count(*) FROM result_sets").Scan(&sets); err != nil || sets != 2 {
		t.Errorf("%d result sets (%v), want one per screened bridge: 2", sets, err)
	}
	if err := db.MigrateTo(ctx, 8); err != nil {
		t.Fatalf("down to 8: %v", err)
	}
	if _, err := db.Migrate(ctx); err != nil {
		t.Fatalf("up again: %v", err)
	}
	check("after down to 8 and up again")
}
