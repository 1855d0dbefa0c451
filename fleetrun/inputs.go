package fleetrun

import (
	"context"

	"github.com/trussfleet/trussfleet/internal/bridgegeom"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/store"
)

// chunkInputs loads the bridges of a job that are still pending in the run, with their
// members, as screening inputs, and each bridge's input hash (InputHash with planHash, the
// run's; none for a run without one) of the version read with the rows: the hash names
// exactly what is screened.
func chunkInputs(ctx context.Context, db *store.DB, runID int64, planHash string, ids []string) ([]screening.Bridge, map[string]string, error) {
	bridges, members, err := db.PendingBridgesOf(ctx, runID, ids)
	if err != nil {
		return nil, nil, err
	}
	byBridge := make(map[string][]store.Member, len(bridges))
	for _, m := range members {
		byBridge[m.BridgeID] = append(byBridge[m.BridgeID], m)
	}
	out := make([]screening.Bridge, len(bridges))
	hashes := make(map[string]string, len(bridges))
	for i, b := range bridges {
		ms := byBridge[b.BridgeID]
		out[i] = ScreeningInput(b, ms)
		if planHash != "" {
			hashes[b.BridgeID] = InputHash(planHash, b.InputVersion)
		}
	}
	if err := attachTables(ctx, db, out); err != nil {
		return nil, nil, err
	}
	return out, hashes, nil
}

// ScreeningInput turns an inventory row and its members into what screening needs.
func ScreeningInput(b store.Bridge, members []store.Member) screening.Bridge {
	sb := screening.Bridge{
		ID:                b.BridgeID,
		Truss:             bridgegeom.Params(b),
		TrussShare:        b.TrussShare,
		Tracks:            b.Tracks,
		DeadLoadKNPerM:    b.DeadLoadKNPerM,
		TrackOffsetsM:     b.TrackOffsetsM,
		TrussWeightKNPerM: b.TrussWeightKNPerM,
		Members:           make(map[string]rating.Member, len(members)),
	}
	sb.TrussSpacingM, sb.LineSpeedKmh, sb.FirstFrequencyHz = store.OrZero(b.TrussSpacingM), store.OrZero(b.LineSpeedKmh), store.OrZero(b.FirstFrequencyHz)
	floorInput(b, &sb)
	if b.YearBuilt != nil {
		sb.YearBuilt = *b.YearBuilt
	}
	for _, m := range members {
		if floorMember(m, &sb) {
			continue
		}
		if m.Truss != "" {
			if sb.TrussMembers == nil {
				sb.TrussMembers = map[string]map[string]rating.Member{}
			}
			if sb.TrussMembers[m.Truss] == nil {
				sb.TrussMembers[m.Truss] = map[string]rating.Member{}
			}
			sb.TrussMembers[m.Truss][m.Member] = RatingMember(m)
			continue
		}
		sb.Members[m.Member] = RatingMember(m)
	}
	return sb
}

// RatingMember turns a members row into the rating package's view of it.
func RatingMember(m store.Member) rating.Member {
	r := rating.Member{ConditionFactor: m.ConditionFactor, FatigueCategory: m.FatigueCategory}
	if m.AreaMM2 != nil {
		r.AreaMM2 = *m.AreaMM2
	}
	if m.CapacityTensionKN != nil {
		r.CapacityTension = *m.CapacityTensionKN
	}
	if m.CapacityCompressionKN != nil {
		r.CapacityCompression = *m.CapacityCompressionKN
	}
	if m.RatingFactor != nil && m.ReferenceTrain != nil {
		r.RatingFactor, r.ReferenceTrain = *m.RatingFactor, *m.ReferenceTrain
		if m.RatingSense != nil {
			// The importer and the table's CHECK admit only the two senses.
			if s, err := rating.ParseSense(*m.RatingSense); err == nil {
				r.RatingSense, r.RatingSenseGiven = s, true
			}
		}
	}
	return r
}
