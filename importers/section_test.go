package importers

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store/pgtest"
)

const sectionHeader = "bridge_id,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m,truss_share,tracks,truss_spacing_m,track_offsets_m,line_speed_kmh,first_frequency_hz,truss_weight_kn_per_m\n"

// TestSectionColumns reads the cross-section columns, metric and imperial.
func TestSectionColumns(t *testing.T) {
	rows, _, err := parseB(t, sectionHeader+"X-1,pratt,48,8,6,through,30,,,5.2,-2.25 2.25,120,3.1,8\nX-2,pratt,48,8,6,through,30,0.5,2,,,,,\n")
	if err != nil {
		t.Fatal(err)
	}
	b := rows[0].Row
	if b.TrussSpacingM == nil || *b.TrussSpacingM != 5.2 || !slices.Equal(b.TrackOffsetsM, []float64{-2.25, 2.25}) ||
		*b.LineSpeedKmh != 120 || *b.FirstFrequencyHz != 3.1 || b.TrussWeightKNPerM != 8 {
		t.Errorf("section read as %+v", b)
	}
	if l := rows[1].Row; l.TrussSpacingM != nil || l.TrackOffsetsM != nil || l.Tracks != 2 || l.TrussShare != 0.5 {
		t.Errorf("a row without a section read as %+v", l)
	}
	imp := "bridge_id,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m,truss_spacing_ft,track_offsets_ft,line_speed_mph,truss_weight_kip_per_ft\nX-3,pratt,48,8,6,through,30,17,-6|6,60,0.5\n"
	rows, _, err = parseB(t, imp)
	if err != nil {
		t.Fatal(err)
	}
	b = rows[0].Row
	// 1 ft = 0.3048 m, 1 mile = 1.609344 km (exact by definition), 1 kip/ft = 14.5939 kN/m
	near := func(a, b float64) bool { return math.Abs(a-b) < 1e-9 }
	if !near(*b.TrussSpacingM, 17*0.3048) || !near(b.TrackOffsetsM[0], -6*0.3048) || !near(b.TrackOffsetsM[1], 6*0.3048) ||
		!near(*b.LineSpeedKmh, 60*1.609344) || math.Abs(b.TrussWeightKNPerM-0.5*14.5939) > 1e-3 {
		t.Errorf("imperial section read as %+v", b)
	}
}

// TestBadSection: each problem of the cross-section columns is reported at its field.
func TestBadSection(t *testing.T) {
	row := func(share, tracks, spacing, offsets, speed, freq, weight string) string {
		return sectionHeader + strings.Join([]string{"X-1,pratt,48,8,6,through,30", share, tracks, spacing, offsets, speed, freq, weight}, ",") + "\n"
	}
	tests := []struct {
		name, text    string
		column        int
		value, msg    string
		alsoColumnErr int // a second error's column, 0 for none
	}{
		{"share with spacing", row("0.5", "", "5", "0", "", "", ""), 8, "0.5", "not both", 0},
		{"both legacy columns with a section", row("0.5", "2", "5", "0", "", "", ""), 8, "0.5", "not both", 9},
		{"offsets without spacing", row("", "", "", "0", "", "", ""), 10, "", "truss spacing", 0},
		{"spacing without offsets", row("", "", "5", "", "", "", ""), 11, "", "one offset per track", 0},
		{"spacing too small", row("", "", "0.3", "0", "", "", ""), 10, "0.3", "from 1 m", 0},
		{"offset not a number", row("", "", "5", "-2 x", "", "", ""), 11, "x", "not a number", 0},
		{"offset outside the spacing", row("", "", "5", "-2 7", "", "", ""), 11, "-2 7", "farther", 0},
		{"too many tracks", row("", "", "5", "0 0 0 0 0 0 0 0 0", "", "", ""), 11, "0 0 0 0 0 0 0 0 0", "1 to 8", 0},
		{"negative speed", row("", "", "", "", "-80", "", ""), 12, "-80", "greater than zero", 0},
		{"frequency too high", row("", "", "", "", "", "250", ""), 13, "250", "at most 100 Hz", 0},
		{"truss weight above the dead load", row("", "", "", "", "", "", "31"), 14, "31", "part of the dead load", 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rows, _, err := parseB(t, tc.text)
			if len(rows) != 0 {
				t.Fatalf("a bad row was passed on: %+v", rows)
			}
			errs := fieldErrors(t, err)
			e := errs[0]
			if e.Line != 2 || e.Column != tc.column || e.Value != tc.value || !strings.Contains(e.Msg, tc.msg) {
				t.Errorf("got %q (line %d, column %d, value %q); want line 2, column %d, value %q, message with %q",
					e.Error(), e.Line, e.Column, e.Value, tc.column, tc.value, tc.msg)
			}
			if tc.alsoColumnErr != 0 && (len(errs) < 2 || errs[1].Column != tc.alsoColumnErr) {
				t.Errorf("errors %v: want a second at column %d", errs, tc.alsoColumnErr)
			}
			if tc.msg == "not both" && (!strings.Contains(e.Msg, "truss_spacing_m") || !strings.Contains(e.Msg, "track_offsets_m")) {
				t.Errorf("message %q does not name the section's columns", e.Msg)
			}
		})
	}
}

// TestSectionStored: the cross-section survives the database, and a change of it renews the
// bridge's input version (012's trigger).
func TestSectionStored(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	text := sectionHeader + "X-1,pratt,48,8,6,through,30,,,5.2,-2.25 2.25,120,3.1,8\nX-2,pratt,48,8,6,through,30,0.5,1,,,,,\n"
	if _, err := ImportBridges(ctx, db, "bridges.csv", strings.NewReader(text), Options{}); err != nil {
		t.Fatal(err)
	}
	b, err := db.Bridge(ctx, "X-1")
	if err != nil {
		t.Fatal(err)
	}
	if b.TrussSpacingM == nil || *b.TrussSpacingM != 5.2 || !slices.Equal(b.TrackOffsetsM, []float64{-2.25, 2.25}) ||
		*b.LineSpeedKmh != 120 || *b.FirstFrequencyHz != 3.1 || b.TrussWeightKNPerM != 8 {
		t.Errorf("stored section %+v", b)
	}
	l, err := db.Bridge(ctx, "X-2")
	if err != nil || l.TrussSpacingM != nil || l.TrackOffsetsM != nil || l.LineSpeedKmh != nil {
		t.Errorf("a row without a section stored as %+v (%v)", l, err)
	}
	changed := strings.Replace(text, "-2.25 2.25", "-2 2.5", 1)
	res, err := ImportBridges(ctx, db, "bridges.csv", strings.NewReader(changed), Options{})
	if err != nil || res.Counts.Updated != 1 {
		t.Fatalf("changed offsets: %+v, %v", res.Counts, err)
	}
	b2, err := db.Bridge(ctx, "X-1")
	if err != nil || b2.InputVersion == b.InputVersion || !slices.Equal(b2.TrackOffsetsM, []float64{-2, 2.5}) {
		t.Errorf("after changing the offsets: version %d (was %d), offsets %v, %v", b2.InputVersion, b.InputVersion, b2.TrackOffsetsM, err)
	}
}

// TestMembersByTruss: members.csv's truss column keeps a row of both trusses and one of each
// truss for the same member apart; a truss other than A or B, and a row repeated for one
// truss, are refused at their field.
func TestMembersByTruss(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	if _, err := ImportBridges(ctx, db, "bridges.csv", strings.NewReader(sectionHeader+"X-1,pratt,48,8,6,through,30,,,5.2,0.6,,,\n"), Options{}); err != nil {
		t.Fatal(err)
	}
	head := "bridge_id,member,capacity_tension_kn,capacity_compression_kn,truss\n"
	good := head + "X-1,L2-L3,900,900,\nX-1,L2-L3,800,800,a\nX-1,L2-L3,700,700,B\n"
	if _, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(good), Options{}); err != nil {
		t.Fatal(err)
	}
	ms, err := db.Members(ctx, "X-1")
	if err != nil || len(ms) != 3 {
		t.Fatalf("%d members stored, want 3 (%v)", len(ms), err)
	}
	got := map[string]float64{}
	for _, m := range ms {
		got[m.Truss] = *m.CapacityTensionKN
	}
	if got[""] != 900 || got["A"] != 800 || got["B"] != 700 {
		t.Errorf("stored by truss: %v", got)
	}
	for _, bad := range []struct {
		text, value, msg string
		column           int
	}{
		{head + "X-1,L2-L3,900,900,C\n", "C", "must be A, B or empty", 5},
		{head + "X-1,L2-L3,900,900,B\nX-1,L2-L3,800,800,B\n", "B", "repeated", 5},
	} {
		_, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(bad.text), Options{})
		errs := fieldErrors(t, err)
		if e := errs[0]; e.Column != bad.column || e.Value != bad.value || !strings.Contains(e.Msg, bad.msg) {
			t.Errorf("got %q (column %d, value %q); want column %d, value %q, %q", e.Error(), e.Column, e.Value, bad.column, bad.value, bad.msg)
		}
	}
}
