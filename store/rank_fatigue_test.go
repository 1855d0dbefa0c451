package store_test

import (
	"context"
	"testing"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// execer runs statements on db, failing t on an error.
func execer(t *testing.T, db *store.DB) func(q string) {
	return func(q string) {
		t.Helper()
		if _, err := db.Pool.Exec(context.Background(), q); err != nil {
			t.Fatalf("%s: %v", q, err)
		}
	}
}

// TestRankWeighsFatigue: the priority order takes the lower of the proposed RF and the
// fatigue life index (internal/ranking), says where fatigue governs, and a pruned base run
// passes the fatigue summary on to the run that takes its picture over (migration 016).
func TestRankWeighsFatigue(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	exec := execer(t, db)
	exec(`INSERT INTO runs (id, status, program_version, config, config_hash, trains, bridges_total)
		OVERRIDING SYSTEM VALUE VALUES (1, 'completed', 't', '{}', 'c', '{}', 4)`)
	exec(`INSERT INTO result_sets (id, bridge_id, digest) OVERRIDING SYSTEM VALUE VALUES (7, 'NER-B', '\x01')`)
	exec(`INSERT INTO run_bridges (run_id, bridge_id, input_hash, status, error, set_id, rf_proposed,
		fatigue_no_data, fatigue_life_years, fatigue_life_index, fatigue_member)
		VALUES (1, 'NER-A', 'h', 'done', '', 7, 0.9, NULL, NULL, NULL, NULL),
		       (1, 'NER-B', 'h', 'done', '', 7, 1.5, 2, 15, 0.5, 'L1-U1'),
		       (1, 'NER-C', 'h', 'done', '', 7, 0.7, 0, 24, 0.8, 'U1-L2'),
		       (1, 'NER-D', 'h', 'done', '', 7, 1.2, 0, NULL, NULL, NULL)`)
	check := func(run int64) {
		t.Helper()
		rows, err := db.Ranked(ctx, run, 0)
		if err != nil {
			t.Fatal(err)
		}
		// by hand: keys B 0.5 (fatigue), C 0.7 (its RF; life index 0.8), A 0.9, D 1.2
		want := []struct {
			id      string
			governs bool
		}{{"NER-B", true}, {"NER-C", false}, {"NER-A", false}, {"NER-D", false}}
		if len(rows) != len(want) {
			t.Fatalf("run %d: %d rows, want %d", run, len(rows), len(want))
		}
		for i, w := range want {
			r := rows[i]
			if r.BridgeID != w.id || r.Fatigue.Governs != w.governs {
				t.Errorf("run %d rank %d: %s (fatigue governs %v), want %s (%v)", run, i+1, r.BridgeID, r.Fatigue.Governs, w.id, w.governs)
			}
		}
		b := rows[0].Fatigue
		if b.NoData == nil || *b.NoData != 2 || b.LifeYears == nil || *b.LifeYears != 15 || b.Member != "L1-U1" {
			t.Errorf("run %d: fatigue summary of NER-B %+v", run, b)
		}
		if rows[2].Fatigue.NoData != nil {
			t.Errorf("run %d: NER-A checked no fatigue but reads %+v", run, rows[2].Fatigue)
		}
	}
	check(1)
	exec(`INSERT INTO runs (id, status, mode, base_run_id, complete, program_version, config, config_hash, trains, bridges_total)
		OVERRIDING SYSTEM VALUE VALUES (2, 'completed', 'changed', 1, false, 't', '{}', 'c', '{}', 4)`)
	if _, err := db.PruneRuns(ctx, store.Retention{Keep: 1}); err != nil {
		t.Fatal(err)
	}
	check(2)
}
