package main

import (
	"context"
	"fmt"
	"time"

	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
)

// buildPlan resolves the configured scenarios and every reference train of the inventory's
// stored rating factors into a run plan.
func buildPlan(ctx context.Context, db *store.DB, c Config) (screening.Plan, error) {
	s := c.Screen
	p := screening.Plan{
		Dynamic: s.Dynamic, Method: s.Rating.Method, Phi: s.Rating.Phi, GammaD: s.Rating.GammaD,
		GammaL: s.Rating.GammaL, GammaDFav: s.Rating.GammaDFavourable,
		Flag: s.Thresholds.Flag, Review: s.Thresholds.Review, Worse: s.Thresholds.WorseFraction,
		Reversal: s.Thresholds.ReversalFraction, FlagUnrated: s.Thresholds.FlagUnrated,
		Presence:          s.MultiplePresence,
		Lengths:           s.DynamicLengths,
		ExistingSpeeds:    s.Scenarios[scenarioExisting].SpeedsKmh,
		ProposedSpeeds:    s.Scenarios[scenarioProposed].SpeedsKmh,
		ExistingLineSpeed: s.Scenarios[scenarioExisting].AtLineSpeed,
		ProposedLineSpeed: s.Scenarios[scenarioProposed].AtLineSpeed,
		ExistingTracks:    s.Scenarios[scenarioExisting].Tracks,
		ProposedTracks:    s.Scenarios[scenarioProposed].Tracks,
		Network:           s.Network,
	}
	p.FloorLengths = s.Floor.planLengths()
	if _, err := traffic.ParseDynamic(s.Dynamic); err != nil {
		return p, fmt.Errorf("configuration key dynamic: %w", err)
	}
	resolve := func(key string, names []string) ([]screening.TrainRef, error) {
		var out []screening.TrainRef
		for _, n := range names {
			r, err := fleetrun.ResolveTrain(ctx, db, n)
			if err != nil {
				return nil, fmt.Errorf("configuration key %s: %w", key, err)
			}
			out = append(out, r)
		}
		return out, nil
	}
	var err error
	if p.Existing, err = resolve("scenarios.existing.trains", s.Scenarios[scenarioExisting].Trains); err != nil {
		return p, err
	}
	if p.Proposed, err = resolve("scenarios.proposed.trains", s.Scenarios[scenarioProposed].Trains); err != nil {
		return p, err
	}
	refs, err := db.ReferenceTrains(ctx)
	if err != nil {
		return p, err
	}
	for _, n := range refs {
		r, err := fleetrun.ResolveTrain(ctx, db, n)
		if err != nil {
			// A bridge whose stored rating names an unknown train fails alone, with that reason.
			continue
		}
		p.References = append(p.References, r)
	}
	screening.SortRefs(p.References)
	if p.Fatigue, err = fatiguePlan(ctx, db, s, time.Now()); err != nil {
		return p, err
	}
	if _, err := p.Settings(); err != nil {
		return p, err
	}
	return p, nil
}
