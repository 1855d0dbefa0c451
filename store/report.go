package store

import (
	"context"
	"encoding/json"
	"fmt"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// ReportRun loads what a report shows of a run: its settings, its trains and its totals.
func (db *DB) ReportRun(ctx context.Context, runID int64) (report.Run, error) {
	r, err := db.GetRun(ctx, runID)
	if err != nil {
		return report.Run{}, err
	}
	var plan screening.Plan
	if err := json.Unmarshal(r.Plan, &plan); err != nil {
		return report.Run{}, fmt.Errorf("run %d plan: %w", runID, err)
	}
	out := report.Run{
		ID: r.ID, Status: r.Status, StartedAt: r.StartedAt, ProgramVersion: r.ProgramVersion, ConfigHash: r.ConfigHash,
		Scenarios: map[string][]string{"existing": screening.TrainNames(plan.Existing), "proposed": screening.TrainNames(plan.Proposed)},
		Dynamic:   plan.Dynamic, Method: plan.Method, Flag: plan.Flag, Review: plan.Review, WorseFraction: plan.Worse,
		Trains: map[string]*traffic.Train{},
	}
	if r.FinishedAt != nil {
		out.FinishedAt = *r.FinishedAt
	}
	if set, err := plan.Settings(); err == nil {
		out.Factors = set.Method
	}
	for _, refs := range [][]screening.TrainRef{plan.Existing, plan.Proposed, plan.References} {
		for _, ref := range refs {
			t, err := ref.Train()
			if err != nil {
				return out, fmt.Errorf("run %d train %q: %w", runID, ref.Asked, err)
			}
			out.Trains[ref.Name] = t
			out.Trains[ref.Asked] = t
			out.Trains[t.Name] = t
		}
	}
	p, err := db.Progress(ctx, runID)
	if err != nil {
		return out, err
	}
	out.BridgesTotal, out.BridgesFailed = p.Total, p.Failed
	out.FlagCounts, out.BridgesFlagged, err = db.FlagTotals(ctx, runID)
	return out, err
}

// ReportBridge loads one bridge's page: its priority-list row, its geometry and loads as the
// inventory holds them now, and every member's stored results in the run. The trains of the
// extremes are looked up in run.Trains.
func (db *DB) ReportBridge(ctx context.Context, run report.Run, bridgeID string) (report.Bridge, error) {
	row, err := db.RankedBridge(ctx, run.ID, bridgeID)
	if err != nil {
		return report.Bridge{}, err
	}
	b, err := db.Bridge(ctx, bridgeID)
	if err != nil {
		return report.Bridge{}, err
	}
	inv, err := db.Members(ctx, bridgeID)
	if err != nil {
		return report.Bridge{}, err
	}
	out := report.Bridge{Row: row, TrussShare: b.TrussShare, Tracks: b.Tracks, DeadLoadKNPerM: b.DeadLoadKNPerM,
		Truss: truss.Params{Type: b.TrussType, SpanM: b.SpanM, Panels: b.Panels, DepthM: b.DepthM, Deck: b.Deck, EndPosts: b.EndPosts}}
	if row.Status == "failed" {
		return out, nil
	}
	held := map[string]Member{}
	for _, m := range inv {
		held[m.Member] = m
	}
	set, err := db.bridgeSet(ctx, run.ID, bridgeID)
	if err != nil {
		return out, err
	}
	members := map[string]*report.Member{}
	rows, err := db.Pool.Query(ctx, `SELECT member, rf_existing, rf_proposed, sense_proposed, flags
		FROM member_assessments WHERE set_id = $1`, set)
	if err != nil {
		return out, err
	}
	for rows.Next() {
		m := &report.Member{}
		if err := rows.Scan(&m.Label, &m.RFExisting, &m.RFProposed, &m.SenseProposed, &m.Flags); err != nil {
			rows.Close()
			return out, err
		}
		members[m.Label] = m
	}
	if err := rows.Err(); err != nil {
		return out, err
	}
	rows, err = db.Pool.Query(ctx, `SELECT member, scenario, kind, dead_kn, live_max_kn, live_min_kn, impact,
		rf_tension, rf_compression, basis, max_train, max_head_m, max_direction, max_from_m, max_to_m,
		min_train, min_head_m, min_direction, min_from_m, min_to_m, coalesce(max_count, 0), coalesce(min_count, 0)
		FROM member_results WHERE set_id = $1`, set)
	if err != nil {
		return out, err
	}
	err = forEach(rows, func(r pgx.Rows) error {
		var label, scenario string
		var s report.Scenario
		var kind string
		var dead float64
		var maxHead, maxFrom, maxTo, minHead, minFrom, minTo *float64
		var maxDir, minDir string
		if err := r.Scan(&label, &scenario, &kind, &dead, &s.LiveMaxKN, &s.LiveMinKN, &s.Impact, &s.RFTension,
			&s.RFCompression, &s.Basis, &s.Max.Train, &maxHead, &maxDir, &maxFrom, &maxTo,
			&s.Min.Train, &minHead, &minDir, &minFrom, &minTo, &s.Max.Count, &s.Min.Count); err != nil {
			return err
		}
		s.Max.Value, s.Min.Value = s.LiveMaxKN, s.LiveMinKN
		placement(&s.Max, maxHead, maxDir, maxFrom, maxTo)
		placement(&s.Min, minHead, minDir, minFrom, minTo)
		s.MaxTrain, s.MinTrain = run.Trains[s.Max.Train], run.Trains[s.Min.Train]
		m, ok := members[label]
		if !ok {
			m = &report.Member{Label: label}
			members[label] = m
		}
		m.Kind, m.DeadKN = kind, dead
		if scenario == "existing" {
			m.Existing = s
		} else {
			m.Proposed = s
		}
		return nil
	})
	if err != nil {
		return out, err
	}
	// Members in the geometry's order.
	t, err := truss.Build(out.Truss)
	if err != nil {
		return out, fmt.Errorf("bridge %s geometry: %w", bridgeID, err)
	}
	for _, label := range t.Labels() {
		m, ok := members[label]
		if !ok {
			return out, fmt.Errorf("bridge %s: run %d has no result for member %s (the geometry changed since the run?)", bridgeID, run.ID, label)
		}
		if h, ok := held[label]; ok {
			m.CapacityTensionKN, m.CapacityCompressionKN = h.CapacityTensionKN, h.CapacityCompressionKN
			m.ConditionFactor = h.ConditionFactor
			if h.RatingFactor != nil && h.ReferenceTrain != nil {
				m.StoredRF, m.ReferenceTrain = h.RatingFactor, *h.ReferenceTrain
			}
		} else {
			m.ConditionFactor = 1
		}
		out.Members = append(out.Members, *m)
	}
	return out, nil
}

func placement(e *envelope.Extreme, head *float64, dir string, from, to *float64) {
	if head == nil {
		return
	}
	e.Loaded, e.HeadM = true, *head
	if dir == envelope.RightToLeft.String() {
		e.Direction = envelope.RightToLeft
	}
	if from != nil {
		e.LoadedFromM = *from
	}
	if to != nil {
		e.LoadedToM = *to
	}
}

func forEach(rows pgx.Rows, f func(pgx.Rows) error) error {
	defer rows.Close()
	for rows.Next() {
		if err := f(rows); err != nil {
			return err
		}
	}
	return rows.Err()
}
