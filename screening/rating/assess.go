package rating

import (
	"math"
	"sort"
)

// Flag marks a member (and through it its bridge) for attention.
type Flag string

// The flags, in the order they are reported.
const (
	// Exceeds: the proposed traffic's RF is below the flag threshold (1.00 by default).
	Exceeds Flag = "exceeds"
	// Review: the proposed RF is at or above the flag threshold but below the review threshold.
	Review Flag = "review"
	// Worse: the proposed RF is below the existing RF by more than the set fraction.
	Worse Flag = "worse"
	// NewReversal: D + L changes sign under the proposed traffic by a reversed force of at
	// least the set share of the larger force, and not so under the existing traffic.
	NewReversal Flag = "new-reversal"
	// NoCapacity: the live load acts in a sense for which the member holds no capacity and no
	// stored rating factor rated in that sense (the member is unrated). Set only where
	// Thresholds.FlagUnrated asks for it; unrated members are counted per bridge either way.
	NoCapacity Flag = "no-capacity"
)

// Flags lists every flag in report order.
var Flags = []Flag{Exceeds, Review, Worse, NewReversal, NoCapacity}

// Thresholds set when a member is flagged.
type Thresholds struct {
	Flag          float64 // RF below this: exceeds (1.00)
	Review        float64 // RF below this: review (e.g. 1.10)
	WorseFraction float64 // proposed RF below existing RF by more than this share: worse (e.g. 0.10)
	// ReversalFraction: a reversal counts where the reversed force is at least this share of
	// the member's larger force (Demand.ReversalShare; 0: any change of sign).
	ReversalFraction float64
	// FlagUnrated flags unrated members no-capacity (and so their bridges).
	FlagUnrated bool
}

// Loading is a member's demand under one scenario, with the reference train's demand where
// the member is rated by a stored rating factor.
type Loading struct {
	Demand    Demand
	Reference *Demand
}

// Assessment is one member's rating under the existing and the proposed traffic.
type Assessment struct {
	Existing, Proposed     []Factor
	MissingEx, MissingPr   []Sense
	WorstEx, WorstPr       Factor
	HasEx, HasPr           bool
	ReversesEx, ReversesPr bool
	DemandIncrease         float64 // largest rise of live demand with allowance over the senses, as a fraction (0.25 = 25 %)
	Flags                  []Flag
}

// Rate gives a member's factors under one loading, sense by sense: from the capacity where it
// holds one in that sense, otherwise from its stored rating factor where that was rated in
// that sense, otherwise none (the sense is missing: unrated).
//
// A sense without a rating counts as missing only where the dead plus live force acts in it:
// a member whose force stays in tension needs no compression rating, however much live
// compression relieves it (common practice).
func Rate(m Member, l Loading, meth Method) ([]Factor, []Sense) {
	rfs, missing := FromCapacities(m, l.Demand, meth)
	missing = actingOnly(l.Demand, missing)
	if len(missing) == 0 || !m.HasStoredRating() || l.Reference == nil {
		return rfs, missing
	}
	stored, _ := FromStoredRating(m, *l.Reference, l.Demand)
	var still []Sense
	for _, s := range missing {
		found := false
		for _, f := range stored {
			if f.Sense == s {
				rfs, found = append(rfs, f), true
			}
		}
		if !found {
			still = append(still, s)
		}
	}
	sort.SliceStable(rfs, func(i, j int) bool { return rfs[i].Sense < rfs[j].Sense })
	return rfs, still
}

// Assess rates a member under both scenarios and sets its flags.
func Assess(m Member, existing, proposed Loading, meth Method, th Thresholds) Assessment {
	var a Assessment
	a.Existing, a.MissingEx = Rate(m, existing, meth)
	a.Proposed, a.MissingPr = Rate(m, proposed, meth)
	a.WorstEx, a.HasEx = Worst(a.Existing)
	a.WorstPr, a.HasPr = Worst(a.Proposed)
	a.ReversesEx = reverses(existing.Demand, th.ReversalFraction)
	a.ReversesPr = reverses(proposed.Demand, th.ReversalFraction)
	a.DemandIncrease = demandIncrease(existing.Demand, proposed.Demand)
	if a.HasPr {
		switch {
		case a.WorstPr.RF < th.Flag:
			a.Flags = append(a.Flags, Exceeds)
		case a.WorstPr.RF < th.Review:
			a.Flags = append(a.Flags, Review)
		}
		if a.HasEx && !math.IsInf(a.WorstEx.RF, 0) && a.WorstEx.RF > 0 &&
			(a.WorstEx.RF-a.WorstPr.RF)/a.WorstEx.RF > th.WorseFraction {
			a.Flags = append(a.Flags, Worse)
		}
	}
	if a.ReversesPr && !a.ReversesEx {
		a.Flags = append(a.Flags, NewReversal)
	}
	if a.Unrated() && th.FlagUnrated {
		a.Flags = append(a.Flags, NoCapacity)
	}
	return a
}

// actingOnly keeps the senses in which D + L(1 + I) acts.
func actingOnly(d Demand, senses []Sense) []Sense {
	var out []Sense
	for _, s := range senses {
		if d.dead(s)+d.live(s) > 0 {
			out = append(out, s)
		}
	}
	return out
}

// reverses says whether a reversal counts: a change of sign whose reversed force is at least
// the fraction of the larger force.
func reverses(d Demand, fraction float64) bool {
	share := d.ReversalShare()
	return share > 0 && share >= fraction
}

// Unrated says whether the proposed traffic loads the member in a sense that it has no
// rating for (no capacity and no stored rating factor in that sense).
func (a Assessment) Unrated() bool { return len(a.MissingPr) > 0 }

func demandIncrease(ex, pr Demand) float64 {
	inc := 0.0
	scale := math.Max(ex.live(Tension), ex.live(Compression))
	for _, s := range [...]Sense{Tension, Compression} {
		if e := ex.live(s); e > negligible*scale && e > 0 {
			inc = math.Max(inc, pr.live(s)/e-1)
		}
	}
	return inc
}

// Has says whether the assessment carries the flag.
func (a Assessment) Has(f Flag) bool {
	for _, g := range a.Flags {
		if g == f {
			return true
		}
	}
	return false
}

// Bridge summarises the assessments of one bridge's members.
type Bridge struct {
	// Worst is the index of the member with the lowest proposed RF (-1 when no member has one).
	Worst            int
	WorstEx, WorstPr Factor
	// DemandIncrease is the largest member demand increase, as a fraction.
	DemandIncrease float64
	// Headroom is the multiple of the proposed traffic the bridge carries at RF = 1: live
	// effects are linear in the train's loads, so it is the lowest proposed RF.
	Headroom   float64
	FlagCounts map[Flag]int
	// Unrated counts the members the proposed traffic loads in a sense they have no rating
	// for (Assessment.Unrated).
	Unrated int
}

// Summarise finds a bridge's worst member and counts its flags.
func Summarise(members []Assessment) Bridge {
	b := Bridge{Worst: -1, Headroom: math.Inf(1), FlagCounts: map[Flag]int{}}
	for i, a := range members {
		for _, f := range a.Flags {
			b.FlagCounts[f]++
		}
		if a.Unrated() {
			b.Unrated++
		}
		b.DemandIncrease = math.Max(b.DemandIncrease, a.DemandIncrease)
		if a.HasPr && (b.Worst < 0 || a.WorstPr.RF < b.WorstPr.RF) {
			b.Worst, b.WorstPr, b.WorstEx = i, a.WorstPr, a.WorstEx
		}
	}
	if b.Worst >= 0 {
		b.Headroom = b.WorstPr.RF
	}
	return b
}

// RankOrder sorts bridges for the priority list: lowest proposed RF first, then the largest
// demand increase; bridges with no rated member go last, ordered by demand increase. (A
// run's stored priority list also weighs the fatigue life index: internal/ranking.) key
// gives each index's summary; the returned slice holds the indices in rank order.
func RankOrder(n int, key func(i int) Bridge) []int {
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(p, q int) bool {
		a, b := key(idx[p]), key(idx[q])
		ra, rb := a.WorstPr.RF, b.WorstPr.RF
		if a.Worst < 0 {
			ra = math.Inf(1)
		}
		if b.Worst < 0 {
			rb = math.Inf(1)
		}
		if ra != rb {
			return ra < rb
		}
		return a.DemandIncrease > b.DemandIncrease
	})
	return idx
}
