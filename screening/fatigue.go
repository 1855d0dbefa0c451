package screening

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/fatigue"
)

// FatiguePlan is the part of a run's plan that sets the fatigue check (configs/default.yaml,
// "fatigue", documents each setting): stored and hashed with the plan.
type FatiguePlan struct {
	GammaMf            float64 `json:"gamma_mf"`
	RivetedCategoryMPa float64 `json:"riveted_category_mpa"`
	// DynamicFactor applies to a train of unknown speed.
	DynamicFactor    float64 `json:"dynamic_factor"`
	Year             int     `json:"year"`
	DefaultYearBuilt int     `json:"default_year_built"`
	// History: past traffic periods, each a multiple of today's existing traffic.
	History      []fatigue.Period `json:"history,omitempty"`
	HorizonYears float64          `json:"horizon_years"`
	RiseFactor   float64          `json:"rise_factor"`
	// Existing and Proposed are the scenarios' real trains and their yearly passages.
	Existing []FatigueTraffic `json:"existing"`
	Proposed []FatigueTraffic `json:"proposed"`
}

// FatigueTraffic is one train's yearly passages in a scenario.
type FatigueTraffic struct {
	Train   TrainRef `json:"train"`
	PerYear float64  `json:"per_year"`
	// SpeedKmh is the train's speed (0: not known, the plan's DynamicFactor applies).
	SpeedKmh float64 `json:"speed_kmh,omitempty"`
	// Directions: "both" (or ""), half the passages each way; "left-to-right" or
	// "right-to-left", every passage that way.
	Directions string `json:"directions,omitempty"`
	// Track (1-based) the train runs on; 0: the worst track for each member.
	Track int `json:"track,omitempty"`
}

// FatigueSettings are the fatigue settings with every train prepared for passages.
type FatigueSettings struct {
	fatigue.Settings
	Existing, Proposed []fatigue.Traffic
}

// fatigueSettings prepares the plan's fatigue settings; nil where the plan has none.
func (p Plan) fatigueSettings() (*FatigueSettings, error) {
	return p.Fatigue.Settings()
}

// Settings checks the fatigue plan and prepares its trains; nil for a nil plan.
func (fp *FatiguePlan) Settings() (*FatigueSettings, error) {
	if fp == nil {
		return nil, nil
	}
	f := &FatigueSettings{Settings: fatigue.Settings{GammaMf: fp.GammaMf, RivetedCategoryMPa: fp.RivetedCategoryMPa,
		DynamicFactor: fp.DynamicFactor, Year: fp.Year, DefaultYearBuilt: fp.DefaultYearBuilt, History: fp.History,
		HorizonYears: fp.HorizonYears, RiseFactor: fp.RiseFactor}}
	if err := f.Validate(); err != nil {
		return nil, err
	}
	var err error
	// A train in both scenarios is one prepared train, so that a member counts its passages
	// once (fatigue.Calculator keeps them by train).
	prepared := map[TrainRef]*fatigue.Train{}
	if f.Existing, err = fatigueTraffic("existing", fp.Existing, prepared); err != nil {
		return nil, err
	}
	if f.Proposed, err = fatigueTraffic("proposed", fp.Proposed, prepared); err != nil {
		return nil, err
	}
	return f, nil
}

func fatigueTraffic(scenario string, ts []FatigueTraffic, prepared map[TrainRef]*fatigue.Train) ([]fatigue.Traffic, error) {
	if len(ts) == 0 {
		return nil, fmt.Errorf("fatigue traffic of scenario %s: no trains (give each real train's passages a year)", scenario)
	}
	out := make([]fatigue.Traffic, len(ts))
	for i, t := range ts {
		where := fmt.Sprintf("fatigue traffic of scenario %s, train %q", scenario, t.Train.Asked)
		ft, ok := prepared[t.Train]
		if !ok {
			tr, err := t.Train.Train()
			if err != nil {
				return nil, fmt.Errorf("%s: %w", where, err)
			}
			if ft, err = fatigue.PrepareTrain(tr); err != nil {
				return nil, fmt.Errorf("%s: %w", where, err)
			}
			prepared[t.Train] = ft
		}
		if !(t.PerYear >= 0) || math.IsInf(t.PerYear, 0) {
			return nil, fmt.Errorf("%s: passages a year must be 0 or more, got %v", where, t.PerYear)
		}
		if !(t.SpeedKmh >= 0 && t.SpeedKmh <= 500) {
			return nil, fmt.Errorf("%s: speed must be from 0 (not known) to 500 km/h, got %v", where, t.SpeedKmh)
		}
		if t.Track < 0 || t.Track > maxTracks {
			return nil, fmt.Errorf("%s: track must be from 1 to %d (0: the worst), got %d", where, maxTracks, t.Track)
		}
		out[i] = fatigue.Traffic{Train: ft, PerYear: t.PerYear, SpeedMPerS: t.SpeedKmh / 3.6, Track: t.Track}
		switch t.Directions {
		case "", "both":
		case "left-to-right":
			out[i].Directions = []fatigue.Direction{envelope.LeftToRight}
		case "right-to-left":
			out[i].Directions = []fatigue.Direction{envelope.RightToLeft}
		default:
			return nil, fmt.Errorf("%s: directions %q: allowed both, left-to-right, right-to-left", where, t.Directions)
		}
	}
	return out, nil
}

// maxTracks bounds a train's track number: no truss bridge carries more.
const maxTracks = 8

// FatigueSummary counts a bridge's fatigue outcomes.
type FatigueSummary struct {
	// Checked members had an area and a category; NoData members lacked one (not flagged);
	// BelowCutOff members were checked and no range reached the cut-off.
	Checked, NoData, BelowCutOff int
	FlagCounts                   map[fatigue.Flag]int
	// Shortest is the index of the member with the shortest remaining life (-1: none with a
	// finite one), ShortestYears that life and ShortestIndex that life over the planning
	// horizon (+Inf without a horizon): below 1 the member is flagged fatigue-life. The
	// priority list compares it with the lowest proposed RF (store/rank.go).
	Shortest      int
	ShortestYears float64
	ShortestIndex float64
}

// checkFatigue runs the fatigue check of every member with an area and a category (where the
// run checks fatigue) and counts the outcomes in res.Fatigue.
func (w *Screener) checkFatigue(b Bridge, s *Settings, spanM float64, lines *analysis.Lines, res *Result) error {
	f := s.Fatigue
	if f == nil {
		return nil
	}
	w.fcalc.Forget() // a new bridge: no line of the last is seen again
	sum := FatigueSummary{FlagCounts: map[fatigue.Flag]int{}, Shortest: -1, ShortestYears: math.Inf(1)}
	results := make([]fatigue.Result, len(lines.Members))
	// The lines built so far: a member whose line is another's, or its mirror image (a
	// symmetric truss), takes that line, so that the passages counted over one serve both.
	var built []*fatigue.Line
	for i, l := range lines.Members {
		// The truss that governs the member's strength (A where both carry alike), with its
		// shares of each track's load (lever rule; section.go).
		tr := res.Members[i].Truss
		if tr == "" {
			tr = TrussA
		}
		inv := b.memberOf(tr, l.Label)
		fb := fatigue.Bridge{SpanM: spanM, YearBuilt: b.YearBuilt, Shares: b.TrackShares(tr)}
		r := &results[i]
		*r = fatigue.Result{Status: fatigue.NoData}
		res.Members[i].Fatigue = r
		// A category that is no EN 1993-1-9 detail category (an owner's own, or another
		// code's letter) is kept in the inventory as written and not checked, as a member
		// without one: the check has no S-N curve for it.
		cat, has, err := fatigue.ParseCategory(inv.FatigueCategory, f.RivetedCategoryMPa)
		if err != nil || !has || !(inv.AreaMM2 > 0) || math.IsInf(inv.AreaMM2, 0) {
			sum.NoData++
			continue
		}
		curve, err := fatigue.NewCurve(cat, f.GammaMf)
		if err != nil {
			return fmt.Errorf("member %s: %w", l.Label, err)
		}
		line, err := fatigue.NewLine(lines.X, l.Ordinates)
		if err != nil {
			return fmt.Errorf("member %s: %w", l.Label, err)
		}
		matched := false
		for _, o := range built {
			if same, mirror := o.Matches(line); same {
				line, matched = o, true
				break
			} else if mirror {
				line, matched = o.Mirror(), true
				break
			}
		}
		// A line that is a multiple of another's counts that line's passages
		// (fatigue.Line.CountedAs): exact to rounding.
		for k := 0; k < len(built) && !matched; k++ {
			if p, ok := line.CountedAs(built[k]); ok {
				line, matched = p, true
			}
		}
		built = append(built, line)
		if *r, err = w.fcalc.Check(fatigue.Member{Line: line, AreaMM2: inv.AreaMM2, Curve: curve}, fb, &f.Settings, f.Existing, f.Proposed, nil); err != nil {
			return fmt.Errorf("member %s, fatigue: %w", l.Label, err)
		}
		sum.Checked++
		if r.Status == fatigue.BelowCutOff {
			sum.BelowCutOff++
		}
		for _, fl := range r.Flags {
			sum.FlagCounts[fl]++
		}
		if r.RemainingYears < sum.ShortestYears {
			sum.Shortest, sum.ShortestYears = i, r.RemainingYears
		}
	}
	sum.ShortestIndex = math.Inf(1)
	if f.HorizonYears > 0 && sum.Shortest >= 0 {
		sum.ShortestIndex = sum.ShortestYears / f.HorizonYears
	}
	res.Fatigue = sum
	return nil
}
