package store

import (
	"context"
	"encoding/json"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/internal/ranking"
)

// The priority list: a run's picture (run_bridges, run_picture of
// sql/migrations/009_result_sets.sql) joined with the inventory (bridges), and its flagged
// members (member_assessments, member_results).

// rankOrder is the priority order (ranking.Row documents it): the lower of the lowest
// proposed RF and the fatigue life index (shortest remaining fatigue life over the planning
// horizon, migration 016; NULL without a fatigue check, which least() passes over) first,
// then the largest demand increase; bridges with neither after those, failed bridges last.
const rankOrder = `(r.status = 'failed'), least(r.rf_proposed, r.fatigue_life_index) ASC NULLS LAST, r.demand_increase DESC NULLS LAST, r.bridge_id`

// Ranked returns a run's priority list (limit 0: all of it), joined with the inventory's
// current names and dates.
func (db *DB) Ranked(ctx context.Context, runID int64, limit int) ([]ranking.Row, error) {
	return db.ranked(ctx, runID, limit, "")
}

// RankedBridge is one bridge's row of a run's priority list.
func (db *DB) RankedBridge(ctx context.Context, runID int64, bridgeID string) (ranking.Row, error) {
	rows, err := db.ranked(ctx, runID, 0, bridgeID)
	if err != nil {
		return ranking.Row{}, err
	}
	if len(rows) == 0 {
		return ranking.Row{}, fmt.Errorf("bridge %q in run %d: %w", bridgeID, runID, ErrNotFound)
	}
	return rows[0], nil
}

func (db *DB) ranked(ctx context.Context, runID int64, limit int, only string) ([]ranking.Row, error) {
	q := `SELECT rank, bridge_id, name, line, chainage_km, truss_type, span_m, panels, worst_member, rf_existing, rf_proposed,
		demand_increase, headroom, flags, flag_counts, unrated, governing_train, governing_sense, governing_head_m,
		governing_direction, governing_from_m, governing_to_m, last_inspected, status, error, governing_case, no_rocking,
		categories, e_rating, e_member, latitude, longitude,
		fatigue_no_data, fatigue_life_years, fatigue_life_index, fatigue_member
		FROM (SELECT row_number() OVER (ORDER BY ` + rankOrder + `) AS rank, r.bridge_id, coalesce(b.name, '') AS name,
		coalesce(b.line, '') AS line, b.chainage_km, coalesce(b.truss_type, '') AS truss_type, coalesce(b.span_m, 0) AS span_m,
		coalesce(b.panels, 0) AS panels, coalesce(r.worst_member, '') AS worst_member,
		r.rf_existing, r.rf_proposed, r.demand_increase, r.headroom, r.flags, r.flag_counts,
		coalesce(r.unrated_members, 0) AS unrated, coalesce(r.governing_train, '') AS governing_train, coalesce(r.governing_sense, '') AS governing_sense, r.governing_head_m,
		coalesce(r.governing_direction, '') AS governing_direction, r.governing_from_m, r.governing_to_m,
		coalesce(to_char(b.last_inspected, 'YYYY-MM-DD'), '') AS last_inspected, r.status, r.error,
		coalesce(r.governing_case, '') AS governing_case, coalesce(r.no_rocking, false) AS no_rocking,
		r.categories, r.e_rating, coalesce(r.e_member, '') AS e_member, b.latitude, b.longitude,
		r.fatigue_no_data, r.fatigue_life_years, r.fatigue_life_index, coalesce(r.fatigue_member, '') AS fatigue_member
		FROM run_picture($1) r LEFT JOIN bridges b ON b.bridge_id = r.bridge_id
		WHERE r.status <> 'pending') AS ranked
		WHERE $2 = '' OR bridge_id = $2
		ORDER BY rank`
	args := []any{runID, only}
	if limit > 0 {
		q += " LIMIT $3"
		args = append(args, limit)
	}
	rows, err := db.Pool.Query(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("ranking run %d: %w", runID, err)
	}
	return pgx.CollectRows(rows, func(row pgx.CollectableRow) (ranking.Row, error) {
		var b ranking.Row
		var inc *float64
		var counts []byte
		err := row.Scan(&b.Rank, &b.BridgeID, &b.Name, &b.Line, &b.ChainageKm, &b.TrussType, &b.SpanM, &b.Panels,
			&b.WorstMember, &b.RFExisting, &b.RFProposed, &inc, &b.Headroom, &b.Flags, &counts,
			&b.Unrated, &b.GoverningTrain, &b.GoverningSense, &b.GoverningHeadM, &b.GoverningDirection, &b.GoverningFromM,
			&b.GoverningToM, &b.LastInspected, &b.Status, &b.Error, &b.GoverningCase, &b.NoRocking,
			&b.Categories, &b.ERating, &b.EMember, &b.Latitude, &b.Longitude,
			&b.Fatigue.NoData, &b.Fatigue.LifeYears, &b.Fatigue.LifeIndex, &b.Fatigue.Member)
		if err != nil {
			return b, err
		}
		b.Fatigue.Governs = b.Fatigue.LifeIndex != nil && (b.RFProposed == nil || *b.Fatigue.LifeIndex < *b.RFProposed)
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
	// Each bridge's summary counts its members by flag: summing those reads one row a bridge
	// instead of one a member.
	// One reading of the run's picture for both: a row per flag, and one with no flag (f
	// NULL) for the bridges flagged.
	rows, err := db.Pool.Query(ctx, `WITH p AS MATERIALIZED (SELECT flags, flag_counts FROM run_picture($1))
		SELECT f, sum(n::int)::bigint FROM p, jsonb_each_text(p.flag_counts) AS c(f, n) GROUP BY f
		UNION ALL
		SELECT NULL, count(*) FROM p WHERE cardinality(p.flags) > 0`, runID)
	if err != nil {
		return nil, 0, err
	}
	members = map[string]int{}
	var f *string
	var n int
	_, err = pgx.ForEachRow(rows, []any{&f, &n}, func() error {
		if f == nil {
			bridgesFlagged = n
		} else {
			members[*f] = n
		}
		return nil
	})
	return members, bridgesFlagged, err
}

// UnratedTotals counts a run's unrated members (run_bridges.unrated_members, migration 011)
// and the bridges that hold any.
func (db *DB) UnratedTotals(ctx context.Context, runID int64) (members, bridges int, err error) {
	err = db.Pool.QueryRow(ctx, `SELECT coalesce(sum(unrated_members), 0)::bigint, count(*) FILTER (WHERE unrated_members > 0)
		FROM run_picture($1)`, runID).Scan(&members, &bridges)
	return members, bridges, err
}

// FlaggedMember is one member of the member-level priority list.
type FlaggedMember struct {
	BridgeRank     int
	BridgeID       string
	Name           string
	Member         string
	Kind           string
	RFExisting     *float64
	RFProposed     *float64
	Sense          string
	DemandIncrease float64
	Flags          []string
	DeadKN         float64
	LiveMaxKN      float64
	LiveMinKN      float64
	Impact         float64
	Train          string // the proposed train governing the member's rated sense
	HeadM          *float64
	Direction      string
	FromM, ToM     *float64

	// Truss is the main truss governing the member, Case the loading case of its rated sense,
	// Dynamic its dynamic allowance in words (migration 012).
	Truss, Case, Dynamic string
	// Fatigue is the member's fatigue outcome (Status "" where the run checked no fatigue).
	Fatigue FatigueColumns
}

// FlaggedMembers lists a run's members that carry any flag, in the bridges' priority order
// and, within a bridge, by proposed RF.
func (db *DB) FlaggedMembers(ctx context.Context, runID int64) ([]FlaggedMember, error) {
	fatigueNames, _ := fatigueColumns("a", &MemberAssessment{})
	rows, err := db.Pool.Query(ctx, `WITH ranked AS (
			SELECT r.bridge_id, r.set_id, row_number() OVER (ORDER BY `+rankOrder+`) AS rank FROM run_picture($1) r
			WHERE r.status <> 'pending')
		SELECT k.rank, k.bridge_id, coalesce(b.name, ''), a.member, p.kind, a.rf_existing, a.rf_proposed,
			a.sense_proposed, a.demand_increase, a.flags, p.dead_kn, p.live_max_kn, p.live_min_kn, p.impact,
			CASE WHEN a.sense_proposed = 'compression' THEN p.min_train ELSE p.max_train END,
			CASE WHEN a.sense_proposed = 'compression' THEN p.min_head_m ELSE p.max_head_m END,
			CASE WHEN a.sense_proposed = 'compression' THEN p.min_direction ELSE p.max_direction END,
			CASE WHEN a.sense_proposed = 'compression' THEN p.min_from_m ELSE p.max_from_m END,
			CASE WHEN a.sense_proposed = 'compression' THEN p.min_to_m ELSE p.max_to_m END,
			p.truss, CASE WHEN a.sense_proposed = 'compression' THEN p.min_case ELSE p.max_case END, p.dynamic,
			`+strings.Join(fatigueNames, ", ")+`
		FROM ranked k
		JOIN member_assessments a ON a.set_id = k.set_id
		JOIN member_results p ON p.set_id = a.set_id AND p.member = a.member AND p.scenario = 'proposed'
		LEFT JOIN bridges b ON b.bridge_id = k.bridge_id
		WHERE cardinality(a.flags) > 0
		ORDER BY k.rank, a.rf_proposed ASC NULLS LAST, a.member`, runID)
	if err != nil {
		return nil, fmt.Errorf("flagged members of run %d: %w", runID, err)
	}
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (FlaggedMember, error) {
		var m FlaggedMember
		var a MemberAssessment
		_, fatigue := fatigueColumns("a", &a)
		err := r.Scan(append([]any{&m.BridgeRank, &m.BridgeID, &m.Name, &m.Member, &m.Kind, &m.RFExisting, &m.RFProposed,
			&m.Sense, &m.DemandIncrease, &m.Flags, &m.DeadKN, &m.LiveMaxKN, &m.LiveMinKN, &m.Impact, &m.Train,
			&m.HeadM, &m.Direction, &m.FromM, &m.ToM, &m.Truss, &m.Case, &m.Dynamic}, fatigue...)...)
		m.Fatigue = a.Fatigue
		return m, err
	})
}

// NoRockingTotal counts a run's bridges screened without AREMA's rocking term for want of the
// truss spacing (run_bridges.no_rocking, migration 012).
func (db *DB) NoRockingTotal(ctx context.Context, runID int64) (n int, err error) {
	err = db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_picture($1) WHERE no_rocking`, runID).Scan(&n)
	if err != nil {
		return 0, fmt.Errorf("bridges without a rocking term in run %d: %w", runID, err)
	}
	return n, nil
}

// FailedBridge is a bridge a run could not screen, with the reason.
type FailedBridge struct {
	BridgeID, Name, Error string
}

// FailedBridges lists up to limit bridges a run could not screen, and how many there are.
func (db *DB) FailedBridges(ctx context.Context, runID int64, limit int) ([]FailedBridge, int, error) {
	// The count of all of them beside each of the first limit (a window is counted before
	// the LIMIT): one reading of the run's picture.
	rows, err := db.Pool.Query(ctx, `SELECT r.bridge_id, coalesce(b.name, ''), r.error, count(*) OVER ()
		FROM run_picture($1) r LEFT JOIN bridges b ON b.bridge_id = r.bridge_id
		WHERE r.status = 'failed' ORDER BY r.bridge_id LIMIT $2`, runID, max(limit, 1))
	if err != nil {
		return nil, 0, err
	}
	var n int
	fs, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (FailedBridge, error) {
		var f FailedBridge
		return f, r.Scan(&f.BridgeID, &f.Name, &f.Error, &n)
	})
	if limit < 1 {
		fs = nil
	}
	return fs, n, err
}
