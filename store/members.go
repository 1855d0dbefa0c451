package store

import (
	"context"
	"fmt"

	"github.com/jackc/pgx/v5"
)

// Table members: sql/migrations/001_inventory.sql; rating_sense, 011; truss, 012_cross_section.sql; floor capacities, 013_floor_system.sql; section_modulus_mm3, 018_floor_fatigue.sql.

// Member is one member's stored capacity, a row of the members table. A member has a
// tension capacity, a compression capacity, or both; or instead a rating factor for a named
// reference loading (the stored capacity ratio). Capacities are magnitudes in kN before
// the condition factor.
type Member struct {
	BridgeID              string
	Member                string // the geometry's label, e.g. "U1-L2"
	CapacityTensionKN     *float64
	CapacityCompressionKN *float64
	RatingFactor          *float64
	ReferenceTrain        *string
	// RatingSense is the sense the stored rating factor was rated in ("tension" or
	// "compression"); nil: not given.
	RatingSense     *string
	ConditionFactor float64 // 0 < f <= 1; 1 for a member in as-built condition
	AreaMM2         *float64
	FatigueCategory string

	// Truss is "A" or "B" for a row of one main truss's member, "" for the row of both.
	Truss string
	// CapacityMomentKNM and CapacityShearKN are a floor element's capacities (kN·m, kN;
	// migration 014); RatingSense is then "moment" or "shear".
	CapacityMomentKNM *float64
	CapacityShearKN   *float64
	// SectionModulusMM3 is a floor element's elastic section modulus (mm³) for its fatigue
	// check (migration 018); nil for a truss member.
	SectionModulusMM3 *float64
}

var membersTable = table{
	name: "members",
	key:  []string{"bridge_id", "member", "truss"},
	cols: []string{"capacity_tension_kn", "capacity_compression_kn", "rating_factor", "reference_train",
		"rating_sense", "condition_factor", "area_mm2", "fatigue_category", "capacity_moment_knm", "capacity_shear_kn",
		"section_modulus_mm3"},
	touch: "updated_at",
}

const memberColumns = `bridge_id, member, capacity_tension_kn, capacity_compression_kn, rating_factor, reference_train,
	rating_sense, condition_factor, area_mm2, fatigue_category, truss, capacity_moment_knm, capacity_shear_kn,
	section_modulus_mm3`

func (m Member) values() []any {
	return []any{m.BridgeID, m.Member, m.Truss, m.CapacityTensionKN, m.CapacityCompressionKN, m.RatingFactor, m.ReferenceTrain,
		m.RatingSense, m.ConditionFactor, m.AreaMM2, m.FatigueCategory, m.CapacityMomentKNM, m.CapacityShearKN,
		m.SectionModulusMM3}
}

func (m *Member) pointers() []any {
	return []any{&m.BridgeID, &m.Member, &m.CapacityTensionKN, &m.CapacityCompressionKN, &m.RatingFactor,
		&m.ReferenceTrain, &m.RatingSense, &m.ConditionFactor, &m.AreaMM2, &m.FatigueCategory, &m.Truss,
		&m.CapacityMomentKNM, &m.CapacityShearKN, &m.SectionModulusMM3}
}

// Members returns the stored members of one bridge, ordered by label.
func (db *DB) Members(ctx context.Context, bridgeID string) ([]Member, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+memberColumns+" FROM members WHERE bridge_id = $1 ORDER BY member", bridgeID)
	if err != nil {
		return nil, fmt.Errorf("reading members of bridge %q: %w", bridgeID, err)
	}
	return collectMembers(rows)
}

// AllMembers returns the stored members of every bridge, grouped by bridge_id.
func (db *DB) AllMembers(ctx context.Context) (map[string][]Member, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+memberColumns+" FROM members ORDER BY bridge_id, member")
	if err != nil {
		return nil, fmt.Errorf("reading members: %w", err)
	}
	ms, err := collectMembers(rows)
	if err != nil {
		return nil, err
	}
	out := map[string][]Member{}
	for _, m := range ms {
		out[m.BridgeID] = append(out[m.BridgeID], m)
	}
	return out, nil
}

func collectMembers(rows pgx.Rows) ([]Member, error) {
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (Member, error) {
		var m Member
		return m, r.Scan(m.pointers()...)
	})
}

// ReferenceTrains lists the distinct reference trains that stored rating factors name. It
// walks the index of reference trains (migration 010) one train at a time, a skip scan: a
// handful of index probes however many members name them, where SELECT DISTINCT reads every
// member (1.6 s at 100,000 bridges).
func (db *DB) ReferenceTrains(ctx context.Context) ([]string, error) {
	rows, err := db.Pool.Query(ctx, `WITH RECURSIVE t (train) AS (
			SELECT min(reference_train) FROM members WHERE reference_train IS NOT NULL
			UNION ALL
			SELECT (SELECT min(m.reference_train) FROM members m WHERE m.reference_train > t.train)
			FROM t WHERE t.train IS NOT NULL)
		SELECT train FROM t WHERE train IS NOT NULL ORDER BY train`)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, pgx.RowTo[string])
}
