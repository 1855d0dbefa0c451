package store_test

import (
	"context"
	"fmt"
	"io/fs"
	"maps"
	"slices"
	"strings"
	"sync"
	"testing"

	"github.com/trussfleet/trussfleet/sql"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

func ptr[T any](v T) *T { return &v }

func bridge(id string, spanM float64) store.Bridge {
	return store.Bridge{BridgeID: id, Name: "Span " + id, Line: "Vellbrae Vale", TrussType: "pratt", SpanM: spanM,
		Panels: 8, DepthM: 6, Deck: "through", Trusses: 2, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 18,
		YearBuilt: ptr(1904), Latitude: ptr(-47.1), Longitude: ptr(-128.2)}
}

// importBridges runs one whole staged import, as the importer does.
func importBridges(t *testing.T, db *store.DB, bs []store.Bridge) store.Counts {
	t.Helper()
	ctx := context.Background()
	im, err := db.BeginImport(ctx, store.KindBridges, "bridges.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer im.Rollback(ctx)
	_, err = store.Stage(ctx, im, func(yield func(store.Staged[store.Bridge]) bool) {
		for i, b := range bs {
			if !yield(store.Staged[store.Bridge]{Line: i + 2, Row: b}) {
				return
			}
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	c, err := im.Merge(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if err := im.Commit(ctx, strings.Repeat("ab", 32), c); err != nil {
		t.Fatal(err)
	}
	return c
}

func TestMigrate(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	files, err := fs.Glob(sql.Migrations(), "*.sql")
	if err != nil {
		t.Fatal(err)
	}
	cur, latest, err := db.SchemaVersion(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if cur != latest || int(latest) != len(files) {
		t.Errorf("schema version %d of %d; %d migration files", cur, latest, len(files))
	}
	// Several processes may migrate at once; tern's advisory lock serialises them and the
	// late ones find nothing to do.
	var wg sync.WaitGroup
	errs := make([]error, 3)
	applied := make([][]string, 3)
	for i := range errs {
		wg.Add(1)
		go func() { defer wg.Done(); applied[i], errs[i] = db.Migrate(ctx) }()
	}
	wg.Wait()
	for i := range errs {
		if errs[i] != nil || len(applied[i]) != 0 {
			t.Errorf("migrate %d on a current schema: applied %v, error %v", i, applied[i], errs[i])
		}
	}
	for _, table := range []string{"bridges", "members", "trains", "import_batches"} {
		var ok bool
		if err := db.Pool.QueryRow(ctx, "SELECT to_regclass($1) IS NOT NULL", table).Scan(&ok); err != nil || !ok {
			t.Errorf("table %s: exists %v, %v", table, ok, err)
		}
	}
}

func TestUpsertCounts(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	first := []store.Bridge{bridge("HV-001", 48), bridge("HV-002", 36), bridge("HV-003", 60)}
	changed := slices.Clone(first)
	changed[1].SpanM = 37.5
	changed[2].LastInspected = nil
	changed[2].YearBuilt = nil // a value that becomes NULL is a change too
	changed = append(changed, bridge("HV-004", 24))

	// Expected counts by brute force: compare each row with what is stored before.
	expect := func(stored map[string]store.Bridge, rows []store.Bridge) store.Counts {
		c := store.Counts{Rows: len(rows)}
		for _, b := range rows {
			old, ok := stored[b.BridgeID]
			switch {
			case !ok:
				c.Inserted++
			case fmt.Sprint(old.Name, old.SpanM, deref(old.YearBuilt)) != fmt.Sprint(b.Name, b.SpanM, deref(b.YearBuilt)):
				c.Updated++
			default:
				c.Unchanged++
			}
		}
		return c
	}
	stored := map[string]store.Bridge{}
	steps := []struct {
		name string
		rows []store.Bridge
	}{
		{"first import inserts", first},
		{"same file again changes nothing", first},
		{"changed rows update, a new one inserts", changed},
		{"and again changes nothing", changed},
	}
	for _, step := range steps {
		t.Run(step.name, func(t *testing.T) {
			want := expect(stored, step.rows)
			got := importBridges(t, db, step.rows)
			if got != want {
				t.Errorf("counts %+v, want %+v", got, want)
			}
			all, err := db.Bridges(ctx)
			if err != nil {
				t.Fatal(err)
			}
			for _, b := range step.rows {
				stored[b.BridgeID] = b
			}
			if len(all) != len(stored) {
				t.Fatalf("%d bridges stored, want %d", len(all), len(stored))
			}
			for _, b := range all {
				w := stored[b.BridgeID]
				if b.SpanM != w.SpanM || deref(b.YearBuilt) != deref(w.YearBuilt) || b.Name != w.Name {
					t.Errorf("stored %+v, want %+v", b, w)
				}
			}
		})
	}
	batches, err := db.Batches(ctx, 10)
	if err != nil {
		t.Fatal(err)
	}
	if len(batches) != len(steps) {
		t.Fatalf("%d imports recorded, want %d", len(batches), len(steps))
	}
	if b := batches[0]; b.Kind != store.KindBridges || b.FileName != "bridges.csv" || b.Counts.Unchanged != len(changed) ||
		b.SHA256 != strings.Repeat("ab", 32) || b.FinishedAt.Before(b.StartedAt) {
		t.Errorf("latest import recorded as %+v", b)
	}
}

func deref(p *int) int {
	if p == nil {
		return -1
	}
	return *p
}

func TestDuplicatesAndRollback(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	im, err := db.BeginImport(ctx, store.KindBridges, "dup.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer im.Rollback(ctx)
	rows := []store.Bridge{bridge("A", 30), bridge("B", 30), bridge("A", 31), bridge("C", 30), bridge("A", 32)}
	n, err := store.Stage(ctx, im, func(yield func(store.Staged[store.Bridge]) bool) {
		for i, b := range rows {
			if !yield(store.Staged[store.Bridge]{Line: i + 2, Row: b}) {
				return
			}
		}
	})
	if err != nil || n != int64(len(rows)) {
		t.Fatalf("staged %d, %v", n, err)
	}
	dups, err := im.Duplicates(ctx, 10)
	if err != nil {
		t.Fatal(err)
	}
	if len(dups) != 1 || dups[0].Key[0] != "A" || !slices.Equal(dups[0].Lines, []int{2, 4, 6}) {
		t.Errorf("duplicates %+v, want A on lines 2, 4, 6", dups)
	}
	im.Rollback(ctx)
	all, err := db.Bridges(ctx)
	if err != nil || len(all) != 0 {
		t.Errorf("after rollback: %d bridges, %v", len(all), err)
	}
	batches, err := db.Batches(ctx, 10)
	if err != nil || len(batches) != 0 {
		t.Errorf("after rollback: %d imports recorded, %v", len(batches), err)
	}
}

func TestMembersAndTrains(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	importBridges(t, db, []store.Bridge{bridge("HV-001", 48)})

	im, err := db.BeginImport(ctx, store.KindMembers, "members.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer im.Rollback(ctx)
	ms := []store.Member{
		{BridgeID: "HV-001", Member: "U1-U2", CapacityCompressionKN: ptr(2400.0), ConditionFactor: 0.9},
		{BridgeID: "HV-001", Member: "L0-L1", RatingFactor: ptr(1.2), ReferenceTrain: ptr("E80"), ConditionFactor: 1},
	}
	_, err = store.Stage(ctx, im, func(yield func(store.Staged[store.Member]) bool) {
		for i, m := range ms {
			if !yield(store.Staged[store.Member]{Line: i + 2, Row: m}) {
				return
			}
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	c, err := im.Merge(ctx)
	if err != nil || c.Inserted != 2 {
		t.Fatalf("members: %+v, %v", c, err)
	}
	if err := im.Commit(ctx, strings.Repeat("0", 64), c); err != nil {
		t.Fatal(err)
	}
	got, err := db.Members(ctx, "HV-001")
	if err != nil || len(got) != 2 {
		t.Fatalf("members %+v, %v", got, err)
	}
	byLabel := map[string]store.Member{}
	for _, m := range got {
		byLabel[m.Member] = m
	}
	if m := byLabel["U1-U2"]; m.CapacityCompressionKN == nil || *m.CapacityCompressionKN != 2400 || m.ConditionFactor != 0.9 || m.CapacityTensionKN != nil {
		t.Errorf("U1-U2 stored as %+v", m)
	}
	if m := byLabel["L0-L1"]; m.RatingFactor == nil || *m.RatingFactor != 1.2 || m.ReferenceTrain == nil || *m.ReferenceTrain != "E80" {
		t.Errorf("L0-L1 stored as %+v", m)
	}
	all, err := db.AllMembers(ctx)
	if err != nil || !slices.Equal(slices.Collect(maps.Keys(all)), []string{"HV-001"}) {
		t.Errorf("AllMembers: %v, %v", all, err)
	}

	// The schema's own checks back up the importer's: a condition factor above 1 and a
	// member of a bridge that is not stored are refused by the database.
	bad := []struct {
		name string
		m    store.Member
	}{
		{"condition factor above 1", store.Member{BridgeID: "HV-001", Member: "U2-U3", CapacityTensionKN: ptr(1.0), ConditionFactor: 1.1}},
		{"unknown bridge", store.Member{BridgeID: "NOPE", Member: "U2-U3", CapacityTensionKN: ptr(1.0), ConditionFactor: 1}},
		{"no capacity in either form", store.Member{BridgeID: "HV-001", Member: "U2-U3", ConditionFactor: 1}},
	}
	for _, tc := range bad {
		t.Run(tc.name, func(t *testing.T) {
			im, err := db.BeginImport(ctx, store.KindMembers, "bad.csv")
			if err != nil {
				t.Fatal(err)
			}
			defer im.Rollback(ctx)
			_, err = store.Stage(ctx, im, func(yield func(store.Staged[store.Member]) bool) {
				yield(store.Staged[store.Member]{Line: 2, Row: tc.m})
			})
			if err != nil {
				t.Fatal(err)
			}
			if _, err := im.Merge(ctx); err == nil {
				t.Error("the database accepted it")
			}
		})
	}

	im, err = db.BeginImport(ctx, store.KindTrains, "freight.yaml")
	if err != nil {
		t.Fatal(err)
	}
	defer im.Rollback(ctx)
	_, err = store.Stage(ctx, im, func(yield func(store.Staged[store.Train]) bool) {
		yield(store.Staged[store.Train]{Line: 1, Row: store.Train{Name: "freight-25t", FileName: "freight.yaml", Source: "name: freight-25t\n", SHA256: strings.Repeat("1", 64)}})
	})
	if err != nil {
		t.Fatal(err)
	}
	if c, err = im.Merge(ctx); err != nil || c.Inserted != 1 {
		t.Fatalf("trains: %+v, %v", c, err)
	}
	if err := im.Commit(ctx, strings.Repeat("1", 64), c); err != nil {
		t.Fatal(err)
	}
	tr, err := db.Train(ctx, "freight-25t")
	if err != nil || tr.Source != "name: freight-25t\n" || tr.ImportedAt.IsZero() {
		t.Errorf("train %+v, %v", tr, err)
	}
	if _, err := db.Train(ctx, "none"); err == nil {
		t.Error("a missing train was found")
	}
}
