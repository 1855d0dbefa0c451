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
	// Members holds the inventory's data by member label; a member missing here has no
	// capacity data.
	Members map[string]rating.Member
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
	// Fatigue holds the fatigue settings and traffic; nil checks no fatigue.
	Fatigue *FatigueSettings
}

// ShareTrains makes the trains that are defined alike, in either scenario or among the
// references (a train in both scenarios; the existing freight train as the reference of
// stored rating factors), one prepared load, so that a Screener sweeps each once per bridge.
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
}

// Extreme is one extreme force of a member (kN, after the truss share, before the dynamic
// allowance) with the train and placement that cause it.
type Extreme = envelope.Extreme

// Envelope is a member's extremes under a scenario.
type Envelope struct {
	Max, Min Extreme
	Impact   float64 // 1 + I
}

// MemberResult is one member's outcome.
type MemberResult struct {
	Label              string
	Kind               truss.Kind
	Dead               float64 // kN
	Existing, Proposed Envelope
	Assessment         rating.Assessment
	// Fatigue is the member's fatigue check; nil when the run checks no fatigue.
	Fatigue *fatigue.Result
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
	t, err := truss.Build(b.Truss)
	if err != nil {
		return fail(fmt.Errorf("geometry: %w", err))
	}
	for label := range b.Members {
		if t.Member(label) < 0 {
			return fail(fmt.Errorf("inventory member %q is not in the %s geometry (members: %s)", label, t.Params.Type, strings.Join(t.Labels(), ", ")))
		}
	}
	if !(b.LiveShare() > 0) {
		return fail(fmt.Errorf("truss share %v × tracks %d: must be positive", b.TrussShare, b.Tracks))
	}
	lines, err := analysis.InfluenceLines(t, analysis.Options{})
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
	impact := s.Dynamic.Factor(t.SpanM())
	if !(impact >= 1) || math.IsInf(impact, 0) {
		return fail(fmt.Errorf("dynamic allowance %s gives 1 + I = %v at span %g m", s.Dynamic, impact, t.SpanM()))
	}
	share := b.LiveShare()
	ex, err := w.scenarioEnvelope(el, s.Existing.Trains, share, impact)
	if err != nil {
		return fail(fmt.Errorf("existing traffic: %w", err))
	}
	pr, err := w.scenarioEnvelope(el, s.Proposed.Trains, share, impact)
	if err != nil {
		return fail(fmt.Errorf("proposed traffic: %w", err))
	}
	refs, err := w.referenceEnvelopes(b, s, el, share, impact)
	if err != nil {
		return fail(err)
	}
	res.Members = make([]MemberResult, len(lines.Members))
	assess := make([]rating.Assessment, len(lines.Members))
	for i, l := range lines.Members {
		dead := analysis.DeadLoad(lines.X, l.Ordinates, b.DeadLoadKNPerM)
		inv := b.Members[l.Label]
		exL := rating.Loading{Demand: demand(dead, ex[i])}
		prL := rating.Loading{Demand: demand(dead, pr[i])}
		if r, ok := refs[inv.ReferenceTrain]; ok && inv.HasStoredRating() {
			d := demand(dead, r[i])
			exL.Reference, prL.Reference = &d, &d
		}
		a := rating.Assess(inv, exL, prL, s.Method, s.Thresholds)
		for _, f := range append(append([]rating.Factor{}, a.Existing...), a.Proposed...) {
			if math.IsNaN(f.RF) || math.IsInf(f.RF, 0) {
				// A number that is not one must never read as "no rating factor".
				return fail(fmt.Errorf("member %s: %s rating factor is %v (check its capacity and the settings)", l.Label, f.Sense, f.RF))
			}
		}
		assess[i] = a
		res.Members[i] = MemberResult{Label: l.Label, Kind: l.Kind, Dead: dead, Existing: ex[i], Proposed: pr[i], Assessment: a}
	}
	if err := w.checkFatigue(b, s, t.SpanM(), lines, &res); err != nil {
		return fail(err)
	}
	res.Summary = rating.Summarise(assess)
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

// scenarioEnvelope is the envelope over a scenario's trains, each member's extreme keeping
// the train that governs it. Values carry the truss share; the dynamic allowance is kept
// apart as Impact.
func (w *Screener) scenarioEnvelope(l *envelope.Lines, trains []*envelope.Load, share, impact float64) ([]Envelope, error) {
	if len(trains) == 0 {
		return nil, fmt.Errorf("no trains")
	}
	out := make([]envelope.Extremes, l.Members())
	opt := envelope.Options{Share: share}
	for k, ld := range trains {
		ext, err := w.sweep(l, ld, opt)
		if err != nil {
			return nil, err
		}
		if k == 0 {
			copy(out, ext)
			continue
		}
		envelope.Merge(out, ext)
	}
	env := make([]Envelope, len(out))
	for i, e := range out {
		env[i] = Envelope{Max: e.Max, Min: e.Min, Impact: impact}
	}
	return env, nil
}

// referenceEnvelopes computes the envelopes of the reference trains that the bridge's stored
// rating factors name.
func (w *Screener) referenceEnvelopes(b Bridge, s *Settings, l *envelope.Lines, share, impact float64) (map[string][]Envelope, error) {
	names := map[string]bool{}
	for _, m := range b.Members {
		// A stored rating factor rates a sense without a capacity; one with both capacities
		// never uses it.
		if m.HasStoredRating() && !(m.HasCapacity(rating.Tension) && m.HasCapacity(rating.Compression)) {
			names[m.ReferenceTrain] = true
		}
	}
	sorted := make([]string, 0, len(names))
	for n := range names {
		sorted = append(sorted, n)
	}
	sort.Strings(sorted)
	out := map[string][]Envelope{}
	for _, n := range sorted {
		ld, ok := s.References[n]
		if !ok {
			return nil, fmt.Errorf("reference train %q of a stored rating factor is not known (import it, or name a built-in model)", n)
		}
		env, err := w.scenarioEnvelope(l, []*envelope.Load{ld}, share, impact)
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
