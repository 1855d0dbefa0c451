package store_test

import (
	"context"
	"math"
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgtype"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestResultColumnsAreTheTables: the column tables of member_results and member_assessments
// name the tables' columns, all of them, in the order the migrations made them (reference:
// the database's own catalogue, information_schema.columns).
func TestResultColumnsAreTheTables(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	for table, cols := range map[string][]string{
		"member_results":     store.MemberResultColumns,
		"member_assessments": store.MemberAssessmentColumns,
	} {
		rows, err := db.Pool.Query(ctx, `SELECT column_name::text FROM information_schema.columns
			WHERE table_schema = 'public' AND table_name = $1 ORDER BY ordinal_position`, table)
		if err != nil {
			t.Fatal(err)
		}
		got, err := pgx.CollectRows(rows, pgx.RowTo[string])
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(got, cols) {
			t.Errorf("%s: the table has %v, the column table %v", table, got, cols)
		}
	}
}

// TestResultRowsRoundTrip: rows encoded by CopyEncoder and copied in (CopyMemberResults,
// CopyMemberAssessments) read back equal (MemberResults, MemberAssessments): every column is
// written and read through the same field, NULLs, NaN and ±Inf, text beyond ASCII and empty
// and non-empty arrays included.
func TestResultRowsRoundTrip(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	const set = 1<<40 + 3 // above 32 bits, as a long-lived database reaches
	f := func(v float64) pgtype.Float8 { return pgtype.Float8{Float64: v, Valid: true} }
	results := []store.MemberResult{
		{SetID: set, Scenario: "existing", Member: "U1-U2", Kind: "top chord", DeadKN: -812.5, LiveMaxKN: math.Inf(1),
			LiveMinKN: -1402.25, Impact: 1.21, RFTension: f(2.5), Basis: "capacity", MaxTrain: "Ærøvik Güterzug",
			MaxHeadM: f(61.5), MaxDirection: "right to left", MaxFromM: f(0), MaxToM: f(48),
			MinTrain: "急行「霧島」", MaxCount: pgtype.Int4{Int32: 17, Valid: true}},
		{SetID: set, Scenario: "proposed", Member: "U1-U2", Kind: "top chord", DeadKN: math.Copysign(0, -1),
			LiveMinKN: math.Inf(-1), Impact: 1, RFCompression: f(0.97), MinHeadM: f(-3), MinFromM: f(1e-9), MinToM: f(1e9),
			MinDirection: "left to right", MinCount: pgtype.Int4{Int32: math.MaxInt32, Valid: true}},
	}
	assessments := []store.MemberAssessment{
		{SetID: set, Member: "U1-U2", RFExisting: f(1.43), RFProposed: f(0.97), SenseProposed: "compression",
			DemandIncrease: f(0.2), Flags: []string{"exceeds", "naïve, {braced} \"quoted\" \\ flag"},
			Other: store.OtherTrussColumns{Truss: "B", RFExisting: f(1.875), RFProposed: f(1.2)}},
		{SetID: set, Member: "L0-L1", DemandIncrease: f(0), Flags: []string{}, Other: store.OtherTrussColumns{Truss: "A", RFProposed: f(0.5)}},
	}
	var e store.CopyEncoder
	err := pgx.BeginFunc(ctx, db.Pool, func(tx pgx.Tx) error {
		e.Begin()
		for i := range results {
			e.MemberResult(&results[i])
		}
		if err := store.CopyMemberResults(ctx, tx, e.End()); err != nil {
			return err
		}
		e.Begin()
		for i := range assessments {
			e.MemberAssessment(&assessments[i])
		}
		return store.CopyMemberAssessments(ctx, tx, e.End())
	})
	if err != nil {
		t.Fatal(err)
	}
	gotR, err := db.MemberResults(ctx, set)
	if err != nil {
		t.Fatal(err)
	}
	gotA, err := db.MemberAssessments(ctx, set)
	if err != nil {
		t.Fatal(err)
	}
	// Rows come back in no set order: compare them by key.
	slices.SortFunc(gotR, func(a, b store.MemberResult) int { return strings.Compare(a.Scenario, b.Scenario) })
	slices.SortFunc(gotA, func(a, b store.MemberAssessment) int { return strings.Compare(a.Member, b.Member) })
	slices.SortFunc(assessments, func(a, b store.MemberAssessment) int { return strings.Compare(a.Member, b.Member) })
	if !reflect.DeepEqual(gotR, results) {
		t.Errorf("member_results read back\n%+v\nwritten\n%+v", gotR, results)
	}
	if !reflect.DeepEqual(gotA, assessments) {
		t.Errorf("member_assessments read back\n%+v\nwritten\n%+v", gotA, assessments)
	}
}
