package fatigue

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Traffic is one train's yearly passages in a scenario.
type Traffic struct {
	Train *Train
	// PerYear is the number of passages a year, over both directions.
	PerYear float64
	// SpeedMPerS is the train's speed (m/s) for the fatigue dynamic factor; 0: not known, and
	// Settings.DynamicFactor applies.
	SpeedMPerS float64
	// Directions the train runs in; a train running both ways makes half its passages in
	// each.
	Directions []Direction
	// Track is the track (1-based) the train runs on; 0: not assigned, and its passages count
	// on the track that gives each member the largest damage (conservative: at most one track
	// per train is counted, the worst for that member).
	Track int
}

// Period is a stretch of past traffic: from FromYear on (until the next period's FromYear),
// the yearly damage was Factor times that of today's existing traffic.
type Period struct {
	FromYear int
	Factor   float64
}

// Settings are the run-wide fatigue settings.
type Settings struct {
	// GammaMf is the partial factor on fatigue strength (Curve).
	GammaMf float64
	// RivetedCategoryMPa is the detail category of a member whose inventory category says
	// only "riveted" (category 71 is common practice for old riveted details).
	RivetedCategoryMPa float64
	// DynamicFactor applies to a train whose speed is not known (1 + its increment).
	DynamicFactor float64
	// Year is the year damage to date is counted to, and remaining life from.
	Year int
	// DefaultYearBuilt stands for a bridge whose year built is not known (an assumption).
	DefaultYearBuilt int
	// History holds the past traffic periods in ascending years; before the first, the first
	// period's factor applies back to the year built. Empty: today's existing traffic ran
	// every year since the year built (an assumption, as any history without records is).
	History []Period
	// HorizonYears: a remaining life shorter than this flags the member (FlagLife).
	HorizonYears float64
	// RiseFactor: a yearly damage under the proposed traffic more than this multiple of the
	// existing one flags the member (FlagRise).
	RiseFactor float64
}

// Validate checks the settings and names the one at fault.
func (s *Settings) Validate() error {
	switch {
	case !(s.GammaMf >= 1 && s.GammaMf <= 2):
		return fmt.Errorf("fatigue.gamma_mf: must be from 1 to 2, got %v", s.GammaMf)
	case !(s.RivetedCategoryMPa > 0 && s.RivetedCategoryMPa <= 200):
		return fmt.Errorf("fatigue.riveted_category: must be a stress range from 0 to 200 MPa, got %v", s.RivetedCategoryMPa)
	case !(s.DynamicFactor >= 1 && s.DynamicFactor <= 3):
		return fmt.Errorf("fatigue.dynamic_factor: must be from 1 to 3, got %v", s.DynamicFactor)
	case s.Year < 1800 || s.Year > 2300:
		return fmt.Errorf("fatigue.year: must be from 1800 to 2300, got %d", s.Year)
	case s.DefaultYearBuilt < 1800 || s.DefaultYearBuilt > s.Year:
		return fmt.Errorf("fatigue.default_year_built: must be from 1800 to the year (%d), got %d", s.Year, s.DefaultYearBuilt)
	case !(s.HorizonYears >= 0) || math.IsInf(s.HorizonYears, 0):
		return fmt.Errorf("fatigue.horizon_years: must be 0 or more, got %v", s.HorizonYears)
	case !(s.RiseFactor >= 1) || math.IsInf(s.RiseFactor, 0):
		return fmt.Errorf("fatigue.rise_factor: must be 1 or more, got %v", s.RiseFactor)
	}
	for k, p := range s.History {
		if !(p.Factor >= 0) || math.IsInf(p.Factor, 0) {
			return fmt.Errorf("fatigue.history[%d].factor: must be 0 or more, got %v", k, p.Factor)
		}
		if k > 0 && p.FromYear <= s.History[k-1].FromYear {
			return fmt.Errorf("fatigue.history[%d].from %d: periods must ascend (after %d)", k, p.FromYear, s.History[k-1].FromYear)
		}
	}
	return nil
}

// PastYears is the number of years of today's existing traffic that the history since
// yearBuilt (0: not known, DefaultYearBuilt) amounts to, up to Year: the sum over the years
// of each one's period factor. Damage to date is it times the existing yearly damage.
func (s *Settings) PastYears(yearBuilt int) float64 {
	from := yearBuilt
	if from == 0 {
		from = s.DefaultYearBuilt
	}
	if from >= s.Year {
		return 0
	}
	if len(s.History) == 0 {
		return float64(s.Year - from)
	}
	total := 0.0
	for k, p := range s.History {
		lo := from
		if k > 0 {
			lo = max(from, p.FromYear)
		}
		hi := s.Year
		if k+1 < len(s.History) {
			hi = min(hi, s.History[k+1].FromYear)
		}
		if hi > lo {
			total += float64(hi-lo) * p.Factor
		}
	}
	return total
}

// ParseCategory reads an inventory's fatigue category: a number (the detail category, MPa,
// such as 71) or "riveted" (Settings.RivetedCategoryMPa); ok is false for an empty one (no
// fatigue data).
func ParseCategory(s string, rivetedMPa float64) (mpa float64, ok bool, err error) {
	s = strings.TrimSpace(s)
	switch {
	case s == "":
		return 0, false, nil
	case strings.EqualFold(s, "riveted"):
		return rivetedMPa, true, nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || !(v > 0 && v <= 200) {
		return 0, false, fmt.Errorf("fatigue category %q: want a detail category in MPa from 0 to 200 (such as 71) or riveted", s)
	}
	return v, true, nil
}

// Status says what the fatigue check found for a member.
type Status string

// The statuses of a member.
const (
	// NoData: the member has no area or no category; it is not checked (and not flagged).
	NoData Status = "no-data"
	// BelowCutOff: every stress range of every passage is below the cut-off: no damage.
	BelowCutOff Status = "below-cut-off"
	// Damaged: some range does damage.
	Damaged Status = "damaged"
)

// Flag marks a member for fatigue.
type Flag string

// The fatigue flags.
const (
	// FlagLife: the remaining life under the proposed traffic is shorter than the horizon.
	FlagLife Flag = "fatigue-life"
	// FlagRise: the proposed traffic's yearly damage exceeds the existing one's by more than
	// the set factor.
	FlagRise Flag = "fatigue-rise"
)

// Result is one member's fatigue outcome. Damages are Miner sums (1 uses up the life).
type Result struct {
	Status Status
	// CategoryMPa and AreaMM2 are the detail used (SectionModulusMM3 instead of the area for
	// a bending element).
	CategoryMPa, AreaMM2 float64
	SectionModulusMM3    float64
	// PerYearExisting and PerYearProposed are the yearly damages; Ratio their quotient (+Inf
	// when only the proposed traffic does damage, 0 when neither does).
	PerYearExisting, PerYearProposed, Ratio float64
	// ToDate is the damage used to date (Settings.PastYears years of existing traffic).
	ToDate float64
	// RemainingYears under the proposed traffic from Settings.Year (0 when used up; +Inf when
	// the proposed traffic does no damage), and EndYear the year it runs out (0: never, or
	// not within maxEndYears).
	RemainingYears float64
	EndYear        int
	// MaxRangeExistingMPa and MaxRangeProposedMPa are the largest stress ranges (with the
	// dynamic factor, before GammaMf) of any passage.
	MaxRangeExistingMPa, MaxRangeProposedMPa float64
	// Governing is the proposed train that does the most damage a year.
	Governing string
	Flags     []Flag
}

// maxEndYears bounds the remaining lives given a year they run out: beyond it a year means
// nothing.
const maxEndYears = 1e5

// Member is one member's data for the check.
type Member struct {
	Line    *Line
	AreaMM2 float64
	Curve   Curve
	// SectionModulusMM3, when positive, makes the member a bending element (a stringer, a
	// floor beam): its line gives a moment (kN·m per kN) and its stress is M / W, in place of
	// force over AreaMM2.
	SectionModulusMM3 float64
}

// mpaPerUnit is the stress (MPa) of a unit of the member's line: 1 kN over mm² is 1000 MPa,
// 1 kN·m over mm³ is 1e6 MPa (1 kN·m = 1e6 N·mm).
func (m Member) mpaPerUnit() float64 {
	if m.SectionModulusMM3 > 0 {
		return 1e6 / m.SectionModulusMM3
	}
	return 1000 / m.AreaMM2
}

// Bridge is what the check needs of the member's bridge.
type Bridge struct {
	// SpanM is the determinant length of the fatigue dynamic factor, and bounds the extent of
	// the member's line (a passage's steady count, passage.go).
	SpanM float64
	// DeterminantM, when positive, is the determinant length of the dynamic factor in place
	// of SpanM: a floor element's own (its line still lies within SpanM).
	DeterminantM float64
	// YearBuilt (0: not known).
	YearBuilt int
	// Shares are the truss's shares of each track's load.
	Shares []float64
}

// Passage is one train's one-way passage over a member: the member's force history (kN at
// the full train load), its cycles, and the stress per kN on the track that counts.
type Passage struct {
	Train     string
	Direction Direction
	History   []Point
	Cycles    []Cycle
	// MPaPerKN turns the history's forces into stresses (share x dynamic factor / area); for a
	// bending element, its moments (kN·m: share x dynamic factor x 1e6 / section modulus).
	MPaPerKN float64
	// PerYear is the number of these passages a year.
	PerYear float64
	// Damage is the damage of one passage.
	Damage float64
}

// Check runs the fatigue check of one member under the existing and the proposed traffic.
// keep, when not nil, receives every passage computed (for the report); the histories and
// cycles it holds are the Calculator's until the next call unless keep copies them.
func (c *Calculator) Check(m Member, b Bridge, s *Settings, existing, proposed []Traffic, keep func(proposed bool, p Passage)) (Result, error) {
	r := Result{Status: Damaged, CategoryMPa: m.Curve.CategoryMPa, AreaMM2: m.AreaMM2, SectionModulusMM3: m.SectionModulusMM3}
	var err error
	r.PerYearExisting, r.MaxRangeExistingMPa, _, err = c.yearly(m, b, s, existing, keep, false)
	if err != nil {
		return r, fmt.Errorf("existing traffic: %w", err)
	}
	r.PerYearProposed, r.MaxRangeProposedMPa, r.Governing, err = c.yearly(m, b, s, proposed, keep, true)
	if err != nil {
		return r, fmt.Errorf("proposed traffic: %w", err)
	}
	cut := m.Curve.CutOffMPa() / m.Curve.gamma()
	if r.MaxRangeExistingMPa < cut && r.MaxRangeProposedMPa < cut {
		r.Status = BelowCutOff
	}
	switch {
	case r.PerYearExisting > 0:
		r.Ratio = r.PerYearProposed / r.PerYearExisting
	case r.PerYearProposed > 0:
		r.Ratio = math.Inf(1)
	}
	r.ToDate = s.PastYears(b.YearBuilt) * r.PerYearExisting
	r.RemainingYears = math.Inf(1)
	if r.PerYearProposed > 0 {
		r.RemainingYears = max(0, (1-r.ToDate)/r.PerYearProposed)
		if r.RemainingYears < maxEndYears {
			r.EndYear = s.Year + int(math.Floor(r.RemainingYears))
		}
	}
	if r.Status == Damaged {
		if r.RemainingYears < s.HorizonYears {
			r.Flags = append(r.Flags, FlagLife)
		}
		if r.Ratio > s.RiseFactor {
			r.Flags = append(r.Flags, FlagRise)
		}
	}
	return r, nil
}

// yearly is a scenario's yearly damage, its largest stress range (MPa, before GammaMf) and
// the train doing the most damage a year.
func (c *Calculator) yearly(m Member, b Bridge, s *Settings, traffic []Traffic, keep func(bool, Passage), proposed bool) (perYear, maxRange float64, governing string, err error) {
	worst := -1.0
	lphi := b.SpanM
	if b.DeterminantM > 0 {
		lphi = b.DeterminantM
	}
	for _, t := range traffic {
		f := s.DynamicFactor
		if t.SpeedMPerS > 0 {
			if f, err = c.dynamicFactor(t.SpeedMPerS, lphi); err != nil {
				return 0, 0, "", err
			}
		}
		shares := b.Shares
		if t.Track > 0 {
			if t.Track > len(shares) {
				return 0, 0, "", fmt.Errorf("train %s runs on track %d, the bridge has %d", t.Train.Name(), t.Track, len(shares))
			}
			shares = shares[t.Track-1 : t.Track]
		}
		// Ranges scale with the share's size, so the largest share is the worst track.
		share := 0.0
		for _, sh := range shares {
			share = max(share, math.Abs(sh))
		}
		scale := share * f * m.mpaPerUnit()
		// The line's passages are counted over base, with ranges k times.
		base, k := m.Line.counted()
		counted := scale * k
		dirs := t.Directions
		if len(dirs) == 0 {
			dirs = []Direction{LeftToRight, RightToLeft}
		}
		each := t.PerYear / float64(len(dirs))
		d := 0.0
		for _, dir := range dirs {
			pc := c.passage(base, t.Train, dir, b.SpanM)
			one := pc.damage(m.Curve, counted)
			d += each * one
			maxRange = max(maxRange, pc.maxRange*counted)
			if keep != nil {
				c.hist = c.History(m.Line, t.Train, dir, c.hist)
				c.cycles, c.stack, c.rot = RainflowRepeated(Turning(c.hist, PassageTol(m.Line, t.Train), c.turn), c.cycles, c.stack, c.rot)
				keep(proposed, Passage{Train: t.Train.Name(), Direction: dir, History: c.hist, Cycles: c.cycles, MPaPerKN: scale, PerYear: each, Damage: one})
			}
		}
		perYear += d
		if d > worst {
			worst, governing = d, t.Train.Name()
		}
	}
	return perYear, maxRange, governing, nil
}

// dynamicFactor is DynamicFactor at the span's lower frequency, kept for the speeds and span
// seen last: every member of a bridge takes the same factor for a train.
func (c *Calculator) dynamicFactor(speedMPerS, spanM float64) (float64, error) {
	for _, d := range c.dyn {
		if d.speed == speedMPerS && d.span == spanM {
			return d.f, nil
		}
	}
	f, err := DynamicFactor(speedMPerS, spanM, LowerFrequency(spanM))
	if err != nil {
		return 0, err
	}
	if len(c.dyn) >= 8 {
		c.dyn = c.dyn[:0]
	}
	c.dyn = append(c.dyn, dynamicFactor{speedMPerS, spanM, f})
	return f, nil
}

type dynamicFactor struct{ speed, span, f float64 }
