package screening

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// The cross-section: two main trusses TrussSpacingM apart, tracks at their offsets from the
// bridge's centre line (positive towards truss A). A track's load reaches the trusses by the
// lever rule; trains on different tracks run independently, so a member's extreme with several
// tracks loaded is the sum over the tracks of share times that track's own extreme (the
// opposite extreme where a share is negative), which is exact because each track's extreme
// is. The multiple-presence rule of the chosen standard says how many tracks count fully.

// The main trusses: A is the truss positive offsets lean towards, B the other.
const (
	TrussA = "A"
	TrussB = "B"
)

// LeverShares are the shares of a track's load that trusses A and B carry, for a track offset
// offsetM from the centre line (towards A) between trusses spacingM apart: 1/2 + e/b and
// 1/2 - e/b (lever rule, common practice). A share is negative for a track outside the
// trusses.
func LeverShares(offsetM, spacingM float64) (a, b float64) {
	r := offsetM / spacingM
	return 0.5 + r, 0.5 - r
}

// HasSection says whether the bridge gives its cross-section (truss spacing and track
// offsets) rather than a truss share and a number of tracks.
func (b Bridge) HasSection() bool { return b.TrussSpacingM > 0 && len(b.TrackOffsetsM) > 0 }

// TrackCount is the number of tracks: one per offset with a cross-section, else Tracks (at
// least one).
func (b Bridge) TrackCount() int {
	if b.HasSection() {
		return len(b.TrackOffsetsM)
	}
	return max(b.Tracks, 1)
}

// TrackShares gives, for truss "A" or "B", each track's share of its load on that truss, in
// track order. A bridge without a cross-section gives Tracks copies of TrussShare for either
// truss (both carry the same loads). An unknown truss name gives nil.
func (b Bridge) TrackShares(truss string) []float64 {
	if truss != TrussA && truss != TrussB {
		return nil
	}
	if !b.HasSection() {
		out := make([]float64, max(b.Tracks, 1))
		for i := range out {
			out[i] = b.TrussShare
		}
		return out
	}
	out := make([]float64, len(b.TrackOffsetsM))
	for i, e := range b.TrackOffsetsM {
		sa, sb := LeverShares(e, b.TrussSpacingM)
		out[i] = sa
		if truss == TrussB {
			out[i] = sb
		}
	}
	return out
}

// ScreenedTrusses lists the trusses screened when every train may run on every track: A
// alone where both carry the same shares (a bridge without a cross-section, or tracks placed
// symmetrically), A and B otherwise.
func (b Bridge) ScreenedTrusses() []string {
	if !b.HasSection() {
		return []string{TrussA}
	}
	a, bb := b.TrackShares(TrussA), b.TrackShares(TrussB)
	sort.Float64s(a)
	sort.Float64s(bb)
	for i := range a {
		if a[i] != bb[i] {
			return []string{TrussA, TrussB}
		}
	}
	return []string{TrussA}
}

// Presence is a multiple-presence rule: how much of each track's load counts when several
// tracks are loaded at once.
type Presence string

// The multiple-presence rules (from memory; check the edition in force).
const (
	// PresenceEN is EN 1991-2's: two tracks fully loaded; with three or more, the worse of
	// two tracks fully loaded and 0.75 times every track loaded.
	PresenceEN Presence = "en1991-2"
	// PresenceAREMA is AREMA's: full load on two tracks, one half on a third, one quarter on
	// a fourth, none on more.
	PresenceAREMA Presence = "arema"
)

// ParsePresence reads a rule's name; "" gives EN 1991-2's.
func ParsePresence(s string) (Presence, error) {
	switch p := Presence(strings.ToLower(strings.TrimSpace(s))); p {
	case "":
		return PresenceEN, nil
	case PresenceEN, PresenceAREMA:
		return p, nil
	}
	return "", fmt.Errorf("multiple presence %q: allowed %s, %s", s, PresenceEN, PresenceAREMA)
}

// Combine gives the largest total effect of the tracks whose effects, each loaded alone
// (with its share), are c (all >= 0), under the rule, and sets factors[t] to the factor track
// t takes in that case (0: not loaded). Each track loaded alone is among the cases: with
// effects >= 0 a case with more tracks is never smaller, so it is found by the same search.
// The tracks that count fully are the ones with the largest effects: the worst placement.
func (p Presence) Combine(c, factors []float64) float64 {
	order := make([]int, len(c))
	for i := range order {
		order[i] = i
		factors[i] = 0
	}
	sort.SliceStable(order, func(i, j int) bool { return c[order[i]] > c[order[j]] })
	full := func(n int) float64 {
		sum := 0.0
		for _, t := range order[:min(n, len(order))] {
			sum += c[t]
		}
		return sum
	}
	switch {
	case p == PresenceAREMA:
		sum := 0.0
		for k, t := range order {
			f := [4]float64{1, 1, 0.5, 0.25}[min(k, 3)]
			if k > 3 {
				f = 0
			}
			factors[t] = f
			sum += f * c[t]
		}
		return sum
	case len(c) >= 3 && 0.75*full(len(c)) > full(2):
		for t := range factors {
			factors[t] = 0.75
		}
		return 0.75 * full(len(c))
	}
	for _, t := range order[:min(2, len(order))] {
		factors[t] = 1
	}
	return full(2)
}

// Case is the loading case behind an extreme: which truss, which tracks loaded (numbered from
// 1), each one's lever-rule share and multiple-presence factor.
type Case struct {
	Truss   string
	Tracks  []int
	Shares  []float64
	Factors []float64
}

// String reads like "truss B: track 1 × 0.688 + track 2 × 0.312 × 0.75"; "" for no case.
func (c Case) String() string {
	if len(c.Tracks) == 0 {
		return ""
	}
	parts := make([]string, len(c.Tracks))
	for i, t := range c.Tracks {
		parts[i] = "track " + strconv.Itoa(t) + " × " + strconv.FormatFloat(c.Shares[i], 'f', 3, 64)
		if c.Factors[i] != 1 {
			parts[i] += " × " + strconv.FormatFloat(c.Factors[i], 'g', -1, 64)
		}
	}
	return "truss " + c.Truss + ": " + strings.Join(parts, " + ")
}

// combineTracks gives, for each member, the extremes of one truss with tracks of the given
// shares: perTrack[t] are track t's extremes (share 1) under the trains that may run on it.
// Each extreme keeps the train and placement of the track that contributes most to it and
// its value is the combined one.
func combineTracks(truss string, shares []float64, perTrack [][]envelope.Extremes, rule Presence) []Envelope {
	n := len(perTrack[0])
	out := make([]Envelope, n)
	c := make([]float64, len(shares))
	f := make([]float64, len(shares))
	for i := range n {
		for _, sense := range []int{+1, -1} {
			for t, s := range shares {
				// The extreme in the sense wanted: with a negative share, the opposite one.
				hi, lo := perTrack[t][i].Max, perTrack[t][i].Min
				e := hi
				if (s >= 0) != (sense > 0) {
					e = lo
				}
				c[t] = float64(sense) * s * e.Value
			}
			v := rule.Combine(c, f)
			cs := Case{Truss: truss}
			best, bestC := -1, 0.0
			for t := range shares {
				if f[t] == 0 || c[t] == 0 {
					continue
				}
				cs.Tracks = append(cs.Tracks, t+1)
				cs.Shares = append(cs.Shares, shares[t])
				cs.Factors = append(cs.Factors, f[t])
				if best < 0 || f[t]*c[t] > bestC {
					best, bestC = t, f[t]*c[t]
				}
			}
			var ext Extreme
			if best >= 0 {
				ext = perTrack[best][i].Max
				if (shares[best] >= 0) != (sense > 0) {
					ext = perTrack[best][i].Min
				}
			} else {
				// Nothing loads the member in this sense: the first track's (empty) extreme.
				ext = perTrack[0][i].Max
				if sense < 0 {
					ext = perTrack[0][i].Min
				}
			}
			share := 0.0
			if ext.Value != 0 {
				share = float64(sense) * v / ext.Value
			}
			ext.Value = float64(sense) * v
			if sense > 0 {
				out[i].Max, out[i].MaxCase, out[i].MaxShare = ext, cs, share
			} else {
				out[i].Min, out[i].MinCase, out[i].MinShare = ext, cs, share
			}
		}
	}
	return out
}

// legacyCase is the case of a bridge without a cross-section: every track loaded fully by the
// same train, each with the truss share (the loading screening has always applied to them).
func legacyCase(b Bridge) Case {
	tracks := max(b.Tracks, 1)
	c := Case{Truss: TrussA}
	for t := range tracks {
		c.Tracks = append(c.Tracks, t+1)
		c.Shares = append(c.Shares, b.TrussShare)
		c.Factors = append(c.Factors, 1)
	}
	return c
}

// TrackTrains says which trains of a scenario may run on which tracks: for train k (in the
// scenario's order), the track numbers (from 1) it may use; a train without an entry, or a
// nil map, may run on every track. A track number beyond a bridge's tracks is ignored.
type TrackTrains map[int][]int

// allows says whether train k may run on track t (from 1).
func (tt TrackTrains) allows(k, t int) bool {
	on, ok := tt[k]
	if !ok {
		return true
	}
	for _, x := range on {
		if x == t {
			return true
		}
	}
	return false
}

// restricted says whether any train of the scenario is kept off any of n tracks.
func (tt TrackTrains) restricted(trains, n int) bool {
	for k := range trains {
		for t := 1; t <= n; t++ {
			if !tt.allows(k, t) {
				return true
			}
		}
	}
	return false
}

// sectionEnvelopes is a scenario's envelope on each of the trusses, member by member: each
// train swept once over the lines with its full load, each track's extremes over the trains
// that may run on it, combined with the truss's shares of the tracks by the presence rule. A
// bridge without a cross-section loads every track fully with the same trains and the truss
// share (LiveShare), as it always has. Values leave the dynamic allowance apart, as Impact.
func (w *Screener) sectionEnvelopes(l *envelope.Lines, sc Scenario, b Bridge, trusses []string, rule Presence, md memberDyn) ([][]Envelope, error) {
	if len(sc.Trains) == 0 {
		return nil, fmt.Errorf("no trains")
	}
	if rule == "" {
		rule = PresenceEN
	}
	impacts := md.impacts
	var speed [][]SpeedFactor
	for k := range sc.Trains {
		if f := speedFactors(sc, k, b, md.d, md.spanM, md.members); f != nil {
			if speed == nil {
				speed = make([][]SpeedFactor, len(sc.Trains))
			}
			speed[k] = f
		}
	}
	all, err := w.trainsEnvelope(l, sc.Trains, func(int) bool { return true }, speed, impacts)
	if err != nil {
		return nil, err
	}
	out := make([][]Envelope, len(trusses))
	if !b.HasSection() {
		share, cs := b.LiveShare(), legacyCase(b)
		env := make([]Envelope, len(all))
		for i, e := range all {
			env[i] = Envelope{Max: e.Max, Min: e.Min, Impact: impacts[i], MaxCase: cs, MinCase: cs, MaxShare: share, MinShare: share}
			env[i].Max.Value *= share
			env[i].Min.Value *= share
		}
		withSpeeds(env, speed, impacts)
		for k := range out {
			out[k] = env
		}
		return out, nil
	}
	n := len(b.TrackOffsetsM)
	perTrack := make([][]envelope.Extremes, n)
	for t := range perTrack {
		perTrack[t] = all
		if sc.OnTracks.restricted(len(sc.Trains), n) {
			if perTrack[t], err = w.trainsEnvelope(l, sc.Trains, func(k int) bool { return sc.OnTracks.allows(k, t+1) }, speed, impacts); err != nil {
				return nil, err
			}
		}
	}
	for k, tr := range trusses {
		out[k] = combineTracks(tr, b.TrackShares(tr), perTrack, rule)
		for i := range out[k] {
			out[k][i].Impact = impacts[i]
		}
		withSpeeds(out[k], speed, impacts)
	}
	return out, nil
}

// governs says whether member result m governs over o, the same member on the other truss:
// its proposed rating factor is lower, or, with neither rated, its proposed force with the
// allowance is larger.
func governs(m, o MemberResult) bool {
	rf := func(r MemberResult) float64 {
		if r.Assessment.HasPr {
			return r.Assessment.WorstPr.RF
		}
		return math.Inf(1)
	}
	if a, b := rf(m), rf(o); a != b {
		return a < b
	}
	force := func(r MemberResult) float64 {
		p := r.Proposed
		return max(math.Abs(r.Dead+p.Max.Value*p.Impact), math.Abs(r.Dead+p.Min.Value*p.Impact))
	}
	return force(m) > force(o)
}

// screenedTrusses are the trusses screened under the settings: both wherever a scenario keeps
// trains to given tracks (symmetric shares then no longer mean equal loads) or the inventory
// gives one truss's members rows of their own.
func (b Bridge) screenedTrusses(s *Settings) []string {
	if b.HasSection() && (s.Existing.OnTracks != nil || s.Proposed.OnTracks != nil) || len(b.TrussMembers) > 0 {
		return []string{TrussA, TrussB}
	}
	return b.ScreenedTrusses()
}

// checkSection refuses a cross-section that cannot be screened.
func (b Bridge) checkSection() error {
	switch {
	case len(b.TrackOffsetsM) > 0 && !(b.TrussSpacingM > 0):
		return fmt.Errorf("track offsets %v given without a truss spacing", b.TrackOffsetsM)
	case b.TrussSpacingM < 0 || math.IsNaN(b.TrussSpacingM) || math.IsInf(b.TrussSpacingM, 0):
		return fmt.Errorf("truss spacing %v m: must be positive", b.TrussSpacingM)
	}
	for t, e := range b.TrackOffsetsM {
		if math.IsNaN(e) || math.IsInf(e, 0) {
			return fmt.Errorf("track %d: offset %v m is not a number", t+1, e)
		}
	}
	return nil
}

// memberDyn is a bridge's dynamic allowance member by member, for the envelopes.
type memberDyn struct {
	d       traffic.Dynamic
	spanM   float64
	members []MemberDynamic
	impacts []float64 // members[i].Impact
}

// withSpeeds notes on each extreme the speed factor of the train behind it, if it has one,
// and takes that factor over 1 + I into the extreme's share.
func withSpeeds(env []Envelope, speed [][]SpeedFactor, impacts []float64) {
	for _, f := range speed {
		for i := range env {
			if f == nil {
				continue
			}
			if env[i].Max.Train == f[i].Train {
				env[i].MaxSpeed = f[i]
				env[i].MaxShare *= f[i].Factor / impacts[i]
			}
			if env[i].Min.Train == f[i].Train {
				env[i].MinSpeed = f[i]
				env[i].MinShare *= f[i].Factor / impacts[i]
			}
		}
	}
}

// CombineTracks gives one truss's envelopes for tracks of the given shares that every train
// may use: ext are the members' extremes over the trains with a track's full load (share 1).
func CombineTracks(truss string, shares []float64, ext []envelope.Extremes, rule Presence) []Envelope {
	perTrack := make([][]envelope.Extremes, len(shares))
	for t := range perTrack {
		perTrack[t] = ext
	}
	return combineTracks(truss, shares, perTrack, rule)
}

// ParseOffsets reads a list of track offsets in metres, separated by spaces or "|"
// ("-2.25 2.25"): the format of bridges.csv's track_offsets_m.
func ParseOffsets(s string) ([]float64, error) {
	fields := strings.FieldsFunc(s, func(r rune) bool { return r == ' ' || r == '|' })
	if len(fields) == 0 || len(fields) > maxTrackNumber {
		return nil, fmt.Errorf("track offsets %q: give 1 to %d offsets separated by spaces or |, e.g. \"-2.25 2.25\"", s, maxTrackNumber)
	}
	out := make([]float64, len(fields))
	for i, f := range fields {
		v, err := strconv.ParseFloat(f, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("track offsets %q: %q is not a number", s, f)
		}
		out[i] = v
	}
	return out, nil
}

// memberOf is the inventory's row of a member on a truss: the truss's own row, else the row
// of both.
func (b Bridge) memberOf(truss, label string) rating.Member {
	if m, ok := b.TrussMembers[truss][label]; ok {
		return m
	}
	return b.Members[label]
}

// allMembers lists the inventory's rows: of both trusses, then of each truss.
func (b Bridge) allMembers() []map[string]rating.Member {
	out := []map[string]rating.Member{b.Members}
	for _, tr := range []string{TrussA, TrussB} {
		if ms := b.TrussMembers[tr]; ms != nil {
			out = append(out, ms)
		}
	}
	return out
}
