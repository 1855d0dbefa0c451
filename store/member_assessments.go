package store

import (
	"context"
	"strings"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgtype"
)

// Table member_assessments: sql/migrations/002_screening.sql, 004, 009 (made anew, keyed by
// result set), 012 (fatigue), 017 (the other truss), 018 (a floor element's section modulus).

// MemberAssessment is a row of member_assessments: one member's rating under both scenarios
// and its flags, in a result set.
type MemberAssessment struct {
	SetID  int64
	Member string // the geometry's label
	// The member's lowest rating factor under each scenario; NULL where there is none or it
	// has no finite value.
	RFExisting, RFProposed pgtype.Float8
	SenseProposed          string // the sense of the proposed factor, "" without one
	// DemandIncrease is the largest live-demand increase, a fraction; the column refuses
	// NULL.
	DemandIncrease pgtype.Float8
	Flags          []string // never NULL: empty for none
	// Fatigue is the member's fatigue check (migration 016); its Status is "" where the run
	// checked no fatigue.
	Fatigue FatigueColumns
	// Other is the member's outcome on the truss that does not govern it (migration 017).
	Other OtherTrussColumns
}

// OtherTrussColumns are a member's lowest rating factors, existing and proposed, on the main
// truss that does not govern it; Truss is "" (the factors NULL) where one truss was screened.
type OtherTrussColumns struct {
	Truss                  string
	RFExisting, RFProposed pgtype.Float8
}

// FatigueColumns are a member's fatigue outcome: the status (no-data, below-cut-off,
// damaged; "" not checked), the detail used, the yearly damages (Miner sums) existing and
// proposed with their ratio, the damage to date, the remaining years and the year they run
// out (NULL: never), the largest stress ranges (MPa) and the proposed train doing most damage.
type FatigueColumns struct {
	Status                         string
	CategoryMPa, AreaMM2           pgtype.Float8
	DamageExisting, DamageProposed pgtype.Float8
	DamageRatio, DamageToDate      pgtype.Float8
	RemainingYears                 pgtype.Float8
	EndYear                        pgtype.Int4
	RangeExistingMPa               pgtype.Float8
	RangeProposedMPa               pgtype.Float8
	Train                          string
	// SectionModulusMM3 is the section modulus a floor element's check used (migration
	// 018; NULL for a truss member, whose AreaMM2 is its area).
	SectionModulusMM3 pgtype.Float8
}

// memberAssessmentColumns are member_assessments' columns: the COPY that writes the rows,
// the encoder's order and the SELECT that reads them.
var memberAssessmentColumns = []column[MemberAssessment]{
	{"set_id", func(a *MemberAssessment) any { return &a.SetID }},
	{"member", func(a *MemberAssessment) any { return &a.Member }},
	{"rf_existing", func(a *MemberAssessment) any { return &a.RFExisting }},
	{"rf_proposed", func(a *MemberAssessment) any { return &a.RFProposed }},
	{"sense_proposed", func(a *MemberAssessment) any { return &a.SenseProposed }},
	{"demand_increase", func(a *MemberAssessment) any { return &a.DemandIncrease }},
	{"flags", func(a *MemberAssessment) any { return &a.Flags }},
	{"fatigue_status", func(a *MemberAssessment) any { return &a.Fatigue.Status }},
	{"fatigue_category_mpa", func(a *MemberAssessment) any { return &a.Fatigue.CategoryMPa }},
	{"fatigue_area_mm2", func(a *MemberAssessment) any { return &a.Fatigue.AreaMM2 }},
	{"fatigue_damage_existing", func(a *MemberAssessment) any { return &a.Fatigue.DamageExisting }},
	{"fatigue_damage_proposed", func(a *MemberAssessment) any { return &a.Fatigue.DamageProposed }},
	{"fatigue_damage_ratio", func(a *MemberAssessment) any { return &a.Fatigue.DamageRatio }},
	{"fatigue_damage_to_date", func(a *MemberAssessment) any { return &a.Fatigue.DamageToDate }},
	{"fatigue_remaining_years", func(a *MemberAssessment) any { return &a.Fatigue.RemainingYears }},
	{"fatigue_end_year", func(a *MemberAssessment) any { return &a.Fatigue.EndYear }},
	{"fatigue_range_existing_mpa", func(a *MemberAssessment) any { return &a.Fatigue.RangeExistingMPa }},
	{"fatigue_range_proposed_mpa", func(a *MemberAssessment) any { return &a.Fatigue.RangeProposedMPa }},
	{"fatigue_train", func(a *MemberAssessment) any { return &a.Fatigue.Train }},
	{"other_truss", func(a *MemberAssessment) any { return &a.Other.Truss }},
	{"other_rf_existing", func(a *MemberAssessment) any { return &a.Other.RFExisting }},
	{"other_rf_proposed", func(a *MemberAssessment) any { return &a.Other.RFProposed }},
	{"fatigue_section_modulus_mm3", func(a *MemberAssessment) any { return &a.Fatigue.SectionModulusMM3 }},
}

// fatigueColumns lists member_assessments' fatigue columns (their names begin fatigue_),
// qualified by alias, and the fields of a that hold them, from the column table, for the
// queries that read them beside other tables.
func fatigueColumns(alias string, a *MemberAssessment) (names []string, fields []any) {
	for _, c := range memberAssessmentColumns {
		if strings.HasPrefix(c.name, "fatigue_") {
			names = append(names, alias+"."+c.name)
			fields = append(fields, c.field(a))
		}
	}
	return names, fields
}

// MemberAssessmentColumns are the names of member_assessments' columns, in the order
// MemberAssessment rows are encoded.
var MemberAssessmentColumns = columnNames(memberAssessmentColumns)

var copyMemberAssessments = copyStatement("member_assessments", MemberAssessmentColumns)

// MemberAssessment appends one member_assessments row.
func (e *CopyEncoder) MemberAssessment(a *MemberAssessment) { encodeRow(e, memberAssessmentColumns, a) }

// CopyMemberAssessments copies a binary COPY stream of member_assessments rows (CopyEncoder:
// Begin, MemberAssessment for each row, End) into the table.
func CopyMemberAssessments(ctx context.Context, tx pgx.Tx, stream []byte) error {
	return copyStream(ctx, tx, "member_assessments", copyMemberAssessments, stream)
}

// MemberAssessments reads the rows of a result set.
func (db *DB) MemberAssessments(ctx context.Context, setID int64) ([]MemberAssessment, error) {
	return selectRows(ctx, db, "member_assessments", memberAssessmentColumns, "set_id = $1", setID)
}
