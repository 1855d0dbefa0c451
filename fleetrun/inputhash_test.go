package fleetrun_test

import (
	"context"
	"testing"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// version reads a bridge's input version.
func version(t *testing.T, db *store.DB, bridge string) int64 {
	t.Helper()
	var v int64
	if err := db.Pool.QueryRow(context.Background(), "SELECT input_version FROM bridges WHERE bridge_id = $1", bridge).Scan(&v); err != nil {
		t.Fatal(err)
	}
	return v
}

// TestInputVersionSeesEveryInput: the database renews a bridge's input version with every
// change of an input its result depends on (its geometry and loads; a member added, changed
// or removed, in any column, including a capacity moved from tension to compression, which
// the earlier SQL hash took for no change), and not with names, places and dates, nor with
// an import that changes nothing (an upsert whose rows all equal the stored ones).
func TestInputVersionSeesEveryInput(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	exec := func(q string) {
		t.Helper()
		if _, err := db.Pool.Exec(ctx, q); err != nil {
			t.Fatalf("%s: %v", q, err)
		}
	}
	exec(`INSERT INTO bridges (bridge_id, name, truss_type, span_m, panels, depth_m, deck, dead_load_kn_per_m)
		VALUES ('NER-00001', 'Quarnholm Girders', 'pratt', 48, 8, 6, 'through', 14),
		       ('NER-00002', 'Thraskwick Bridge', 'pratt', 48, 8, 6, 'through', 14)`)
	exec(`INSERT INTO members (bridge_id, member, capacity_tension_kn, capacity_compression_kn, rating_factor, reference_train, condition_factor)
		VALUES ('NER-00001', 'L0-L1', 2400, NULL, NULL, NULL, 1), ('NER-00001', 'U1-U2', NULL, 3100, NULL, NULL, 0.9),
		       ('NER-00001', 'U1-L2', NULL, NULL, 1.2, 'northmoor-freight-today', 1)`)
	const upsert = `INSERT INTO members (bridge_id, member, capacity_tension_kn, condition_factor)
		VALUES ('NER-00001', 'L0-L1', 2400, 1) ON CONFLICT (bridge_id, member, truss) DO UPDATE
		SET capacity_tension_kn = EXCLUDED.capacity_tension_kn
		WHERE members.capacity_tension_kn IS DISTINCT FROM EXCLUDED.capacity_tension_kn`
	for _, c := range []struct {
		what, sql string
		renews    bool
	}{
		{"name, line, place, inspection", `UPDATE bridges SET name = 'Kestholm Bridge', line = 'Eastfell Branch',
			latitude = -41.5, longitude = 172.1, last_inspected = '2024-03-01' WHERE bridge_id = 'NER-00001'`, false},
		// The year built sets the fatigue damage to date (migration 016).
		{"year built", `UPDATE bridges SET year_built = 1897 WHERE bridge_id = 'NER-00001'`, true},
		{"an import that changes nothing", upsert, false},
		{"another bridge's member", `INSERT INTO members (bridge_id, member, capacity_tension_kn) VALUES ('NER-00002', 'L0-L1', 900)`, false},
		{"truss type", `UPDATE bridges SET truss_type = 'howe' WHERE bridge_id = 'NER-00001'`, true},
		{"span", `UPDATE bridges SET span_m = 48.000001 WHERE bridge_id = 'NER-00001'`, true},
		{"panels", `UPDATE bridges SET panels = 10 WHERE bridge_id = 'NER-00001'`, true},
		{"depth", `UPDATE bridges SET depth_m = 6.5 WHERE bridge_id = 'NER-00001'`, true},
		{"deck", `UPDATE bridges SET deck = 'deck' WHERE bridge_id = 'NER-00001'`, true},
		{"end posts", `UPDATE bridges SET end_posts = 'vertical' WHERE bridge_id = 'NER-00001'`, true},
		{"trusses", `UPDATE bridges SET trusses = 3 WHERE bridge_id = 'NER-00001'`, true},
		{"share", `UPDATE bridges SET truss_share = 0.55 WHERE bridge_id = 'NER-00001'`, true},
		{"tracks", `UPDATE bridges SET tracks = 2 WHERE bridge_id = 'NER-00001'`, true},
		{"dead load", `UPDATE bridges SET dead_load_kn_per_m = 15 WHERE bridge_id = 'NER-00001'`, true},
		{"cross-section", `UPDATE bridges SET truss_spacing_m = 5, track_offsets_m = '{0.5}' WHERE bridge_id = 'NER-00001'`, true},
		{"track offsets", `UPDATE bridges SET track_offsets_m = '{0.6}' WHERE bridge_id = 'NER-00001'`, true},
		{"line speed", `UPDATE bridges SET line_speed_kmh = 90 WHERE bridge_id = 'NER-00001'`, true},
		{"frequency", `UPDATE bridges SET first_frequency_hz = 4 WHERE bridge_id = 'NER-00001'`, true},
		{"truss weight", `UPDATE bridges SET truss_weight_kn_per_m = 5 WHERE bridge_id = 'NER-00001'`, true},
		{"a member of one truss", `INSERT INTO members (bridge_id, member, capacity_tension_kn, truss) VALUES ('NER-00001', 'L0-L1', 2000, 'B')`, true},
		{"a capacity", `UPDATE members SET capacity_tension_kn = 2399 WHERE bridge_id = 'NER-00001' AND member = 'L0-L1'`, true},
		{"an import that changes a capacity", upsert, true},
		{"a capacity moved from tension to compression", `UPDATE members SET capacity_tension_kn = NULL,
			capacity_compression_kn = 2400 WHERE bridge_id = 'NER-00001' AND member = 'L0-L1'`, true},
		{"a rating factor", `UPDATE members SET rating_factor = 1.25 WHERE bridge_id = 'NER-00001' AND member = 'U1-L2'`, true},
		{"a reference train", `UPDATE members SET reference_train = 'cooper:e=80' WHERE bridge_id = 'NER-00001' AND member = 'U1-L2'`, true},
		{"a condition factor", `UPDATE members SET condition_factor = 0.85 WHERE bridge_id = 'NER-00001' AND member = 'U1-U2'`, true},
		{"a label", `UPDATE members SET member = 'L0-L2' WHERE bridge_id = 'NER-00001' AND member = 'L0-L1'`, true},
		{"a member more", `INSERT INTO members (bridge_id, member, capacity_tension_kn) VALUES ('NER-00001', 'L1-L2', 2400)`, true},
		{"a member fewer", `DELETE FROM members WHERE bridge_id = 'NER-00001' AND member = 'L1-L2'`, true},
		{"a list of depths", `UPDATE bridges SET depths_m = '{5,6,6.5,6,5}' WHERE bridge_id = 'NER-00001'`, true},
		{"one listed depth", `UPDATE bridges SET depths_m = '{5,6,6.4,6,5}' WHERE bridge_id = 'NER-00001'`, true},
		{"an end depth", `UPDATE bridges SET depths_m = NULL, end_depth_m = 5 WHERE bridge_id = 'NER-00001'`, true},
		{"spans", `UPDATE bridges SET end_depth_m = 0, spans = 2 WHERE bridge_id = 'NER-00001'`, true},
		{"a joint table", `INSERT INTO truss_tables (bridge_id, doc) VALUES ('NER-00001', '{"joints": []}')`, true},
		{"a joint table changed", `UPDATE truss_tables SET doc = '{"joints": [1]}' WHERE bridge_id = 'NER-00001'`, true},
		{"a joint table unchanged", `UPDATE truss_tables SET doc = '{"joints": [1]}' WHERE bridge_id = 'NER-00001' AND doc IS DISTINCT FROM '{"joints": [1]}'`, false},
		{"a joint table removed", `DELETE FROM truss_tables WHERE bridge_id = 'NER-00001'`, true},
	} {
		before := version(t, db, "NER-00001")
		exec(c.sql)
		after := version(t, db, "NER-00001")
		if (after != before) != c.renews {
			t.Errorf("%s: version %d -> %d; want renewed: %v", c.what, before, after, c.renews)
		}
	}
}

// TestInputHash: the hash is repeatable and changes with the plan and with the version.
func TestInputHash(t *testing.T) {
	h := fleetrun.InputHash("plan", 7)
	if h != fleetrun.InputHash("plan", 7) {
		t.Fatal("the hash is not repeatable")
	}
	for _, other := range []string{fleetrun.InputHash("other plan", 7), fleetrun.InputHash("plan", 8), fleetrun.InputHash("plan7", 0)} {
		if other == h {
			t.Errorf("%s: the hash did not change with the plan or the version", other)
		}
	}
}

// TestInputHashesOfInventory: the hashes a run takes of the whole inventory when it is
// created equal InputHash of each bridge's version as the bridge is read alone.
func TestInputHashesOfInventory(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	seedFleet(t, db, 17)
	// and a bridge with no members yet
	if _, err := db.Pool.Exec(ctx, `INSERT INTO bridges (bridge_id, name, truss_type, span_m, panels, depth_m, deck, dead_load_kn_per_m)
		VALUES ('NER-99999', 'Thraskmoor Span', 'warren', 30, 6, 4, 'through', 9)`); err != nil {
		t.Fatal(err)
	}
	var ids, hashes []string
	err := pgx.BeginFunc(ctx, db.Pool, func(tx pgx.Tx) error {
		var err error
		ids, hashes, err = fleetrun.InputHashes(ctx, tx, "plan")
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	bridges, err := db.Bridges(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if len(ids) != len(bridges) || len(bridges) != 18 {
		t.Fatalf("%d hashes for %d bridges", len(ids), len(bridges))
	}
	want := map[string]string{}
	for _, b := range bridges {
		want[b.BridgeID] = fleetrun.InputHash("plan", b.InputVersion)
	}
	for i, id := range ids {
		if hashes[i] != want[id] {
			t.Errorf("%s: hash %s, InputHash gives %s", id, hashes[i], want[id])
		}
	}
}
