package importers

import (
	"context"
	"os"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// replaceFile is testdata/members.csv with two of NME-0101's six rows left out (L0-L1 and
// U3-U4): a members file for a bridge whose geometry lost those members.
func replaceFile(t *testing.T) string {
	t.Helper()
	data, err := os.ReadFile("../testdata/members.csv")
	if err != nil {
		t.Fatal(err)
	}
	var keep []string
	for _, l := range strings.SplitAfter(string(data), "\n") {
		if strings.HasPrefix(l, "NME-0101,L0-L1,") || strings.HasPrefix(l, "NME-0101,U3-U4,") {
			continue
		}
		keep = append(keep, l)
	}
	return strings.Join(keep, "")
}

// labels lists the stored member labels of a bridge.
func labels(t *testing.T, db *store.DB, bridge string) []string {
	t.Helper()
	ms, err := db.Members(context.Background(), bridge)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, m := range ms {
		out = append(out, m.Member)
	}
	return out
}

func version(t *testing.T, db *store.DB, bridge string) int64 {
	t.Helper()
	b, err := db.Bridge(context.Background(), bridge)
	if err != nil {
		t.Fatal(err)
	}
	return b.InputVersion
}

// TestReplaceMembers: a replacing import deletes exactly the stored rows of the file's bridges
// that the file does not list. The expected rows are counted from the two files by hand: a
// brute-force set difference of the keys, independent of the SQL that does it.
func TestReplaceMembers(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	importExamples(t, db)
	text := replaceFile(t)
	others := map[string][]string{}
	for _, b := range []string{"NME-0102", "NME-0207", "NME-0310"} {
		others[b] = labels(t, db, b)
	}
	v0101, v0102 := version(t, db, "NME-0101"), version(t, db, "NME-0102")

	t.Run("without replace nothing is deleted", func(t *testing.T) {
		res, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(text), Options{})
		if err != nil || res.Counts != (store.Counts{Rows: 10, Unchanged: 10}) || res.Replaced {
			t.Fatalf("counts %+v, replaced %v, %v", res.Counts, res.Replaced, err)
		}
		if got := labels(t, db, "NME-0101"); len(got) != 6 {
			t.Errorf("NME-0101 keeps %v, want its 6 rows", got)
		}
		if v := version(t, db, "NME-0101"); v != v0101 {
			t.Errorf("an import that changes nothing renewed the input version: %d, was %d", v, v0101)
		}
	})
	t.Run("check with replace writes nothing and counts", func(t *testing.T) {
		res, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(text), Options{Check: true, Replace: true})
		if err != nil || res.Counts != (store.Counts{Rows: 10, Unchanged: 10, Deleted: 2}) || !res.Checked || !res.Replaced {
			t.Fatalf("counts %+v, %v", res.Counts, err)
		}
		if got := labels(t, db, "NME-0101"); len(got) != 6 {
			t.Errorf("a check removed rows: NME-0101 has %v", got)
		}
		if v := version(t, db, "NME-0101"); v != v0101 {
			t.Errorf("a check renewed the input version: %d, was %d", v, v0101)
		}
	})
	t.Run("replace deletes the rows the file drops", func(t *testing.T) {
		res, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(text), Options{Replace: true})
		if err != nil || res.Counts != (store.Counts{Rows: 10, Unchanged: 10, Deleted: 2}) || res.BatchID == 0 {
			t.Fatalf("counts %+v, batch %d, %v", res.Counts, res.BatchID, err)
		}
		// The set difference, by hand: NME-0101's six labels less L0-L1 and U3-U4, in label order.
		if got := strings.Join(labels(t, db, "NME-0101"), " "); got != "L0-U1 L3-L4 L4-U4 U1-L2" {
			t.Errorf("NME-0101 keeps %q", got)
		}
		for b, want := range others {
			if got := labels(t, db, b); strings.Join(got, " ") != strings.Join(want, " ") {
				t.Errorf("%s: %v, was %v: a bridge the file does not shrink lost rows", b, got, want)
			}
		}
		// Migration 010's AFTER DELETE trigger renews the version of the bridge that lost rows,
		// and of no other.
		if v := version(t, db, "NME-0101"); v <= v0101 {
			t.Errorf("input version of NME-0101 %d after the removal, was %d", v, v0101)
		}
		if v := version(t, db, "NME-0102"); v != v0102 {
			t.Errorf("input version of NME-0102 %d, was %d: it lost no rows", v, v0102)
		}
	})
	t.Run("bridges absent from the file keep their rows", func(t *testing.T) {
		one := "bridge_id,member,capacity_tension_kn,condition_factor,area_mm2,fatigue_category\nNME-0310,L4-L5,5200,1.0,16000,71\n"
		res, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(one), Options{Replace: true})
		if err != nil || res.Counts != (store.Counts{Rows: 1, Unchanged: 1}) {
			t.Fatalf("counts %+v, %v", res.Counts, err)
		}
		if got := labels(t, db, "NME-0101"); len(got) != 4 {
			t.Errorf("NME-0101, absent from the file, has %v", got)
		}
	})
	t.Run("replace is for members files only", func(t *testing.T) {
		_, err := ImportBridgesFile(ctx, db, "../testdata/bridges.csv", Options{Replace: true})
		if err == nil || !strings.Contains(err.Error(), "members file only") {
			t.Errorf("bridges import with Replace: %v", err)
		}
	})
}
