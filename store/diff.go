package store

import (
	"context"
	"fmt"

	"github.com/jackc/pgx/v5"
)

// The comparison of two runs' pictures: run_bridges through run_picture
// (sql/migrations/009_result_sets.sql), joined with bridges for the names.

// BridgeChange is one bridge's difference between two runs.
type BridgeChange struct {
	BridgeID         string
	Name             string
	RankA, RankB     *int // nil where the bridge is not in that run
	RFA, RFB         *float64
	FlagsA, FlagsB   []string
	StatusA, StatusB string
	// LifeA, LifeB are the shortest remaining fatigue lives (years; nil: no fatigue check or
	// no life runs out; migration 012).
	LifeA, LifeB *float64
}

// DiffRuns compares two runs bridge by bridge; only bridges whose flags, rank, failure,
// worst proposed RF or shortest fatigue life differ are returned, in run B's priority order (a result carried forward
// counts as the same as the one it was carried from).
func (db *DB) DiffRuns(ctx context.Context, a, b int64) ([]BridgeChange, error) {
	rows, err := db.Pool.Query(ctx, `WITH ra AS (
			SELECT r.bridge_id, r.rf_proposed, r.flags, r.status, r.fatigue_life_years, row_number() OVER (ORDER BY `+rankOrder+`) AS rank FROM run_picture($1) r WHERE r.status <> 'pending'),
		rb AS (
			SELECT r.bridge_id, r.rf_proposed, r.flags, r.status, r.fatigue_life_years, row_number() OVER (ORDER BY `+rankOrder+`) AS rank FROM run_picture($2) r WHERE r.status <> 'pending')
		SELECT coalesce(rb.bridge_id, ra.bridge_id), coalesce(b.name, ''), ra.rank::int, rb.rank::int,
			ra.rf_proposed, rb.rf_proposed, coalesce(ra.flags, '{}'), coalesce(rb.flags, '{}'),
			coalesce(ra.status, ''), coalesce(rb.status, ''), ra.fatigue_life_years, rb.fatigue_life_years
		FROM ra FULL JOIN rb ON ra.bridge_id = rb.bridge_id
		LEFT JOIN bridges b ON b.bridge_id = coalesce(rb.bridge_id, ra.bridge_id)
		WHERE ra.rank IS DISTINCT FROM rb.rank OR ra.flags IS DISTINCT FROM rb.flags
			OR (ra.status = 'failed') IS DISTINCT FROM (rb.status = 'failed') OR ra.rf_proposed IS DISTINCT FROM rb.rf_proposed
			OR ra.fatigue_life_years IS DISTINCT FROM rb.fatigue_life_years
		ORDER BY rb.rank NULLS LAST, ra.rank`, a, b)
	if err != nil {
		return nil, fmt.Errorf("comparing runs %d and %d: %w", a, b, err)
	}
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (BridgeChange, error) {
		var c BridgeChange
		return c, r.Scan(&c.BridgeID, &c.Name, &c.RankA, &c.RankB, &c.RFA, &c.RFB, &c.FlagsA, &c.FlagsB, &c.StatusA, &c.StatusB, &c.LifeA, &c.LifeB)
	})
}
