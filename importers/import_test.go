package importers

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

func importExamples(t *testing.T, db *store.DB) {
	t.Helper()
	ctx := context.Background()
	// Trains first: the members' stored rating factors name their reference train.
	if _, err := ImportTrains(ctx, db, "../configs/trains", Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := ImportBridgesFile(ctx, db, "../testdata/bridges.csv", Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := ImportMembersFile(ctx, db, "../testdata/members.csv", Options{}); err != nil {
		t.Fatal(err)
	}
}

func TestImportCycle(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	data, err := os.ReadFile("../testdata/bridges.csv")
	if err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256(data)
	changed := strings.Replace(string(data), "Quarnrigg Viaduct span 2,Northmoor Main Line,12.480,pratt,48.0,8,6.5", "Quarnrigg Viaduct span 2,Northmoor Main Line,12.480,pratt,48.0,8,6.6", 1)
	steps := []struct {
		name  string
		text  string
		opts  Options
		want  store.Counts
		total int
	}{
		{"check writes nothing", string(data), Options{Check: true}, store.Counts{Rows: 4, Inserted: 4}, 0},
		{"first import", string(data), Options{}, store.Counts{Rows: 4, Inserted: 4}, 4},
		{"same file again changes nothing", string(data), Options{}, store.Counts{Rows: 4, Unchanged: 4}, 4},
		{"a changed row updates", changed, Options{}, store.Counts{Rows: 4, Updated: 1, Unchanged: 3}, 4},
	}
	for _, st := range steps {
		t.Run(st.name, func(t *testing.T) {
			res, err := ImportBridges(ctx, db, "bridges.csv", strings.NewReader(st.text), st.opts)
			if err != nil {
				t.Fatal(err)
			}
			if res.Counts != st.want {
				t.Errorf("counts %+v, want %+v", res.Counts, st.want)
			}
			all, err := db.Bridges(ctx)
			if err != nil || len(all) != st.total {
				t.Errorf("%d bridges stored, want %d (%v)", len(all), st.total, err)
			}
		})
	}
	b, err := db.Bridge(ctx, "NME-0101")
	if err != nil || b.DepthM != 6.6 {
		t.Errorf("updated bridge: depth %g, %v", b.DepthM, err)
	}
	batches, err := db.Batches(ctx, 10)
	if err != nil || len(batches) != 3 {
		t.Fatalf("%d imports recorded, want 3 (the check is not recorded): %v", len(batches), err)
	}
	// The recorded digest is the file's SHA-256 as sha256sum would print it.
	if got := batches[2].SHA256; got != hex.EncodeToString(sum[:]) {
		t.Errorf("recorded sha256 %s, want %s", got, hex.EncodeToString(sum[:]))
	}
}

func TestBadFileWritesNothing(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	importExamples(t, db)
	before, _ := db.Bridges(ctx)
	tests := []struct {
		name, text, msg string
		line            int
	}{
		{"one bad row among good ones", bridgeHeader + "NEW-1,X,Main,1,pratt,48,8,6,through,15\nNEW-2,X,Main,1,pratt,48,7,6,through,15\n", "even number", 3},
		{"duplicate key within a file", bridgeHeader + "NEW-1,X,Main,1,pratt,48,8,6,through,15\nNEW-2,X,Main,1,pratt,48,8,6,through,15\nNEW-1,Y,Main,1,pratt,50,8,6,through,15\n", "first on line 2", 4},
		// Refused before PostgreSQL sees it, which would fail on the index row's size.
		{"bridge_id of 3,000 characters", bridgeHeader + "NEW-1,X,Main,1,pratt,48,8,6,through,15\n" + strings.Repeat("N", 3000) + ",X,Main,1,pratt,48,8,6,through,15\n",
			"line 3, column 1 (bridge_id), value \"" + strings.Repeat("N", 39) + "…\": 3000 characters; bridge_id takes at most 64", 3},
		{"a line of 10 MB", bridgeHeader + "NEW-1,X,Main,1,pratt,48,8,6,through,15\nNEW-2," + strings.Repeat("n", 10<<20) + ",Main,1,pratt,48,8,6,through,15\n",
			"line 3: a line longer than 64 KiB", 3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ImportBridges(ctx, db, "bridges.csv", strings.NewReader(tc.text), Options{})
			var fe *FileErrors
			if !errors.As(err, &fe) || !strings.Contains(err.Error(), tc.msg) || fe.Errs[0].Line != tc.line {
				t.Fatalf("error %v: want line %d with %q", err, tc.line, tc.msg)
			}
			after, _ := db.Bridges(ctx)
			if len(after) != len(before) {
				t.Errorf("%d bridges after a failed import, %d before", len(after), len(before))
			}
		})
	}
	t.Run("unknown reference train", func(t *testing.T) {
		text := "bridge_id,member,rating_factor,reference_train\nNME-0101,L0-L1,1.2,lm71:alpha=1\nNME-0101,L1-L2,1.3,nosuch-train\n"
		_, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(text), Options{})
		if err == nil || !strings.Contains(err.Error(), "line 3, column 4 (reference_train), value \"nosuch-train\"") || strings.Contains(err.Error(), "line 2") {
			t.Fatalf("error %v: want only line 3's unknown train", err)
		}
	})
	t.Run("member of an unknown bridge", func(t *testing.T) {
		text := "bridge_id,member,capacity_tension_kn\nNME-0101,L0-L1,3200\nNME-9999,L0-L1,100\n"
		_, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(text), Options{})
		if err == nil || !strings.Contains(err.Error(), "line 3, column 1 (bridge_id), value \"NME-9999\"") {
			t.Fatalf("error %v", err)
		}
		ms, _ := db.Members(ctx, "NME-0101")
		for _, m := range ms {
			if m.Member == "L0-L1" && *m.CapacityTensionKN != 3150 {
				t.Errorf("the good row of a bad file was written: %g", *m.CapacityTensionKN)
			}
		}
	})
}

func TestImportMembers(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	importExamples(t, db)
	ms, err := db.Members(ctx, "NME-0102")
	if err != nil || len(ms) != 3 {
		t.Fatalf("members %+v, %v", ms, err)
	}
	for _, m := range ms {
		if m.RatingFactor == nil || *m.ReferenceTrain != "northmoor-freight-today" {
			t.Errorf("stored rating factor form lost: %+v", m)
		}
	}
	res, err := ImportMembersFile(ctx, db, "../testdata/members.csv", Options{})
	if err != nil || res.Counts != (store.Counts{Rows: 12, Unchanged: 12}) {
		t.Errorf("re-import: %+v, %v", res.Counts, err)
	}
	// rating_sense (migration 011) is stored, and a change of it alone is a change.
	text := "bridge_id,member,rating_factor,reference_train,rating_sense\n" +
		"NME-0102," + ms[0].Member + ",1.02," + *ms[0].ReferenceTrain + ",compression\n"
	res, err = ImportMembers(ctx, db, "members.csv", strings.NewReader(text), Options{})
	if err != nil || res.Counts.Updated != 1 {
		t.Fatalf("import with rating_sense: %+v, %v", res.Counts, err)
	}
	after, err := db.Members(ctx, "NME-0102")
	if err != nil || after[0].RatingSense == nil || *after[0].RatingSense != "compression" || after[1].RatingSense != nil {
		t.Errorf("rating_sense not stored: %+v, %v", after, err)
	}
	// The table refuses a sense without a stored rating factor, whatever writes it.
	_, err = db.Pool.Exec(ctx, `UPDATE members SET capacity_tension_kn = 100, rating_factor = NULL, reference_train = NULL
		WHERE bridge_id = 'NME-0102' AND member = $1`, ms[0].Member)
	if err == nil || !strings.Contains(err.Error(), "members_rating_sense_needs_factor") {
		t.Errorf("a rating_sense without its rating_factor: %v", err)
	}
}

func TestImportTrains(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	dir := "../configs/trains"
	files, _ := filepath.Glob(filepath.Join(dir, "*.yaml"))
	if len(files) == 0 {
		t.Fatal("no example train files in configs/trains")
	}
	res, err := ImportTrains(ctx, db, dir, Options{})
	if err != nil || res.Counts.Inserted != len(files) {
		t.Fatalf("import %+v, %v", res.Counts, err)
	}
	res, err = ImportTrains(ctx, db, dir, Options{})
	if err != nil || res.Counts.Unchanged != len(files) {
		t.Errorf("re-import %+v, %v", res.Counts, err)
	}
	trains, err := db.Trains(ctx)
	if err != nil || len(trains) != len(files) {
		t.Fatalf("trains %d, %v", len(trains), err)
	}
	data, _ := os.ReadFile(filepath.Join(dir, trains[0].FileName))
	sum := sha256.Sum256(data)
	if trains[0].Source != string(data) || trains[0].SHA256 != hex.EncodeToString(sum[:]) {
		t.Errorf("train %s stored with another text or digest", trains[0].Name)
	}
	t.Run("a bad train file writes nothing", func(t *testing.T) {
		bad := t.TempDir()
		good, _ := os.ReadFile(files[0])
		os.WriteFile(filepath.Join(bad, "a.yaml"), good, 0o644)
		os.WriteFile(filepath.Join(bad, "b.yaml"), []byte("name: broken\naxles: [1, 2\n"), 0o644)
		_, err := ImportTrains(ctx, db, bad, Options{})
		if err == nil || !strings.Contains(err.Error(), "b.yaml") {
			t.Errorf("error %v: want one naming b.yaml", err)
		}
	})
	t.Run("a misspelt key is named once with its file and line", func(t *testing.T) {
		dir := t.TempDir()
		good, _ := os.ReadFile(files[0])
		os.WriteFile(filepath.Join(dir, "a.yaml"), good, 0o644)
		f := filepath.Join(dir, "x.yaml")
		os.WriteFile(f, []byte("name: X\nvehicles:\n  - id: w\n    lenght: 14\n    axles: [{at: 1, load: 100}]\nconsist:\n  - {vehicle: w, count: 1}\n"), 0o644)
		_, err := ImportTrains(ctx, db, dir, Options{})
		want := dir + ": 1 error, nothing written\n  " + f + ` line 4, column 5: vehicles[0]: unknown key "lenght" (did you mean "length"?)`
		if err == nil || err.Error() != want {
			t.Errorf("error:\n got %v\nwant %s", err, want)
		}
	})
	t.Run("a train beyond the limits writes nothing", func(t *testing.T) {
		before, _ := db.Trains(ctx)
		dir := t.TempDir()
		// 100,000 vehicles 10 mm long: refused at the vehicle's length and the count.
		os.WriteFile(filepath.Join(dir, "tiny.yaml"), []byte("name: Tiny\nvehicles:\n  - id: t\n    length: 0.01\n    axles: [{at: 0, load: 10}]\nconsist:\n  - {vehicle: t, count: 100000}\n"), 0o644)
		os.WriteFile(filepath.Join(dir, "nul.yaml"), []byte("name: N\x00\n"), 0o644)
		_, err := ImportTrains(ctx, db, dir, Options{})
		for _, want := range []string{
			"tiny.yaml line 4, column 13: vehicles[0].length: 0.01 m; a vehicle is at least 2 m long",
			"tiny.yaml line 7, column 25: consist[0].count: 100000 vehicles; a train has at most 400",
			"nul.yaml line 1, column 8: a NUL byte",
		} {
			if err == nil || !strings.Contains(err.Error(), want) {
				t.Errorf("error %v: want one saying %q", err, want)
			}
		}
		after, _ := db.Trains(ctx)
		if len(after) != len(before) {
			t.Errorf("%d trains after a failed import, %d before", len(after), len(before))
		}
	})
}
