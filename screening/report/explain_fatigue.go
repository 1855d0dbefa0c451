package report

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/floor"
)

// explainFatigue writes a member's fatigue arithmetic (where the run checked fatigue and the
// member had the data): each train's passages recomputed from the run's plan, with the
// dynamic factor, the stress per kN, the largest cycles and the damage per passage and per
// year, then Miner's sums, the damage to date and the remaining life. Stresses are in MPa
// whatever the units (EN 1993-1-9's categories are).
func explainFatigue(p func(string, ...any), run Run, b Bridge, m Member, xs, eta []float64, spanM float64) {
	f := m.Fatigue
	if run.Fatigue == nil || f.Status == "" {
		return
	}
	p("\n\nFatigue (EN 1993-1-9 S-N curve, rainflow counting ASTM E1049, Miner's sum; values from memory)\n")
	if f.Status == string(fatigue.NoData) || f.CategoryMPa == nil || (f.AreaMM2 == nil && f.SectionModulusMM3 == nil) {
		if _, _, isFloor := floor.ResultEffect(m.Label); isFloor {
			p("  not checked: the inventory holds no section modulus or no fatigue category for %s (counted, not flagged); its shear is not checked for fatigue (connections and out-of-plane details need a detail assessment)\n", m.Label)
			return
		}
		p("  not checked: the inventory holds no area or no fatigue category for %s (counted, not flagged)", m.Label)
		return
	}
	rc, err := recheckFatigue(run, b, m, xs, eta, spanM)
	if err != nil {
		p("  (%s)", safetext.Terminal(err.Error()))
		return
	}
	set, curve, r := rc.set, rc.curve, rc.result
	p("  detail category %s MPa at 2e6 cycles, gamma_Mf %s: constant-amplitude limit %s MPa (5e6), cut-off %s MPa (1e8);\n",
		num(curve.CategoryMPa, 1), num(set.GammaMf, 2), num(curve.LimitMPa(), 1), num(curve.CutOffMPa(), 1))
	p("  N = 2e6 (dC / (gamma_Mf dS))^3 above the limit, 5e6 (dD / (gamma_Mf dS))^5 down to the cut-off, none below\n")
	if f.SectionModulusMM3 != nil {
		p("%s", floorFatigueBasis(b, m, rc))
	} else {
		p("  area %s mm²; stress = force x track share x dynamic factor / area\n", num(*f.AreaMM2, 0))
	}
	perUnit := "kN" // MPa per unit of the line: a force, or a floor element's moment
	if f.SectionModulusMM3 != nil {
		perUnit = "kN·m"
	}
	type line struct {
		proposed bool
		text     string
	}
	var lines []line
	for _, ps := range rc.passages {
		cs := append([]fatigue.Cycle(nil), ps.Cycles...)
		sort.Slice(cs, func(i, j int) bool { return cs[i].Range > cs[j].Range })
		var top []string
		for _, c := range cs[:min(len(cs), 3)] {
			top = append(top, fmt.Sprintf("%s x %s MPa", num(c.Count, 1), num(c.Range*ps.MPaPerKN, 1)))
		}
		total := 0.0
		for _, c := range ps.Cycles {
			total += c.Count
		}
		lines = append(lines, line{ps.proposed, fmt.Sprintf("    %s, %s: %s a year; %s MPa per %s; %s cycles a passage, largest %s; damage %s a passage, %s a year",
			safetext.Terminal(ps.Train), ps.Direction, num(ps.PerYear, 0), num(ps.MPaPerKN, 4), perUnit, num(total, 1),
			strings.Join(top, ", "), sci(ps.Damage), sci(ps.Damage*ps.PerYear))})
	}
	for _, sc := range []struct {
		name     string
		proposed bool
		traffic  []screening.FatigueTraffic
		perYear  float64
	}{{"existing", false, run.Fatigue.Existing, r.PerYearExisting}, {"proposed", true, run.Fatigue.Proposed, r.PerYearProposed}} {
		p("  %s traffic:\n", sc.name)
		for _, t := range sc.traffic {
			factor := fmt.Sprintf("dynamic factor %s (no speed given)", num(set.DynamicFactor, 3))
			if t.SpeedKmh > 0 {
				lphi := rc.lphiM
				v, _ := fatigue.DynamicFactor(t.SpeedKmh/3.6, lphi, fatigue.LowerFrequency(lphi))
				factor = fmt.Sprintf("at %s km/h over %s m, n0 %s Hz (lower bound), dynamic factor 1 + (phi' + phi''/2)/2 = %s",
					num(t.SpeedKmh, 0), num(lphi, 1), num(fatigue.LowerFrequency(lphi), 2), num(v, 3))
			}
			p("    %s: %s\n", safetext.Terminal(t.Train.Asked), factor)
		}
		for _, l := range lines {
			if l.proposed == sc.proposed {
				p("%s\n", l.text)
			}
		}
		p("    damage a year (Miner's sum over the trains) %s\n", sci(sc.perYear))
	}
	past := set.PastYears(b.YearBuilt)
	p("  ratio proposed / existing = %s\n", num(r.Ratio, 2))
	built := "year built " + fmt.Sprint(b.YearBuilt)
	if b.YearBuilt == 0 {
		built = fmt.Sprintf("year built not known, taken as %d", set.DefaultYearBuilt)
	}
	p("  damage to date: %s, to %d: %s years of today's existing traffic (the configured history; an assumption) x %s = %s\n",
		built, set.Year, num(past, 1), sci(r.PerYearExisting), sci(r.ToDate))
	if r.ToDate >= 1 && r.PerYearProposed > 0 {
		p("  remaining life: none; the damage to date %s already reaches 1 (the life is used up on the assumed history)", sci(r.ToDate))
	} else if math.IsInf(r.RemainingYears, 1) {
		p("  remaining life: the proposed traffic does no damage (every range below the cut-off)")
	} else {
		p("  remaining life = (1 - %s) / %s = %s years", sci(r.ToDate), sci(r.PerYearProposed), num(r.RemainingYears, 1))
		if r.EndYear != 0 {
			p(", running out in %d", r.EndYear)
		}
		p("; planning horizon %s years", num(set.HorizonYears, 0))
	}
}

// fatigueRecheck is a member's fatigue check done again from the run's plan, with every
// passage kept (histories and cycles copied).
type fatigueRecheck struct {
	set      *screening.FatigueSettings
	curve    fatigue.Curve
	result   fatigue.Result
	passages []keptPassage
	// lphiM is the determinant length the dynamic factor of a train at speed took.
	lphiM float64
}

type keptPassage struct {
	fatigue.Passage
	proposed bool
}

// recheckFatigue runs a member's fatigue check again as the run did (its plan's settings and
// trains, the bridge's year built and shares, the stored detail).
func recheckFatigue(run Run, b Bridge, m Member, xs, eta []float64, spanM float64) (*fatigueRecheck, error) {
	f := m.Fatigue
	fm := fatigue.Member{}
	fb := fatigue.Bridge{SpanM: spanM, YearBuilt: b.YearBuilt}
	if _, _, isFloor := floor.ResultEffect(m.Label); isFloor {
		// A floor element: its moment line and shares (xs and eta are not its).
		var err error
		if xs, eta, fb, err = floorFatigueInput(run, b, m, fb); err != nil {
			return nil, err
		}
		fm.SectionModulusMM3 = *f.SectionModulusMM3
	} else {
		if run.Fatigue == nil || f.CategoryMPa == nil || f.AreaMM2 == nil {
			return nil, fmt.Errorf("no fatigue check for member %s", m.Label)
		}
		fm.AreaMM2 = *f.AreaMM2
		fb.Shares = make([]float64, max(b.Tracks, 1))
		for i := range fb.Shares {
			fb.Shares[i] = b.TrussShare
		}
	}
	set, err := run.Fatigue.Settings()
	if err != nil {
		return nil, fmt.Errorf("the run's fatigue settings cannot be rebuilt: %w", err)
	}
	curve, err := fatigue.NewCurve(*f.CategoryMPa, set.GammaMf)
	if err != nil {
		return nil, err
	}
	if fm.Line, err = fatigue.NewLine(xs, eta); err != nil {
		return nil, err
	}
	fm.Curve = curve
	rc := &fatigueRecheck{set: set, curve: curve, lphiM: fb.SpanM}
	if fb.DeterminantM > 0 {
		rc.lphiM = fb.DeterminantM
	}
	keep := func(proposed bool, ps fatigue.Passage) {
		ps.History = append([]fatigue.Point(nil), ps.History...)
		ps.Cycles = append([]fatigue.Cycle(nil), ps.Cycles...)
		rc.passages = append(rc.passages, keptPassage{ps, proposed})
	}
	var calc fatigue.Calculator
	rc.result, err = calc.Check(fm, fb, &set.Settings, set.Existing, set.Proposed, keep)
	return rc, err
}

// sci writes a damage (a small Miner sum) to 4 significant digits.
func sci(v float64) string {
	return fmt.Sprintf("%.4g", v)
}

// fatigueReason says why a member carries a fatigue flag.
func fatigueReason(run Run, m Member, flag string) string {
	f := m.Fatigue
	val := func(v *float64, d int) string {
		if v == nil {
			return "—"
		}
		return num(*v, d)
	}
	horizon, rise := "the set", "the set"
	if run.Fatigue != nil {
		horizon, rise = num(run.Fatigue.HorizonYears, 0), num(run.Fatigue.RiseFactor, 2)
	}
	if flag == string(fatigue.FlagLife) {
		return fmt.Sprintf("fatigue-life: under the proposed traffic the member's fatigue life runs out in %s years, less than the planning horizon of %s years.", val(f.RemainingYears, 1), horizon)
	}
	return fmt.Sprintf("fatigue-rise: the proposed traffic's yearly fatigue damage is %s times the existing traffic's, more than the %s set.", val(f.Ratio, 2), rise)
}
