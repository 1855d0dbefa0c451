package report

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/rating"
)

// Caution is shown on every page and under every explanation.
var Caution = []string{
	"Screening is not a load rating and not a design. It shows where a licensed engineer should look first.",
	"Local codes, the owner's standards and licensed engineers govern. Never lower a posted restriction on the strength of a screening result alone.",
	"Standard values recalled from published standards (load models, dynamic allowances, rating factors) must be checked against the edition in force before results are relied on.",
}

// band is one class of the colour scale of proposed rating factors. Each class has its own
// line weight and dash as well as its colour, so the drawing reads in black and white and to
// readers with any common colour-vision deficiency (the hues are from the Okabe–Ito set).
type band struct {
	Key, Label, Colour, Dash string
	Width                    float64
}

// bands gives the classes for the run's thresholds, worst first, the last for members
// without a proposed RF.
func bands(run Run) []band {
	flag, review := thresholds(run)
	ample := math.Max(1.5, review+0.2)
	return []band{
		{"below", "RF < " + num(flag, 2), "#c44e00", "none", 6},
		{"review", num(flag, 2) + " ≤ RF < " + num(review, 2), "#e69f00", "10 4", 4.5},
		{"adequate", num(review, 2) + " ≤ RF < " + num(ample, 2), "#56b4e9", "none", 3},
		{"ample", "RF ≥ " + num(ample, 2), "#0a5e99", "none", 1.8},
		{"unrated", "no proposed RF (not loaded, or no capacity held)", "#8a8a8a", "2 4", 1.8},
	}
}

// thresholds are the run's flag and review thresholds, the review at least the flag.
func thresholds(run Run) (flag, review float64) {
	flag, review = run.Flag, run.Review
	if !(flag > 0) {
		flag = 1
	}
	return flag, math.Max(review, flag)
}

// bandOf classes a proposed RF.
func bandOf(run Run, rf *float64) band {
	bs := bands(run)
	flag, review := thresholds(run)
	ample := math.Max(1.5, review+0.2)
	switch {
	case rf == nil || math.IsNaN(*rf):
		return bs[4]
	case *rf < flag:
		return bs[0]
	case *rf < review:
		return bs[1]
	case *rf < ample:
		return bs[2]
	}
	return bs[3]
}

// flagMeaning says in a few words what each flag means, for the index's legend.
var flagMeaning = map[string]string{
	string(rating.Exceeds):     "proposed RF below the flag threshold",
	string(rating.Review):      "proposed RF at or above the flag threshold but below the review threshold",
	string(rating.Worse):       "proposed RF below the existing RF by more than the set fraction",
	string(rating.NewReversal): "dead plus live force changes sign under the proposed traffic only, by at least the set share of the larger force",
	string(rating.NoCapacity):  "unrated: D + L acts in a sense with no capacity and no stored RF rated in it (flagged only where the settings ask)",
	string(fatigue.FlagLife):   "remaining fatigue life under the proposed traffic (Miner's sum, EN 1993-1-9 S-N curve) shorter than the planning horizon",
	string(fatigue.FlagRise):   "yearly fatigue damage under the proposed traffic more than the set factor times the existing",
}

// flagOrder lists the known flags in report order, then any others in the order met.
func flagOrder(extra ...[]string) []string {
	out := make([]string, 0, len(rating.Flags))
	seen := map[string]bool{}
	for _, f := range rating.Flags {
		out = append(out, string(f))
		seen[string(f)] = true
	}
	for _, fs := range extra {
		for _, f := range fs {
			if !seen[f] {
				out, seen[f] = append(out, f), true
			}
		}
	}
	return out
}

// sense is one sense of a member's force under one scenario, with the numbers behind its RF.
type senseCalc struct {
	Scenario string // existing or proposed
	Sense    string // tension or compression
	// HeldKN is the held capacity in the sense (nil: none); CKN the capacity after the
	// condition factor.
	HeldKN, CKN *float64
	Condition   float64
	// DKN is the dead-load force acting in the sense (negative where it relieves it); LKN the
	// live-load force in the sense, as a magnitude, before the dynamic allowance.
	DKN, LKN float64
	Impact   float64
	RF       *float64
	Basis    string
	// Moment: a floor element's moment (kN·m), not a force.
	Moment bool
	// Governs marks the sense that gives the scenario's lowest RF.
	Governs bool
}

// negligibleShare is the share of a member's larger live effect below which its other sense
// counts as not loaded (the rating package's rounding rule).
const negligibleShare = 1e-9

// senses lists the loaded senses of a member under one scenario with their arithmetic.
func senses(m Member, name string, s Scenario) []senseCalc {
	cond := m.ConditionFactor
	if !(cond > 0) {
		cond = 1
	}
	scale := math.Max(s.LiveMaxKN, -s.LiveMinKN)
	var out []senseCalc
	add := func(sense string, live, dead float64, held, rf *float64) {
		if !(live > negligibleShare*scale) {
			return
		}
		// A sense rests on its held capacity, else on the stored RF rated in it, else on
		// nothing (rating.Rate).
		basis := rating.FromCapacity
		switch {
		case held != nil:
		case rf != nil:
			basis = rating.FromRatio
		case dead+live*s.Impact > 0:
			basis = "unrated"
		default:
			basis = "not needed: D + L keeps the other sense"
		}
		c := senseCalc{Scenario: name, Sense: senseName(m.Label, sense), HeldKN: held, Condition: cond, DKN: dead, LKN: live, Impact: s.Impact, RF: rf, Basis: basis,
			Moment: effectQty(m.Label) == units.Moment}
		if held != nil {
			c.CKN = ptr(*held * cond)
		}
		out = append(out, c)
	}
	add(rating.Tension.String(), s.LiveMaxKN, m.DeadKN, m.CapacityTensionKN, s.RFTension)
	add(rating.Compression.String(), -s.LiveMinKN, -m.DeadKN, m.CapacityCompressionKN, s.RFCompression)
	best := -1
	for i, c := range out {
		if c.RF != nil && (best < 0 || *c.RF < *out[best].RF) {
			best = i
		}
	}
	if best >= 0 {
		out[best].Governs = true
	}
	return out
}

// reasons says, one sentence per flag, why a member is flagged.
func reasons(run Run, m Member, u units.System) []string {
	flag, review := thresholds(run)
	var out []string
	for _, f := range m.Flags {
		var r string
		switch rating.Flag(f) {
		case rating.Exceeds:
			r = fmt.Sprintf("exceeds: the proposed RF %s (%s) is below the flag threshold %s.", rfText(m.RFProposed), m.SenseProposed, num(flag, 2))
		case rating.Review:
			r = fmt.Sprintf("review: the proposed RF %s (%s) is at or above the flag threshold %s but below the review threshold %s.", rfText(m.RFProposed), m.SenseProposed, num(flag, 2), num(review, 2))
		case rating.Worse:
			r = fmt.Sprintf("worse: the proposed RF %s is below the existing RF %s", rfText(m.RFProposed), rfText(m.RFExisting))
			if m.RFProposed != nil && m.RFExisting != nil && *m.RFExisting > 0 {
				r += fmt.Sprintf(" by %s %%", num(100*(*m.RFExisting-*m.RFProposed)/(*m.RFExisting), 0))
			}
			r += fmt.Sprintf(", more than the %s %% allowed.", num(100*run.WorseFraction, 0))
		case rating.NewReversal:
			p := m.Proposed
			lo, hi := m.DeadKN+p.LiveMinKN*p.Impact, m.DeadKN+p.LiveMaxKN*p.Impact
			share := math.Min(-lo, hi) / math.Max(-lo, hi)
			r = fmt.Sprintf("new-reversal: under the proposed traffic D + L(1 + I) ranges from %s to %s %s and so changes sign, the reversed force %s %% of the larger (at least the %s %% set), which it does not under the existing traffic; both senses and fatigue need checking.",
				signedQty(u, units.Force, lo), signedQty(u, units.Force, hi), u.Name(units.Force), num(100*share, 0), num(100*run.ReversalFraction, 0))
		case rating.NoCapacity:
			what := strings.Join(unratedSenses(m), " and ")
			if what == "" {
				what = "a sense"
			}
			r = fmt.Sprintf("no-capacity: the proposed traffic loads the member in %s, for which it holds no capacity and no stored rating factor rated in that sense (unrated).", what)
		case "fatigue-life", "fatigue-rise":
			r = fatigueReason(run, m, f)
		default:
			r = fmt.Sprintf("%s: flagged by the screening run.", f)
		}
		out = append(out, r)
	}
	return out
}

// unratedSenses lists the senses the proposed traffic loads a member in with no RF, where
// the dead plus live force acts in them (rating.Rate).
func unratedSenses(m Member) []string {
	var out []string
	for _, c := range senses(m, "proposed", m.Proposed) {
		if c.RF == nil && c.DKN+c.LKN*c.Impact > 0 {
			out = append(out, c.Sense)
		}
	}
	return out
}

// storedNote says how a member's stored RF was applied: to one sense only, and which.
// train is the reference train's name as the output may show it.
func storedNote(m Member, train string) string {
	if m.StoredRF == nil {
		return ""
	}
	var sense string
	for _, c := range senses(m, "proposed", m.Proposed) {
		if c.Basis == rating.FromRatio {
			sense = c.Sense
		}
	}
	how := "rated in " + orText(sense, "a sense the proposed traffic does not load or that has a held capacity")
	if m.RatingSense != "" {
		how += " (the sense the inventory gives)"
	} else {
		how += " (not given in the inventory: taken as the sense in which the reference train's dead plus live force governs)"
	}
	return fmt.Sprintf("Stored RF %s for %s, %s: RF = RF_ref x L_ref(1 + I_ref) / (L(1 + I)) in that sense only; the other sense is rated from its held capacity, or is unrated.",
		num(*m.StoredRF, 2), orDash(train), how)
}

// severityOrder gives the indices of members in order of severity: lowest proposed RF first,
// members with no proposed RF (unrated or unloaded) last, in the geometry's order otherwise.
func severityOrder(ms []Member) []int {
	idx := make([]int, len(ms))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool {
		ra, rb := ms[idx[a]].RFProposed, ms[idx[b]].RFProposed
		if ra == nil || rb == nil {
			return ra != nil && rb == nil
		}
		return *ra < *rb
	})
	return idx
}

// governing is the proposed extreme to draw for a member: in the sense of its proposed RF,
// or the larger live effect where it has none. sign is +1 for tension, −1 for compression.
func governing(m Member) (sign float64) {
	switch m.SenseProposed {
	case rating.Tension.String():
		return 1
	case rating.Compression.String():
		return -1
	}
	if -m.Proposed.LiveMinKN > m.Proposed.LiveMaxKN {
		return -1
	}
	return 1
}

// equation is the rating equation of the run's method, in words an engineer reads.
func equation(run Run) string {
	if run.Factors.Factored {
		f := run.Factors
		return fmt.Sprintf("RF = (φ·C − γD·D) / (γL·L·(1 + I)), φ = %s, γD = %s (%s where D relieves the sense), γL = %s",
			num(f.Phi, 2), num(f.GammaD, 2), num(f.GammaDFavourable, 2), num(f.GammaL, 2))
	}
	return "RF = (C − D) / (L·(1 + I)), working stress"
}
