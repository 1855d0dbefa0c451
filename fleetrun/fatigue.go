package fleetrun

import (
	"math"

	"github.com/jackc/pgx/v5/pgtype"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/store"
)

// fatigueFlags are the fatigue flags in report order, after the rating's.
var fatigueFlags = []fatigue.Flag{fatigue.FlagLife, fatigue.FlagRise}

// appendFatigueFlags adds a member's fatigue flags to its flags.
func appendFatigueFlags(flags []string, r *fatigue.Result) []string {
	if r == nil {
		return flags
	}
	for _, f := range r.Flags {
		flags = append(flags, string(f))
	}
	return flags
}

// fatigueColumns is a member's fatigue outcome as member_assessments stores it: nothing (status
// "") where the run checked no fatigue, the status alone for a member without data.
func fatigueColumns(r *fatigue.Result) store.FatigueColumns {
	if r == nil {
		return store.FatigueColumns{}
	}
	c := store.FatigueColumns{Status: string(r.Status)}
	if r.Status == fatigue.NoData {
		return c
	}
	c.CategoryMPa, c.AreaMM2 = finite(r.CategoryMPa), finite(r.AreaMM2)
	if r.SectionModulusMM3 > 0 { // a floor element: its section modulus, no area
		c.AreaMM2, c.SectionModulusMM3 = pgtype.Float8{}, finite(r.SectionModulusMM3)
	}
	c.DamageExisting, c.DamageProposed = finite(r.PerYearExisting), finite(r.PerYearProposed)
	c.DamageRatio, c.DamageToDate = finite(r.Ratio), finite(r.ToDate)
	c.RemainingYears = finite(r.RemainingYears)
	if r.EndYear != 0 {
		c.EndYear = pgtype.Int4{Int32: int32(r.EndYear), Valid: true}
	}
	c.RangeExistingMPa, c.RangeProposedMPa = finite(r.MaxRangeExistingMPa), finite(r.MaxRangeProposedMPa)
	c.Train = r.Governing
	return c
}

// fatigueOutcome adds a bridge's fatigue summary and flags to its run_bridges outcome.
func fatigueOutcome(o *store.BridgeOutcome, r screening.Result) {
	f := r.Fatigue
	if f.FlagCounts == nil { // the run checked no fatigue
		return
	}
	n := int32(f.NoData)
	o.FatigueNoData = &n
	if f.Shortest >= 0 && !math.IsInf(f.ShortestYears, 0) {
		o.FatigueLifeYears, o.FatigueMember = num(f.ShortestYears), r.Members[f.Shortest].Label
		o.FatigueLifeIndex = num(f.ShortestIndex)
	}
	for _, fl := range fatigueFlags {
		if k := f.FlagCounts[fl]; k > 0 {
			o.Flags = append(o.Flags, string(fl))
			o.FlagCounts[string(fl)] = k
		}
	}
}
