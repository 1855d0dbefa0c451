package screening

import (
	"context"
	"fmt"
	"math"
	"reflect"
	"sort"
	"strings"
	"sync"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"golang.org/x/sync/errgroup"
)

// Bridge is what screening needs to know of one bridge.
type Bridge struct {
	ID    string
	Truss truss.Params
	// TrussShare is the share of one track's load the analysed truss carries; Tracks the
	// number of tracks, all loaded at once by the same train.
	TrussShare float64
	Tracks     int
	// DeadLoadKNPerM is the dead load carried by the analysed truss, per metre of span.
	DeadLoadKNPerM float64
	// The cross-section (section.go). TrussSpacingM is the distance centre to centre of the
	// main trusses (0: unknown); TrackOffsetsM each track's offset from the bridge's centre
	// line, positive towards truss A (nil: not given; then TrussShare and Tracks apply).
	TrussSpacingM float64
	TrackOffsetsM []float64
	// TrussWeightKNPerM is the part of DeadLoadKNPerM that is the truss's own weight: half
	// acts at the top chord's joints, half at the bottom chord's; the rest at the deck
	// chord's panel points (deadload.go).
	TrussWeightKNPerM float64
	// LineSpeedKmh is the line speed (0: not known); FirstFrequencyHz the measured first
	// bending frequency of the span (0: not measured).
	LineSpeedKmh, FirstFrequencyHz float64
	// TrussMembers holds, by truss ("A", "B") and label, the inventory's rows of one truss's
	// members; they stand in for Members' rows on that truss.
	TrussMembers map[string]map[string]rating.Member
	// Members holds the inventory's data by member label; a member missing here has no
	// capacity data.
	Members map[string]rating.Member
	// Table is the joint table of a bridge whose Truss.Type is "table" (geometry.go).
	Table *truss.Table
	// Floor is the inventory's floor system (floor.go).
	Floor FloorSystem
	// YearBuilt is the year the bridge was built (0: not known), for fatigue damage to date.
	YearBuilt int
}

// LiveShare is the factor on a train's load for the analysed truss.
func (b Bridge) LiveShare() float64 {
	tracks := max(b.Tracks, 1)
	return b.TrussShare * float64(tracks)
}

// Scenario is a named set of trains, prepared for the envelope sweep; its envelope is the
// envelope over all of them.
type Scenario struct {
	Name   string
	Trains []*envelope.Load
	// OnTracks keeps trains to given tracks (section.go); nil: every train on every track.
	OnTracks TrackTrains
	// Speeds gives trains a speed (speed.go), by their place in Trains; nil: none has one.
	Speeds []TrainSpeed
}

// NewScenario prepares a scenario's trains.
func NewScenario(name string, trains []*traffic.Train) (Scenario, error) {
	sc := Scenario{Name: name}
	if len(trains) == 0 {
		return sc, fmt.Errorf("scenario %s: no trains", name)
	}
	for _, t := range trains {
		ld, err := envelope.Prepare(t)
		if err != nil {
			return sc, fmt.Errorf("scenario %s, train %s: %w", name, t.Name, err)
		}
		sc.Trains = append(sc.Trains, ld)
	}
	return sc, nil
}

// Settings are the run-wide inputs. They are read, never modified, by the screening workers.
type Settings struct {
	Existing, Proposed Scenario
	// References are the reference trains of stored rating factors, by the name the
	// inventory gives them.
	References map[string]*envelope.Load
	Dynamic    traffic.Dynamic
	Method     rating.Method
	Thresholds rating.Thresholds
	// Presence is the multiple-presence rule for bridges with a cross-section ("": EN 1991-2).
	Presence Presence
	// Lengths is the rule for each member's determinant length (dynamic.go; "": by member).
	Lengths string
	// FloorLengths are the floor elements' determinant lengths; nil: floor.DefaultLengths.
	FloorLengths *floor.Lengths
	// floorMemo keeps the floor system's sweeps across the run's bridges (ShareTrains sets it:
	// it serves the trains shared there).
	floorMemo *floor.Memo
	// Network, when set, rates every bridge by line category and Cooper E rating as well
	// (categories.go).
	Network *NetworkTrains
	// Fatigue holds the fatigue settings and traffic; nil checks no fatigue.
	Fatigue *FatigueSettings
}

// ShareTrains makes the trains that are defined alike, in either scenario or among the
// references (a train in both scenarios; the existing freight train as the reference of
// stored rating factors), one prepared load, so that a Screener sweeps each once per bridge,
// and gives the run a floor.Memo, so that bridges with equal panels share floor sweeps.
// Call it once, before screening.
func (s *Settings) ShareTrains() {
	var seen []*envelope.Load
	share := func(ld *envelope.Load) *envelope.Load {
		for _, o := range seen {
			if o == ld || reflect.DeepEqual(o.Train(), ld.Train()) {
				return o
			}
		}
		seen = append(seen, ld)
		return ld
	}
	for _, sc := range []*Scenario{&s.Existing, &s.Proposed} {
		for i, ld := range sc.Trains {
			sc.Trains[i] = share(ld)
		}
	}
	names := make([]string, 0, len(s.References))
	for n := range s.References {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		s.References[n] = share(s.References[n])
	}
	if s.Network != nil {
		s.Network.E80 = share(s.Network.E80)
	}
	s.floorMemo = &floor.Memo{}
}

// Extreme is one extreme force of a member (kN, after the truss share, before the dynamic
// allowance) with the train and placement that cause it.
type Extreme = envelope.Extreme

// Envelope is a member's extremes under a scenario.
type Envelope struct {
	Max, Min Extreme
	Impact   float64 // 1 + I
	// MaxCase and MinCase are the loading cases behind Max and Min (section.go).
	MaxCase, MinCase Case
	// MaxSpeed and MinSpeed are the Annex C factors of the trains behind Max and Min where
	// they run at a speed (speed.go); zero otherwise.
	MaxSpeed, MinSpeed SpeedFactor
	// MaxShare and MinShare are the factors on the governing train's own force at its
	// placement (share 1, no allowance) that give Max and Min: the shares and presence
	// factors of the loaded tracks (exact where the same train governs every track) and a
	// train's speed factor over Impact; 0 where no train loads the member in that sense.
	MaxShare, MinShare float64
}

// MemberResult is one member's outcome.
type MemberResult struct {
	Label              string
	Kind               truss.Kind
	Dead               float64 // kN
	Existing, Proposed Envelope
	Assessment         rating.Assessment

	// Truss is the main truss whose results these are: the one that governs the member.
	Truss string
	// Dynamic is the member's dynamic allowance and its inputs (dynamic.go).
	Dynamic MemberDynamic
	// Effect is "moment" (kN·m) or "shear" (kN) for a floor element; "" for a truss
	// member's axial force (kN).
	Effect string
	// Fatigue is the member's fatigue check; nil when the run checks no fatigue.
	Fatigue *fatigue.Result
	// Other is the member's outcome on the truss that does not govern it; nil where only one
	// truss is screened (other_truss.go).
	Other *OtherTruss
}

// Result is one bridge's outcome.
type Result struct {
	BridgeID string
	// Err says why the bridge could not be screened; the other fields are then empty.
	Err     error
	Members []MemberResult
	Summary rating.Bridge
	// Governing is the proposed-traffic extreme behind the worst member's lowest RF.
	Governing *Extreme

	// NoRocking says AREMA's rocking term was left out: the truss spacing is not known.
	NoRocking bool
	// Floor says what of the floor system was assumed or not rated; nil where it is not rated.
	Floor *FloorNotes
	// Network is the bridge's line categories and Cooper E rating; nil unless the settings
	// ask for them.
	Network *NetworkResult
	// Fatigue counts the members' fatigue outcomes; zero when the run checks no fatigue.
	Fatigue FatigueSummary
}

// Screener screens bridges one after another, reusing its buffers; one per goroutine.
type Screener struct {
	calc envelope.Calculator
	// fcalc computes fatigue passages (screening/fatigue).
	fcalc fatigue.Calculator
	// swept holds the current bridge's envelope under each train swept so far: a train in
	// both scenarios (or also a reference train) is swept once per bridge.
	swept []sweptTrain
	// scaled holds a train's extremes scaled by its speed factor (speed.go), while merged.
	scaled []envelope.Extremes
	floor  floor.Analyser
	// floorRated is what screenFloor prepared of the current bridge's rated floor system, for
	// the network view (floor_network.go); nil where the floor is not rated.
	floorRated *floorRated
}

type sweptTrain struct {
	ld  *envelope.Load
	ext []envelope.Extremes
}

// sweep is the envelope of one train over the current bridge's lines, computed once.
func (w *Screener) sweep(l *envelope.Lines, ld *envelope.Load, opt envelope.Options) ([]envelope.Extremes, error) {
	for _, s := range w.swept {
		if s.ld == ld {
			return s.ext, nil
		}
	}
	k := len(w.swept)
	if k < cap(w.swept) {
		w.swept = w.swept[:k+1]
	} else {
		w.swept = append(w.swept, sweptTrain{})
	}
	s := &w.swept[k]
	ext, err := w.calc.Envelope(l, ld, opt, s.ext[:0])
	if err != nil {
		w.swept = w.swept[:k]
		return nil, err
	}
	s.ld, s.ext = ld, ext
	return s.ext, nil
}

// ScreenBridge screens one bridge with a fresh Screener.
func ScreenBridge(b Bridge, s *Settings) Result {
	var w Screener
	return w.Screen(b, s)
}

// Screen screens one bridge.
func (w *Screener) Screen(b Bridge, s *Settings) (res Result) {
	res.BridgeID = b.ID
	w.swept = w.swept[:0]
	fail := func(err error) Result {
		return Result{BridgeID: b.ID, Err: err}
	}
	t, aopt, err := b.Geometry()
	if err != nil {
		return fail(fmt.Errorf("geometry: %w", err))
	}
	for _, ms := range b.allMembers() {
		for label := range ms {
			if t.Member(label) < 0 && !isFloorLabel(label) {
				return fail(fmt.Errorf("inventory member %q is not in the %s geometry (members: %s) (import members.csv with --replace to drop rows of an older geometry)", label, t.Params.Type, strings.Join(t.Labels(), ", ")))
			}
		}
	}
	if err := b.checkSection(); err != nil {
		return fail(fmt.Errorf("cross-section: %w", err))
	}
	if !b.HasSection() && !(b.LiveShare() > 0) {
		return fail(fmt.Errorf("truss share %v × tracks %d: must be positive", b.TrussShare, b.Tracks))
	}
	lines, err := analysis.InfluenceLines(t, aopt)
	if err != nil {
		return fail(fmt.Errorf("analysis: %w", err))
	}
	ords := make([][]float64, len(lines.Members))
	for i, m := range lines.Members {
		ords[i] = m.Ordinates
	}
	el, err := envelope.NewLines(lines.X, ords)
	if err != nil {
		return fail(fmt.Errorf("influence lines: %w", err))
	}
	// A continuous truss's main members take the determinant length of continuous spans.
	dyn, err := memberDynamics(lines, b, s.Dynamic, s.Lengths, t.SpanLengthsM())
	if err != nil {
		return fail(err)
	}
	trusses := b.screenedTrusses(s)
	md := memberDyn{d: s.Dynamic, spanM: t.SpanM(), members: dyn, impacts: make([]float64, len(lines.Members))}
	for i, d := range dyn {
		md.impacts[i] = d.Impact
		res.NoRocking = res.NoRocking || d.NoRocking
	}
	ex, err := w.sectionEnvelopes(el, s.Existing, b, trusses, s.Presence, md)
	if err != nil {
		return fail(fmt.Errorf("existing traffic: %w", err))
	}
	pr, err := w.sectionEnvelopes(el, s.Proposed, b, trusses, s.Presence, md)
	if err != nil {
		return fail(fmt.Errorf("proposed traffic: %w", err))
	}
	refs, err := w.referenceEnvelopes(b, s, el, trusses, md)
	if err != nil {
		return fail(err)
	}
	deads, err := deadForces(t, lines, b)
	if err != nil {
		return fail(fmt.Errorf("dead load: %w", err))
	}
	res.Members = make([]MemberResult, len(lines.Members))
	assess := make([]rating.Assessment, len(lines.Members))
	for i, l := range lines.Members {
		dead := deads[i]
		for k, tr := range trusses {
			inv := b.memberOf(tr, l.Label)
			exL := rating.Loading{Demand: demand(dead, ex[k][i])}
			prL := rating.Loading{Demand: demand(dead, pr[k][i])}
			if r, ok := refs[inv.ReferenceTrain]; ok && inv.HasStoredRating() {
				d := demand(dead, r[k][i])
				exL.Reference, prL.Reference = &d, &d
			}
			a := rating.Assess(inv, exL, prL, s.Method, s.Thresholds)
			for _, f := range append(append([]rating.Factor{}, a.Existing...), a.Proposed...) {
				if math.IsNaN(f.RF) || math.IsInf(f.RF, 0) {
					// A number that is not one must never read as "no rating factor".
					return fail(fmt.Errorf("member %s: %s rating factor is %v (check its capacity and the settings)", l.Label, f.Sense, f.RF))
				}
			}
			m := MemberResult{Label: l.Label, Kind: l.Kind, Dead: dead, Truss: tr, Existing: ex[k][i], Proposed: pr[k][i], Assessment: a, Dynamic: dyn[i]}
			if k == 0 || governs(m, res.Members[i]) {
				if k > 0 {
					keepOther(&m, res.Members[i])
				}
				assess[i] = a
				res.Members[i] = m
			} else {
				keepOther(&res.Members[i], m)
			}
		}
	}
	if assess, err = w.screenFloor(b, s, t, &res, assess); err != nil {
		return fail(fmt.Errorf("floor system: %w", err))
	}
	if err := w.checkFatigue(b, s, t.SpanM(), lines, &res); err != nil {
		return fail(err)
	}
	res.Summary = rating.Summarise(assess)
	if s.Network != nil {
		// The truss members (the floor elements follow them in res.Members: rateNetwork
		// takes them from w.floorRated).
		if res.Network, err = w.rateNetwork(b, s, el, ords, res.Members[:len(lines.Members)], refs, trusses, md); err != nil {
			return fail(err)
		}
	}
	if w := res.Summary.Worst; w >= 0 {
		e := res.Members[w].Proposed.Max
		if res.Summary.WorstPr.Sense == rating.Compression {
			e = res.Members[w].Proposed.Min
		}
		res.Governing = &e
	}
	return res
}

func demand(dead float64, e Envelope) rating.Demand {
	return rating.Demand{Dead: dead, LiveMax: e.Max.Value, LiveMin: e.Min.Value, Impact: e.Impact}
}

// trainsEnvelope is the envelope over the trains for which use(k) holds, each member's
// extreme keeping the train that governs it, for the full train load (share 1) and without
// the dynamic allowance, but for trains at speed (speed[k] not nil: scaleBySpeed). No train
// gives zero extremes.
func (w *Screener) trainsEnvelope(l *envelope.Lines, trains []*envelope.Load, use func(k int) bool, speed [][]SpeedFactor, impacts []float64) ([]envelope.Extremes, error) {
	out := make([]envelope.Extremes, l.Members())
	first := true
	for k, ld := range trains {
		if !use(k) {
			continue
		}
		ext, err := w.sweep(l, ld, envelope.Options{})
		if err != nil {
			return nil, err
		}
		if speed != nil && speed[k] != nil {
			w.scaled = scaleBySpeed(w.scaled, ext, speed[k], impacts)
			ext = w.scaled
		}
		if first {
			copy(out, ext)
			first = false
			continue
		}
		envelope.Merge(out, ext)
	}
	return out, nil
}

// referenceEnvelopes computes the envelopes of the reference trains that the bridge's stored
// rating factors name.
func (w *Screener) referenceEnvelopes(b Bridge, s *Settings, l *envelope.Lines, trusses []string, md memberDyn) (map[string][][]Envelope, error) {
	names := map[string]bool{}
	for _, ms := range b.allMembers() {
		for _, m := range ms {
			// A stored rating factor rates a sense without a capacity; one with both capacities
			// never uses it.
			if m.HasStoredRating() && !(m.HasCapacity(rating.Tension) && m.HasCapacity(rating.Compression)) {
				names[m.ReferenceTrain] = true
			}
		}
	}
	sorted := make([]string, 0, len(names))
	for n := range names {
		sorted = append(sorted, n)
	}
	sort.Strings(sorted)
	out := map[string][][]Envelope{}
	for _, n := range sorted {
		ld, ok := s.References[n]
		if !ok {
			return nil, fmt.Errorf("reference train %q of a stored rating factor is not known (import it, or name a built-in model)", n)
		}
		env, err := w.sectionEnvelopes(l, Scenario{Name: n, Trains: []*envelope.Load{ld}}, b, trusses, s.Presence, md)
		if err != nil {
			return nil, fmt.Errorf("reference train %s: %w", n, err)
		}
		out[n] = env
	}
	return out, nil
}

var screeners = sync.Pool{New: func() any { return new(Screener) }}

// ScreenAll screens the bridges with at most workers goroutines at once and returns the
// results in input order. It stops early, returning ctx's error, when ctx is cancelled.
func ScreenAll(ctx context.Context, bridges []Bridge, s *Settings, workers int) ([]Result, error) {
	out := make([]Result, len(bridges))
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(max(workers, 1))
	for i := range bridges {
		if gctx.Err() != nil {
			break
		}
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			w := screeners.Get().(*Screener)
			out[i] = w.Screen(bridges[i], s)
			screeners.Put(w)
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	return out, nil
}
