package importers

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

func TestFloorSectionModulus(t *testing.T) {
	head := "bridge_id,member,capacity_tension_kn,capacity_moment_knm,section_modulus_mm3,fatigue_category,area_mm2\n"
	var rows []store.Member
	_, err := ParseMembers("members.csv", strings.NewReader(head+"NME-1,S1-3,,420,3.2e6,71,\nNME-1,FB4,,900,,riveted,\n"), floorStub{},
		func(r store.Staged[store.Member]) bool { rows = append(rows, r.Row); return true })
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 || rows[0].SectionModulusMM3 == nil || *rows[0].SectionModulusMM3 != 3.2e6 || rows[0].FatigueCategory != "71" ||
		rows[1].SectionModulusMM3 != nil || rows[1].FatigueCategory != "riveted" {
		t.Fatalf("rows %+v", rows)
	}
	badFloorRows(t, head, []badRow{
		{"section modulus on a truss member", "NME-1,L0-L1,900,,2e6,71,9000", 5, "2e6", "truss member"},
		{"negative section modulus", "NME-1,S1-2,,300,-1e6,71,", 5, "-1e6", "greater than zero"},
		{"section modulus beyond the bound", "NME-1,S1-2,,300,5e9,71,", 5, "5e9", "at most 1e+09 mm³"},
		{"section modulus not a number", "NME-1,S1-2,,300,big,71,", 5, "big", "not a number"},
		{"area on a floor element", "NME-1,S1-2,,300,3e6,71,9000", 7, "9000", "section_modulus_mm3"},
	})
}

// badRow is a members.csv row that must fail, and the error it must give: its column, the
// value quoted and a part of the message.
type badRow struct {
	name, row string
	column    int
	value     string
	msg       string
}

// badFloorRows checks each row, after head, against floorStub's bridge (badMemberRow).
func badFloorRows(t *testing.T, head string, rows []badRow) {
	t.Helper()
	for _, tc := range rows {
		t.Run(tc.name, func(t *testing.T) {
			badMemberRow(t, head+tc.row+"\n", floorStub{}, tc.column, tc.value, tc.msg)
		})
	}
}

func TestFloorSectionModulusImperial(t *testing.T) {
	var rows []store.Member
	if _, err := ParseMembers("members.csv", strings.NewReader("bridge_id,member,capacity_moment_kipft,section_modulus_in3\nNME-1,S1-1,100,200\n"), floorStub{},
		func(r store.Staged[store.Member]) bool { rows = append(rows, r.Row); return true }); err != nil {
		t.Fatal(err)
	}
	// 1 in = 25.4 mm exactly, so 1 in³ = 16,387.064 mm³ (definition of the inch).
	if got := *rows[0].SectionModulusMM3; math.Abs(got-200*16387.064) > 1e-6 {
		t.Errorf("200 in³ read as %v mm³", got)
	}
}

// TestImportFloorSectionModulus: a section modulus goes into the database and comes back as
// imported; changing it renews the bridge's input version (migration 010's members trigger,
// which watches every column); a file with a bad value names its line and column and writes
// nothing.
func TestImportFloorSectionModulus(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	importExamples(t, db)
	head := "bridge_id,member,capacity_tension_kn,capacity_moment_knm,section_modulus_mm3,fatigue_category\n"
	if _, err := ImportMembers(ctx, db, "floor.csv", strings.NewReader(head+"NME-0101,S1-4,,650,4.1e6,71\n"), Options{}); err != nil {
		t.Fatal(err)
	}
	read := func() store.Member {
		t.Helper()
		ms, err := db.Members(ctx, "NME-0101")
		if err != nil {
			t.Fatal(err)
		}
		for _, m := range ms {
			if m.Member == "S1-4" {
				return m
			}
		}
		t.Fatal("S1-4 not stored")
		return store.Member{}
	}
	if m := read(); m.SectionModulusMM3 == nil || *m.SectionModulusMM3 != 4.1e6 || m.FatigueCategory != "71" {
		t.Fatalf("stored %+v", m)
	}
	v0 := version(t, db, "NME-0101")
	res, err := ImportMembers(ctx, db, "floor.csv", strings.NewReader(head+"NME-0101,S1-4,,650,3.6e6,71\n"), Options{})
	if err != nil || res.Counts != (store.Counts{Rows: 1, Updated: 1}) {
		t.Fatalf("counts %+v, %v", res.Counts, err)
	}
	if m := read(); *m.SectionModulusMM3 != 3.6e6 {
		t.Errorf("section modulus %v after the update, want 3.6e6", *m.SectionModulusMM3)
	}
	if v := version(t, db, "NME-0101"); v <= v0 {
		t.Errorf("input version %d after the section modulus changed, was %d", v, v0)
	}
	v1 := version(t, db, "NME-0101")
	_, err = ImportMembers(ctx, db, "floor.csv", strings.NewReader(head+"NME-0101,S1-5,,650,2.9e6,71\nNME-0101,L0-L1,3150,,2e6,71\n"), Options{})
	var fe *FileErrors
	if !errors.As(err, &fe) || len(fe.Errs) != 1 || fe.Errs[0].Line != 3 || fe.Errs[0].Column != 5 || fe.Errs[0].Field != "section_modulus_mm3" {
		t.Fatalf("want one error at line 3, column 5 (section_modulus_mm3), got %v", err)
	}
	if !strings.Contains(err.Error(), "floor.csv") || !strings.Contains(err.Error(), "nothing written") {
		t.Errorf("error %q does not name the file or say nothing was written", err)
	}
	if got := labels(t, db, "NME-0101"); strings.Contains(strings.Join(got, " "), "S1-5") {
		t.Errorf("a file with an error wrote its good row: %v", got)
	}
	if v := version(t, db, "NME-0101"); v != v1 {
		t.Errorf("a refused file renewed the input version: %d, was %d", v, v1)
	}
}
