package fleetrun_test

import (
	"context"
	"testing"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

func ptr[T any](v T) *T { return &v }

func hashBridge() (store.Bridge, []store.Member) {
	b := store.Bridge{BridgeID: "NER-00001", Name: "Quarnholm Girders", TrussType: "pratt", SpanM: 48, Panels: 8,
		DepthM: 6, Deck: "through", Trusses: 2, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 14}
	ms := []store.Member{
		{BridgeID: b.BridgeID, Member: "L0-L1", CapacityTensionKN: ptr(2400.0), ConditionFactor: 1},
		{BridgeID: b.BridgeID, Member: "U1-U2", CapacityCompressionKN: ptr(3100.0), ConditionFactor: 0.9},
		{BridgeID: b.BridgeID, Member: "U1-L2", RatingFactor: ptr(1.2), ReferenceTrain: ptr("northmoor-freight-today"), ConditionFactor: 1},
	}
	return b, ms
}

// TestInputHashSeesEveryInput: the hash changes with every input a result depends on, not
// with names and places, and not with the order the members come in. Among the changes, a
// capacity moved from tension to compression: the earlier SQL hash joined the numbers
// skipping NULLs and took the two for the same.
func TestInputHashSeesEveryInput(t *testing.T) {
	b, ms := hashBridge()
	base := fleetrun.InputHash("plan", b, ms)
	if base != fleetrun.InputHash("plan", b, ms) {
		t.Fatal("the hash is not repeatable")
	}
	reversed := []store.Member{ms[2], ms[0], ms[1]}
	if fleetrun.InputHash("plan", b, reversed) != base {
		t.Error("the hash depends on the members' order")
	}
	same := b
	same.Name, same.Line, same.Latitude, same.YearBuilt = "Thraskwick Bridge", "Eastfell Branch", ptr(-41.5), ptr(1897)
	if fleetrun.InputHash("plan", same, ms) != base {
		t.Error("the hash changed with the bridge's name, line, place or year, which change no result")
	}
	changes := map[string]func(b *store.Bridge, ms []store.Member) []store.Member{
		"truss type":     func(b *store.Bridge, ms []store.Member) []store.Member { b.TrussType = "howe"; return ms },
		"span":           func(b *store.Bridge, ms []store.Member) []store.Member { b.SpanM = 48.000001; return ms },
		"panels":         func(b *store.Bridge, ms []store.Member) []store.Member { b.Panels = 10; return ms },
		"depth":          func(b *store.Bridge, ms []store.Member) []store.Member { b.DepthM = 6.5; return ms },
		"deck":           func(b *store.Bridge, ms []store.Member) []store.Member { b.Deck = "deck"; return ms },
		"end posts":      func(b *store.Bridge, ms []store.Member) []store.Member { b.EndPosts = "vertical"; return ms },
		"trusses":        func(b *store.Bridge, ms []store.Member) []store.Member { b.Trusses = 3; return ms },
		"share":          func(b *store.Bridge, ms []store.Member) []store.Member { b.TrussShare = 0.55; return ms },
		"tracks":         func(b *store.Bridge, ms []store.Member) []store.Member { b.Tracks = 2; return ms },
		"dead load":      func(b *store.Bridge, ms []store.Member) []store.Member { b.DeadLoadKNPerM = 15; return ms },
		"a member fewer": func(b *store.Bridge, ms []store.Member) []store.Member { return ms[:2] },
		"a label": func(b *store.Bridge, ms []store.Member) []store.Member {
			ms[0].Member = "L0-L2"
			return ms
		},
		"a capacity": func(b *store.Bridge, ms []store.Member) []store.Member {
			ms[0].CapacityTensionKN = ptr(2399.0)
			return ms
		},
		"a capacity moved from tension to compression": func(b *store.Bridge, ms []store.Member) []store.Member {
			ms[0].CapacityTensionKN, ms[0].CapacityCompressionKN = nil, ptr(2400.0)
			return ms
		},
		"a rating factor": func(b *store.Bridge, ms []store.Member) []store.Member {
			ms[2].RatingFactor = ptr(1.25)
			return ms
		},
		"a reference train": func(b *store.Bridge, ms []store.Member) []store.Member {
			ms[2].ReferenceTrain = ptr("cooper:e=80")
			return ms
		},
		"a condition factor": func(b *store.Bridge, ms []store.Member) []store.Member {
			ms[1].ConditionFactor = 0.85
			return ms
		},
	}
	for name, change := range changes {
		b2, ms2 := hashBridge()
		ms2 = change(&b2, ms2)
		if fleetrun.InputHash("plan", b2, ms2) == base {
			t.Errorf("%s: the hash did not change", name)
		}
	}
	if fleetrun.InputHash("other plan", b, ms) == base {
		t.Error("the hash did not change with the plan")
	}
}

// TestInputHashesOfInventory: the hashes a run takes of the whole inventory when it is
// created equal InputHash of each bridge's rows as a job loads them.
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
		ms, err := db.Members(ctx, b.BridgeID)
		if err != nil {
			t.Fatal(err)
		}
		want[b.BridgeID] = fleetrun.InputHash("plan", b, ms)
	}
	for i, id := range ids {
		if hashes[i] != want[id] {
			t.Errorf("%s: hash %s, InputHash gives %s", id, hashes[i], want[id])
		}
	}
}
