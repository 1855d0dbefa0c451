package store

import (
	"context"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgtype"
)

// Table member_results: sql/migrations/002_screening.sql, 003 (the counts), 004, 009 (made
// anew, keyed by result set), 012_cross_section.sql (truss and loading cases), 015_network.sql (e_rating).

// MemberResult is a row of member_results: one member's live-load envelope under one
// scenario, in a result set. Forces are kN, positions m.
type MemberResult struct {
	SetID    int64
	Scenario string // existing or proposed
	Member   string // the geometry's label
	Kind     string // the member kind, e.g. "top chord"
	// The dead load's force, the live-load extremes and the dynamic factor (1 + I), stored
	// as they are, NaN and ±Inf included.
	DeadKN, LiveMaxKN, LiveMinKN, Impact float64
	// The rating factors in each sense; NULL where there is none or it has no finite value.
	RFTension, RFCompression pgtype.Float8
	Basis                    string // what the factors rest on
	// Each extreme's train, and where it stood: its head, its direction and the loaded
	// stretch (NULL and "" with no train on the bridge); Count is the number of vehicles in
	// the consist's last group (NULL with no train on the bridge).
	MaxTrain           string
	MaxHeadM           pgtype.Float8
	MaxDirection       string
	MaxFromM, MaxToM   pgtype.Float8
	MinTrain           string
	MinHeadM           pgtype.Float8
	MinDirection       string
	MinFromM, MinToM   pgtype.Float8
	MaxCount, MinCount pgtype.Int4
	// Truss is the main truss the row's results are of, "A" or "B": the one that governs
	// the member (one row per member and scenario). MaxCase and MinCase describe the loading
	// case behind each extreme: the tracks loaded, their shares, the multiple-presence factor.
	Truss            string
	MaxCase, MinCase string
	// Dynamic describes the member's dynamic allowance: which, its length and why.
	Dynamic string
	// MaxShare and MinShare are the factors on the governing train's own force at its
	// placement that give each extreme (0: none, or a row from before migration 012).
	MaxShare, MinShare float64
	// ERating is the member's Cooper E rating, 80 x its RF under Cooper E80 (migration 015);
	// NULL where the run did not ask for it or the member is not rated under E80.
	ERating pgtype.Float8
}

// memberResultColumns are member_results' columns: the COPY that writes the rows, the
// encoder's order and the SELECT that reads them.
var memberResultColumns = []column[MemberResult]{
	{"set_id", func(r *MemberResult) any { return &r.SetID }},
	{"scenario", func(r *MemberResult) any { return &r.Scenario }},
	{"member", func(r *MemberResult) any { return &r.Member }},
	{"kind", func(r *MemberResult) any { return &r.Kind }},
	{"dead_kn", func(r *MemberResult) any { return &r.DeadKN }},
	{"live_max_kn", func(r *MemberResult) any { return &r.LiveMaxKN }},
	{"live_min_kn", func(r *MemberResult) any { return &r.LiveMinKN }},
	{"impact", func(r *MemberResult) any { return &r.Impact }},
	{"rf_tension", func(r *MemberResult) any { return &r.RFTension }},
	{"rf_compression", func(r *MemberResult) any { return &r.RFCompression }},
	{"basis", func(r *MemberResult) any { return &r.Basis }},
	{"max_train", func(r *MemberResult) any { return &r.MaxTrain }},
	{"max_head_m", func(r *MemberResult) any { return &r.MaxHeadM }},
	{"max_direction", func(r *MemberResult) any { return &r.MaxDirection }},
	{"max_from_m", func(r *MemberResult) any { return &r.MaxFromM }},
	{"max_to_m", func(r *MemberResult) any { return &r.MaxToM }},
	{"min_train", func(r *MemberResult) any { return &r.MinTrain }},
	{"min_head_m", func(r *MemberResult) any { return &r.MinHeadM }},
	{"min_direction", func(r *MemberResult) any { return &r.MinDirection }},
	{"min_from_m", func(r *MemberResult) any { return &r.MinFromM }},
	{"min_to_m", func(r *MemberResult) any { return &r.MinToM }},
	{"max_count", func(r *MemberResult) any { return &r.MaxCount }},
	{"min_count", func(r *MemberResult) any { return &r.MinCount }},
	{"truss", func(r *MemberResult) any { return &r.Truss }},
	{"max_case", func(r *MemberResult) any { return &r.MaxCase }},
	{"min_case", func(r *MemberResult) any { return &r.MinCase }},
	{"dynamic", func(r *MemberResult) any { return &r.Dynamic }},
	{"max_share", func(r *MemberResult) any { return &r.MaxShare }},
	{"min_share", func(r *MemberResult) any { return &r.MinShare }},
	{"e_rating", func(r *MemberResult) any { return &r.ERating }},
}

// MemberResultColumns are the names of member_results' columns, in the order MemberResult
// rows are encoded.
var MemberResultColumns = columnNames(memberResultColumns)

var copyMemberResults = copyStatement("member_results", MemberResultColumns)

// MemberResult appends one member_results row.
func (e *CopyEncoder) MemberResult(r *MemberResult) { encodeRow(e, memberResultColumns, r) }

// CopyMemberResults copies a binary COPY stream of member_results rows (CopyEncoder: Begin,
// MemberResult for each row, End) into the table.
func CopyMemberResults(ctx context.Context, tx pgx.Tx, stream []byte) error {
	return copyStream(ctx, tx, "member_results", copyMemberResults, stream)
}

// MemberResults reads the rows of a result set.
func (db *DB) MemberResults(ctx context.Context, setID int64) ([]MemberResult, error) {
	return selectRows(ctx, db, "member_results", memberResultColumns, "set_id = $1", setID)
}
