package store

import (
	"context"
	"encoding/json"
	"fmt"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/screening/report"
)

// rankOrder is the priority order: lowest proposed RF first, then the largest demand
// increase; bridges with no rated member after those, failed bridges last.
const rankOrder = `(r.status = 'failed'), r.rf_proposed ASC NULLS LAST, r.demand_increase DESC NULLS LAST, r.bridge_id`

// Ranked returns a run's priority list (limit 0: all of it), joined with the inventory's
// current names and dates.
func (db *DB) Ranked(ctx context.Context, runID int64, limit int) ([]report.BridgeRow, error) {
	q := `SELECT row_number() OVER (ORDER BY ` + rankOrder + `), r.bridge_id, coalesce(b.name, ''), coalesce(b.line, ''),
		b.chainage_km, coalesce(b.truss_type, ''), coalesce(b.span_m, 0), coalesce(b.panels, 0), coalesce(r.worst_member, ''),
		r.rf_existing, r.rf_proposed, r.demand_increase, r.headroom, r.flags, r.flag_counts,
		coalesce(r.governing_train, ''), coalesce(r.governing_sense, ''), r.governing_head_m,
		coalesce(r.governing_direction, ''), r.governing_from_m, r.governing_to_m,
		coalesce(to_char(b.last_inspected, 'YYYY-MM-DD'), ''), r.status, r.error
		FROM run_bridges r LEFT JOIN bridges b ON b.bridge_id = r.bridge_id
		WHERE r.run_id = $1 AND r.status <> 'pending'
		ORDER BY ` + rankOrder
	args := []any{runID}
	if limit > 0 {
		q += " LIMIT $2"
		args = append(args, limit)
	}
	rows, err := db.Pool.Query(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("ranking run %d: %w", runID, err)
	}
	return pgx.CollectRows(rows, func(row pgx.CollectableRow) (report.BridgeRow, error) {
		var b report.BridgeRow
		var inc *float64
		var counts []byte
		err := row.Scan(&b.Rank, &b.BridgeID, &b.Name, &b.Line, &b.ChainageKm, &b.TrussType, &b.SpanM, &b.Panels,
			&b.WorstMember, &b.RFExisting, &b.RFProposed, &inc, &b.Headroom, &b.Flags, &counts,
			&b.GoverningTrain, &b.GoverningSense, &b.GoverningHeadM, &b.GoverningDirection, &b.GoverningFromM,
			&b.GoverningToM, &b.LastInspected, &b.Status, &b.Error)
		if err != nil {
			return b, err
		}
		if inc != nil {
			b.DemandIncrease = *inc
		}
		if b.Status == "carried" {
			b.Status = "done"
		}
		if b.RFExisting != nil && b.RFProposed != nil && *b.RFExisting != 0 {
			c := *b.RFProposed / *b.RFExisting - 1
			b.Change = &c
		}
		if len(counts) > 0 {
			if err := json.Unmarshal(counts, &b.FlagCounts); err != nil {
				return b, err
			}
		}
		return b, nil
	})
}

// FlagTotals counts a run's members per flag, and its bridges with any flag.
func (db *DB) FlagTotals(ctx context.Context, runID int64) (members map[string]int, bridgesFlagged int, err error) {
	rows, err := db.Pool.Query(ctx, `SELECT f, count(*) FROM member_assessments, unnest(flags) AS f
		WHERE run_id = $1 GROUP BY f`, runID)
	if err != nil {
		return nil, 0, err
	}
	members = map[string]int{}
	for rows.Next() {
		var f string
		var n int
		if err := rows.Scan(&f, &n); err != nil {
			return nil, 0, err
		}
		members[f] = n
	}
	if err := rows.Err(); err != nil {
		return nil, 0, err
	}
	err = db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_bridges WHERE run_id = $1 AND cardinality(flags) > 0`,
		runID).Scan(&bridgesFlagged)
	return members, bridgesFlagged, err
}
