package runreport

import (
	"context"
	"encoding/json"
	"fmt"

	"github.com/jackc/pgx/v5/pgtype"
	"github.com/trussfleet/trussfleet/internal/bridgegeom"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// Run loads what a report shows of a run: its settings, its trains and its totals.
func Run(ctx context.Context, db *store.DB, runID int64) (report.Run, error) {
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
		ReversalFraction: plan.Reversal, FlagUnrated: plan.FlagUnrated,
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
	out.Fatigue = plan.Fatigue
	out.FloorLengths = plan.FloorLengths
	return out, err
}

// Bridge loads one bridge's page: its priority-list row, its geometry and loads as the
// inventory holds them now, and every member's stored results in the run. The trains of the
// extremes are looked up in run.Trains.
func Bridge(ctx context.Context, db *store.DB, run report.Run, bridgeID string) (report.Bridge, error) {
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
		Truss: bridgegeom.Params(b)}
	out.Section = section(b)
	if b.YearBuilt != nil {
		out.YearBuilt = *b.YearBuilt
	}
	if b.TrussType == truss.TableType {
		docs, err := db.TrussTables(ctx, []string{bridgeID})
		if err != nil {
			return report.Bridge{}, err
		}
		if doc, ok := docs[bridgeID]; ok {
			out.Table = bridgegeom.Table(doc)
		}
	}
	if row.Status == "failed" {
		return out, nil
	}
	// The rows held by member and truss ("": both); a member shows its governing truss's.
	held := map[[2]string]store.Member{}
	for _, m := range inv {
		held[[2]string{m.Member, m.Truss}] = m
	}
	members, err := storedMembers(ctx, db, run, bridgeID)
	if err != nil {
		return out, err
	}
	// Members in the geometry's order.
	t, _, err := screening.Geometry(out.Truss, out.Table)
	if err != nil {
		return out, fmt.Errorf("bridge %s geometry: %w", bridgeID, err)
	}
	for _, label := range t.Labels() {
		m, ok := members[label]
		if !ok {
			return out, fmt.Errorf("bridge %s: run %d has no result for member %s (the geometry changed since the run?)", bridgeID, run.ID, label)
		}
		h, ok := held[[2]string{label, m.Truss}]
		if !ok {
			h, ok = held[[2]string{label, ""}]
		}
		if ok {
			m.CapacityTensionKN, m.CapacityCompressionKN = h.CapacityTensionKN, h.CapacityCompressionKN
			m.ConditionFactor = h.ConditionFactor
			if h.RatingFactor != nil && h.ReferenceTrain != nil {
				m.StoredRF, m.ReferenceTrain = h.RatingFactor, *h.ReferenceTrain
				if h.RatingSense != nil {
					m.RatingSense = *h.RatingSense
				}
			}
		} else {
			m.ConditionFactor = 1
		}
		out.Members = append(out.Members, *m)
	}
	out.Members = append(out.Members, floorMembers(members, held, len(t.DeckJoints)-1, out.Tracks)...)
	out.FloorNotes = floorNotes(b, inv, t)
	out.Floor = floorSystem(b, inv, t)
	return out, nil
}

// storedMembers reads the result set of a bridge in the run, by member label: its
// assessments and both scenarios' envelopes.
func storedMembers(ctx context.Context, db *store.DB, run report.Run, bridgeID string) (map[string]*report.Member, error) {
	members := map[string]*report.Member{}
	set, err := db.BridgeSet(ctx, run.ID, bridgeID)
	if err != nil || set == nil {
		return members, err
	}
	assessments, err := db.MemberAssessments(ctx, *set)
	if err != nil {
		return nil, err
	}
	for _, a := range assessments {
		members[a.Member] = &report.Member{Label: a.Member, RFExisting: ptr(a.RFExisting), RFProposed: ptr(a.RFProposed),
			SenseProposed: a.SenseProposed, Flags: a.Flags, Fatigue: fatigueOf(a.Fatigue), Other: otherOf(a.Other)}
	}
	results, err := db.MemberResults(ctx, *set)
	if err != nil {
		return nil, err
	}
	for _, r := range results {
		s := report.Scenario{LiveMaxKN: r.LiveMaxKN, LiveMinKN: r.LiveMinKN, Impact: r.Impact,
			RFTension: ptr(r.RFTension), RFCompression: ptr(r.RFCompression), Basis: r.Basis}
		s.Max = extreme(r.LiveMaxKN, r.MaxTrain, r.MaxHeadM, r.MaxDirection, r.MaxFromM, r.MaxToM, r.MaxCount)
		s.Min = extreme(r.LiveMinKN, r.MinTrain, r.MinHeadM, r.MinDirection, r.MinFromM, r.MinToM, r.MinCount)
		s.MaxTrain, s.MinTrain = run.Trains[s.Max.Train], run.Trains[s.Min.Train]
		m, ok := members[r.Member]
		if !ok {
			m = &report.Member{Label: r.Member}
			members[r.Member] = m
		}
		m.Kind, m.DeadKN, m.Truss = r.Kind, r.DeadKN, r.Truss
		s.MaxCase, s.MinCase, s.Dynamic, s.MaxShare, s.MinShare = r.MaxCase, r.MinCase, r.Dynamic, r.MaxShare, r.MinShare
		if r.Scenario == "existing" {
			m.Existing = s
		} else {
			m.Proposed = s
		}
	}
	return members, nil
}

// extreme is a stored extreme: its value and train, and where the train stood when it has a
// head position (a train on the bridge).
func extreme(value float64, train string, head pgtype.Float8, dir string, from, to pgtype.Float8, count pgtype.Int4) envelope.Extreme {
	e := envelope.Extreme{Value: value, Train: train}
	e.Count = int(count.Int32)
	if !head.Valid {
		return e
	}
	e.Loaded, e.HeadM = true, head.Float64
	if dir == envelope.RightToLeft.String() {
		e.Direction = envelope.RightToLeft
	}
	e.LoadedFromM, e.LoadedToM = from.Float64, to.Float64
	return e
}

// fatigueOf is a member's stored fatigue outcome as the report holds it.
func fatigueOf(f store.FatigueColumns) report.Fatigue {
	out := report.Fatigue{Status: f.Status, CategoryMPa: ptr(f.CategoryMPa), AreaMM2: ptr(f.AreaMM2),
		DamageExisting: ptr(f.DamageExisting), DamageProposed: ptr(f.DamageProposed), Ratio: ptr(f.DamageRatio),
		ToDate: ptr(f.DamageToDate), RemainingYears: ptr(f.RemainingYears), RangeProposedMPa: ptr(f.RangeProposedMPa), Train: f.Train,
		SectionModulusMM3: ptr(f.SectionModulusMM3)}
	if f.EndYear.Valid {
		y := int(f.EndYear.Int32)
		out.EndYear = &y
	}
	return out
}

// ptr is a nullable number as the report holds it: nil for NULL.
func ptr(v pgtype.Float8) *float64 {
	if !v.Valid {
		return nil
	}
	return &v.Float64
}

// section is a stored bridge's cross-section for its page.
func section(b store.Bridge) report.Section {
	return report.Section{TrackOffsetsM: b.TrackOffsetsM, TrussWeightKNPerM: b.TrussWeightKNPerM, TrussSpacingM: store.OrZero(b.TrussSpacingM),
		LineSpeedKmh: store.OrZero(b.LineSpeedKmh), FirstFrequencyHz: store.OrZero(b.FirstFrequencyHz)}
}

// otherOf is a member's stored outcome on the truss that does not govern it; nil where one
// truss was screened.
func otherOf(o store.OtherTrussColumns) *report.OtherTruss {
	if o.Truss == "" {
		return nil
	}
	return &report.OtherTruss{Truss: o.Truss, RFExisting: ptr(o.RFExisting), RFProposed: ptr(o.RFProposed)}
}
