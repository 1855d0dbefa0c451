package main

import (
	"strconv"

	"github.com/jackc/pgx/v5/pgtype"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/store"
)

// rankBasis says what sets a bridge's place in the priority list: "fatigue" where its fatigue
// life index is below its lowest proposed RF (internal/ranking), "strength" otherwise, ""
// for a bridge with neither.
func rankBasis(r report.BridgeRow) string {
	switch {
	case r.Fatigue.Governs:
		return "fatigue"
	case r.RFProposed != nil:
		return "strength"
	}
	return ""
}

// fatigueRecord is a member's fatigue columns of the member export: damages (Miner sums a
// year) to 4 significant digits for people, years to one decimal, stresses in MPa.
func fatigueRecord(f store.FatigueColumns, d digits) []string {
	opt := func(v pgtype.Float8, people int) string {
		if !v.Valid {
			return ""
		}
		return d.num(v.Float64, people)
	}
	sig := func(v pgtype.Float8) string {
		if !v.Valid {
			return ""
		}
		if d.programs {
			return d.num(v.Float64, 0)
		}
		return strconv.FormatFloat(v.Float64, 'g', 4, 64)
	}
	end := ""
	if f.EndYear.Valid {
		end = strconv.Itoa(int(f.EndYear.Int32))
	}
	return []string{f.Status, sig(f.DamageExisting), sig(f.DamageProposed), opt(f.DamageRatio, 2), sig(f.DamageToDate),
		opt(f.RemainingYears, 1), end, opt(f.RangeProposedMPa, 1)}
}
