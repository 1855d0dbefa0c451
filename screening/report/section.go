package report

import (
	"fmt"
	"io"
	"strings"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening"
)

// The cross-section on the bridge page and in the explanation: the truss spacing, the
// tracks' offsets and each truss's shares, which truss governs each member, the loading
// cases, and what the dynamic allowance and the dead load rest on.

// screeningBridge is the page's bridge as screening sees its cross-section.
func (b Bridge) screeningBridge() screening.Bridge {
	return screening.Bridge{TrussShare: b.TrussShare, Tracks: b.Tracks, TrussSpacingM: b.Section.TrussSpacingM, TrackOffsetsM: b.Section.TrackOffsetsM}
}

// sharesText lists a truss's shares of the tracks' loads.
func sharesText(shares []float64) string {
	s := make([]string, len(shares))
	for i, v := range shares {
		s[i] = fmt.Sprintf("track %d × %s", i+1, num(v, 3))
	}
	return strings.Join(s, ", ")
}

// sectionFacts adds the cross-section's facts to a bridge page's: the spacing, the offsets,
// the shares of each truss, which truss governs how many members, the truss weight, the line
// speed and frequency.
func sectionFacts(facts []keyValue, b Bridge, u units.System) []keyValue {
	s, sb := b.Section, b.screeningBridge()
	lu := u.Name(units.Length)
	if sb.HasSection() {
		// The shares follow from the cross-section: the truss share of the row does not apply.
		kept := facts[:0:0]
		for _, f := range facts {
			switch f.Key {
			case "truss share":
			case "tracks":
				kept = append(kept, keyValue{"tracks", fmt.Sprint(len(s.TrackOffsetsM))})
			default:
				kept = append(kept, f)
			}
		}
		facts = kept
		offs := make([]string, len(s.TrackOffsetsM))
		for i, e := range s.TrackOffsetsM {
			offs[i] = signedQty(u, units.Length, e)
		}
		facts = append(facts,
			keyValue{"trusses apart", qty(u, units.Length, s.TrussSpacingM) + " " + lu + " (rocking term of AREMA's allowance where used)"},
			keyValue{"track offsets", strings.Join(offs, ", ") + " " + lu + " from the centre line, + towards truss A"},
			keyValue{"truss A carries", sharesText(sb.TrackShares(screening.TrussA))},
			keyValue{"truss B carries", sharesText(sb.TrackShares(screening.TrussB))})
		count := map[string]int{}
		for _, m := range b.Members {
			count[m.Truss]++
		}
		if count["B"] > 0 {
			facts = append(facts, keyValue{"trusses differ", fmt.Sprintf("each member shows the truss that governs it: truss A for %d, truss B for %d members", count["A"], count["B"])})
		} else {
			facts = append(facts, keyValue{"trusses", "truss A governs every member (truss B carries the same or less)"})
		}
	} else if b.Row.NoRocking {
		facts = append(facts, keyValue{"rocking term", "left out of AREMA's allowance: the truss spacing is not known"})
	}
	if s.TrussWeightKNPerM > 0 {
		facts = append(facts, keyValue{"truss's own weight", qty(u, units.PerLength, s.TrussWeightKNPerM) + " " + u.Name(units.PerLength) + " of the dead load, half at each chord's joints; the rest at the deck chord's panel points"})
	} else {
		facts = append(facts, keyValue{"dead load acts", "at the deck chord's panel points (the truss's own weight is not given apart)"})
	}
	if s.LineSpeedKmh > 0 {
		facts = append(facts, keyValue{"line speed", num(s.LineSpeedKmh, 0) + " km/h"})
	}
	if s.FirstFrequencyHz > 0 {
		facts = append(facts, keyValue{"first bending frequency", num(s.FirstFrequencyHz, 2) + " Hz, measured"})
	}
	return facts
}

// sectionCaptions are a member's loading cases and dynamic allowance under the proposed
// traffic, for its chart.
func sectionCaptions(m Member) []string {
	var out []string
	if c := casesText(m.Proposed); c != "" {
		out = append(out, "Proposed traffic, loading case: "+c+".")
	}
	if m.Proposed.Dynamic != "" {
		out = append(out, "Dynamic allowance: "+m.Proposed.Dynamic+".")
	}
	return out
}

// casesText is a scenario's loading cases, tension and compression.
func casesText(s Scenario) string {
	var parts []string
	if s.MaxCase != "" && s.Max.Value != 0 {
		parts = append(parts, "tension "+s.MaxCase)
	}
	if s.MinCase != "" && s.Min.Value != 0 {
		parts = append(parts, "compression "+s.MinCase)
	}
	return strings.Join(parts, "; ")
}

// explainSection tells the bridge's cross-section and the member's truss.
func explainSection(w io.Writer, b Bridge, m Member, u units.System) {
	sb := b.screeningBridge()
	lu := u.Name(units.Length)
	if sb.HasSection() {
		fmt.Fprintf(w, "  trusses %s %s apart; truss A carries %s; truss B carries %s (lever rule)\n",
			qty(u, units.Length, b.Section.TrussSpacingM), lu, sharesText(sb.TrackShares(screening.TrussA)), sharesText(sb.TrackShares(screening.TrussB)))
	}
	if m.Truss != "" {
		fmt.Fprintf(w, "  results of truss %s, the one that governs this member\n", m.Truss)
	}
	explainOther(w, m)
	if b.Section.TrussWeightKNPerM > 0 {
		fmt.Fprintf(w, "  of the dead load, %s %s is the truss's own weight, half at each chord's joints; the rest acts at the deck chord's panel points\n",
			qty(u, units.PerLength, b.Section.TrussWeightKNPerM), u.Name(units.PerLength))
	}
}

// explainCases tells a scenario's loading cases and dynamic allowance.
func explainCases(w io.Writer, s Scenario) {
	if c := casesText(s); c != "" {
		fmt.Fprintf(w, "  loading case: %s\n", c)
	}
	if s.Dynamic != "" {
		fmt.Fprintf(w, "  dynamic allowance of this member: %s\n", s.Dynamic)
	}
}

// CaseCell is the priority list's governing loading case, marked where AREMA's rocking term
// was left out for want of the truss spacing.
func CaseCell(r BridgeRow) string {
	c := r.GoverningCase
	if r.NoRocking {
		c = strings.TrimSpace(c + " (no rocking term: truss spacing not known)")
	}
	return c
}
