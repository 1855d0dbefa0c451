package floor

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// The kinds of floor element, as they stand beside the truss members' kinds in results.
const (
	KindStringer  truss.Kind = "stringer"
	KindFloorBeam truss.Kind = "floor-beam"
)

// Effect is the load effect an element is rated for.
type Effect string

// The effects rated: bending moment (kN·m, sagging positive) and shear (kN).
const (
	Moment Effect = "moment"
	Shear  Effect = "shear"
)

// Suffix is the ending of a result's label: ":M" for the moment, ":V" for the shear.
func (e Effect) Suffix() string {
	if e == Moment {
		return ":M"
	}
	return ":V"
}

// Assumed values where the inventory gives none (assumptions of this program, not from a
// standard: give the inventory's own values).
const (
	// DefaultStringerSpacingM is the distance between a track's two stringer lines: the rail
	// centres of standard gauge (1.435 m between the rails' inner faces plus a rail head),
	// rounded up to 1.5 m, as if each stringer stood under its rail.
	DefaultStringerSpacingM = 1.5
	// DefaultStringerDeadKNPerM is the dead load per stringer line: its half of the track
	// (rail, fastenings, timber sleepers, guard rail) and its own weight.
	DefaultStringerDeadKNPerM = 2.5
	// DefaultFloorBeamDeadKNPerM is a floor beam's own weight per metre.
	DefaultFloorBeamDeadKNPerM = 3.0
)

// System is one bridge's floor system.
type System struct {
	// PanelX are the deck panel points (m, ascending): a floor beam stands at each, a
	// stringer spans each panel.
	PanelX []float64
	// Tracks is the number of tracks (at least 1).
	Tracks int
	// TrussSpacingM is the distance between the main trusses, centre to centre, which is the
	// floor beams' span; 0: not known, and the floor beams are then not rated.
	TrussSpacingM float64
	// TrackOffsetsM is each track's offset from the bridge's centre line, positive toward
	// truss A; nil: every track on the centre line (for one track, a centred track).
	TrackOffsetsM []float64
	// StringerSpacingM is the distance between a track's two stringer lines; 0: the default.
	StringerSpacingM float64
	// StringerDeadKNPerM is the dead load per stringer line, FloorBeamDeadKNPerM a floor
	// beam's own weight per metre; 0: the defaults.
	StringerDeadKNPerM, FloorBeamDeadKNPerM float64
}

// Element is one rated effect of one floor element: its label, the track quantity its live
// load follows and the factor on it, its dead-load effect and its determinant length.
type Element struct {
	// Label is the result's label: the element's label and the effect's suffix ("S1-3:M").
	Label string
	// Element is the inventory's label: "S<track>-<panel>" for the stringers of a track in a
	// panel (panels 1 to n from the left bearing), "FB<point>" for the floor beam at a deck
	// panel point (0 to n).
	Element string
	Kind    truss.Kind
	Effect  Effect
	// Dead is the dead-load effect (kN·m or kN).
	Dead float64
	// Track (stringers, 1-based) and Point (floor beams: the panel point; stringers: the
	// panel's left point).
	Track, Point int
	// factor times the track quantity is the element's live effect.
	factor float64
	src    source
	// impact describes the element for its dynamic allowance.
	impact elementLength
}

type sourceKind uint8

const (
	srcMoment   sourceKind = iota // the stringer span's absolute largest moment, full track
	srcShear                      // the stringer span's end shear, full track
	srcReaction                   // the floor beam's reaction from one track
)

type source struct {
	kind  sourceKind
	index int // the panel (moment, shear) or the panel point (reaction)
}

// Notes say what could not be rated and what was assumed.
type Notes struct {
	// FloorBeamsNotRated counts the floor beams left unrated because the truss spacing is not
	// known.
	FloorBeamsNotRated int
	// Assumed lists the defaults used, in words.
	Assumed []string
}

// StringerLabel is the inventory label of track's stringers in panel (both 1-based).
func StringerLabel(track, panel int) string {
	return "S" + strconv.Itoa(track) + "-" + strconv.Itoa(panel)
}

// FloorBeamLabel is the inventory label of the floor beam at panel point.
func FloorBeamLabel(point int) string { return "FB" + strconv.Itoa(point) }

// Labels lists the inventory labels of the floor elements of a bridge with panels panels
// and tracks tracks.
func Labels(panels, tracks int) []string {
	var out []string
	for t := 1; t <= max(tracks, 1); t++ {
		for p := 1; p <= panels; p++ {
			out = append(out, StringerLabel(t, p))
		}
	}
	for j := 0; j <= panels; j++ {
		out = append(out, FloorBeamLabel(j))
	}
	return out
}

// IsLabel says whether label has the form of a floor element's label (S<t>-<p> or FB<j>),
// whatever the bridge.
func IsLabel(label string) bool {
	digits := func(s string) bool {
		if s == "" || len(s) > 4 {
			return false
		}
		for _, r := range s {
			if r < '0' || r > '9' {
				return false
			}
		}
		return true
	}
	if rest, ok := strings.CutPrefix(label, "FB"); ok {
		return digits(rest)
	}
	if rest, ok := strings.CutPrefix(label, "S"); ok {
		for i := 0; i < len(rest); i++ {
			if rest[i] == '-' {
				return digits(rest[:i]) && digits(rest[i+1:])
			}
		}
	}
	return false
}

// check validates the system and fills in the defaults.
func (s System) check() (System, Notes, error) {
	var n Notes
	if len(s.PanelX) < 2 {
		return s, n, fmt.Errorf("floor system: need at least two panel points, got %d", len(s.PanelX))
	}
	for j := 1; j < len(s.PanelX); j++ {
		if !(s.PanelX[j] > s.PanelX[j-1]) {
			return s, n, fmt.Errorf("floor system: panel points must ascend, %v after %v", s.PanelX[j], s.PanelX[j-1])
		}
	}
	s.Tracks = max(s.Tracks, 1)
	if s.TrackOffsetsM != nil && len(s.TrackOffsetsM) != s.Tracks {
		return s, n, fmt.Errorf("floor system: %d track offsets for %d tracks", len(s.TrackOffsetsM), s.Tracks)
	}
	for name, v := range map[string]float64{"truss spacing": s.TrussSpacingM, "stringer spacing": s.StringerSpacingM,
		"stringer dead load": s.StringerDeadKNPerM, "floor-beam dead load": s.FloorBeamDeadKNPerM} {
		if !(v >= 0) || math.IsInf(v, 0) {
			return s, n, fmt.Errorf("floor system: %s must be 0 (not given) or positive, got %v", name, v)
		}
	}
	if s.StringerSpacingM == 0 {
		s.StringerSpacingM = DefaultStringerSpacingM
		n.Assumed = append(n.Assumed, fmt.Sprintf("stringer lines %g m apart (assumed: rail centres of standard gauge)", DefaultStringerSpacingM))
	}
	if s.StringerDeadKNPerM == 0 {
		s.StringerDeadKNPerM = DefaultStringerDeadKNPerM
		n.Assumed = append(n.Assumed, fmt.Sprintf("stringer dead load %g kN/m per line (assumed)", DefaultStringerDeadKNPerM))
	}
	if s.FloorBeamDeadKNPerM == 0 {
		s.FloorBeamDeadKNPerM = DefaultFloorBeamDeadKNPerM
		if s.TrussSpacingM > 0 {
			n.Assumed = append(n.Assumed, fmt.Sprintf("floor-beam self-weight %g kN/m (assumed)", DefaultFloorBeamDeadKNPerM))
		}
	}
	if s.TrackOffsetsM == nil {
		s.TrackOffsetsM = make([]float64, s.Tracks)
		if s.Tracks > 1 {
			n.Assumed = append(n.Assumed, fmt.Sprintf("track offsets not given: all %d tracks taken on the centre line (the largest floor-beam moment for their load; give the offsets for the shears)", s.Tracks))
		}
	}
	if b := s.TrussSpacingM; b > 0 {
		for t, e := range s.TrackOffsetsM {
			if math.Abs(e)+s.StringerSpacingM/2 > b/2+1e-9 {
				return s, n, fmt.Errorf("floor system: track %d at offset %g m puts a stringer line outside the trusses (%g m apart, stringers %g m apart)", t+1, e, b, s.StringerSpacingM)
			}
		}
	}
	return s, n, nil
}

// Elements lists the rated effects of the system's floor elements: for each track and panel
// the stringers' moment and end shear (one stringer line: the two lines of a track carry equal
// halves of it), then for each panel point the floor beam's moment and end shear (when the
// truss spacing is known).
func (s System) Elements() ([]Element, Notes, error) {
	s, notes, err := s.check()
	if err != nil {
		return nil, notes, err
	}
	n := len(s.PanelX) - 1
	var out []Element
	q := s.StringerDeadKNPerM
	for t := 1; t <= s.Tracks; t++ {
		for j := 0; j < n; j++ {
			p := s.PanelX[j+1] - s.PanelX[j]
			base := StringerLabel(t, j+1)
			il := elementLength{kind: KindStringer, panelM: p, spacingM: s.StringerSpacingM}
			// Each line carries half its track's axle loads (the two rails).
			out = append(out,
				Element{Label: base + Moment.Suffix(), Element: base, Kind: KindStringer, Effect: Moment, Track: t, Point: j,
					Dead: q * p * p / 8, factor: 0.5, src: source{srcMoment, j}, impact: il},
				Element{Label: base + Shear.Suffix(), Element: base, Kind: KindStringer, Effect: Shear, Track: t, Point: j,
					Dead: q * p / 2, factor: 0.5, src: source{srcShear, j}, impact: il})
		}
	}
	b := s.TrussSpacingM
	if !(b > 0) {
		notes.FloorBeamsNotRated = n + 1
		return out, notes, nil
	}
	ys := s.stringerLines()
	mCoef, vCoef := liveCoefficients(b, ys)
	for j := 0; j <= n; j++ {
		left, right := 0.0, 0.0
		if j > 0 {
			left = s.PanelX[j] - s.PanelX[j-1]
		}
		if j < n {
			right = s.PanelX[j+1] - s.PanelX[j]
		}
		// Dead load: the stringer lines' reactions (every track, always there) and the beam's
		// own weight. The largest moments of the two are added even where they stand at
		// different sections (conservative; common practice for a screening).
		r := q * (left + right) / 2
		var pts []pointLoad
		for _, tr := range ys {
			for _, y := range tr {
				pts = append(pts, pointLoad{y: y, p: r})
			}
		}
		g := s.FloorBeamDeadKNPerM
		mD, vD := beamMaxima(b, pts)
		base := FloorBeamLabel(j)
		il := elementLength{kind: KindFloorBeam, end: j == 0 || j == n, panelM: max(left, right), spacingM: b, spanM: b}
		out = append(out,
			Element{Label: base + Moment.Suffix(), Element: base, Kind: KindFloorBeam, Effect: Moment, Point: j,
				Dead: mD + g*b*b/8, factor: mCoef, src: source{srcReaction, j}, impact: il},
			Element{Label: base + Shear.Suffix(), Element: base, Kind: KindFloorBeam, Effect: Shear, Point: j,
				Dead: vD + g*b/2, factor: vCoef, src: source{srcReaction, j}, impact: il})
	}
	return out, notes, nil
}

// stringerLines gives, per track, where its two stringer lines meet the floor beams, measured
// from truss A (m).
func (s System) stringerLines() [][2]float64 {
	out := make([][2]float64, s.Tracks)
	for t, e := range s.TrackOffsetsM {
		c := s.TrussSpacingM/2 - e
		out[t] = [2]float64{c - s.StringerSpacingM/2, c + s.StringerSpacingM/2}
	}
	return out
}

type pointLoad struct{ y, p float64 }

// beamMaxima gives a simple beam's largest sagging moment and largest end reaction under
// point loads (the moment's maximum stands under a load).
func beamMaxima(span float64, pts []pointLoad) (m, v float64) {
	ra, rb := 0.0, 0.0
	for _, pl := range pts {
		ra += pl.p * (span - pl.y) / span
		rb += pl.p * pl.y / span
	}
	for _, at := range pts {
		m = max(m, momentAt(span, at.y, pts))
	}
	return m, max(ra, rb)
}

// liveCoefficients are the floor beam's largest moment and end shear per unit reaction of
// one track (each stringer line bringing half of it), over each track loaded alone and all
// tracks loaded at once (as the trusses are loaded; trains on different tracks stand
// independently, and with influences that are never negative every track's largest
// reaction adds).
func liveCoefficients(b float64, lines [][2]float64) (m, v float64) {
	cases := make([][]int, 0, len(lines)+1)
	all := make([]int, len(lines))
	for t := range lines {
		cases = append(cases, []int{t})
		all[t] = t
	}
	if len(lines) > 1 {
		cases = append(cases, all)
	}
	for _, c := range cases {
		var pts []pointLoad
		for _, t := range c {
			for _, y := range lines[t] {
				pts = append(pts, pointLoad{y: y, p: 0.5})
			}
		}
		mm, vv := beamMaxima(b, pts)
		m, v = max(m, mm), max(v, vv)
	}
	return m, v
}

// Analyser computes the live effects of floor systems, reusing its scratch space; one per
// goroutine. Within a bridge (between Resets) it sweeps each train once per distinct panel
// pair and keeps each train's results, so that a train in both scenarios costs once.
type Analyser struct {
	calc  envelope.Calculator
	lines map[[2]float64]*envelope.Lines
	swept map[sweepKey][2]envelope.Extreme
	peaks map[peakKey]Peak
	track map[*envelope.Load]trackLive
	ext   []envelope.Extremes
	x     []float64 // the panel points the kept results are for
	// Memo, where set, keeps the sweeps and moments across bridges and analysers (memo.go).
	Memo *Memo
}

type peakKey struct {
	ld   *envelope.Load
	span float64
}

type sweepKey struct {
	ld          *envelope.Load
	left, right float64
}

// trackLive are one train's effects of one track's full load: the stringer spans' largest
// moments and end shears per panel, and the floor beams' reactions per panel point.
type trackLive struct {
	moment, shear, reaction []envelope.Extreme
}

// pairSweep sweeps the train over two panels of lengths left and right (right 0: one panel)
// and gives the largest end shear of the left panel's stringer (line 1 at the support falling
// to 0 over the panel: also an end floor beam's reaction) and, with two panels, the largest
// reaction of the floor beam between them (a triangle of height 1), each with the line
// starting at 0. The two lines share one sweep.
func (a *Analyser) pairSweep(left, right float64, ld *envelope.Load) ([2]envelope.Extreme, error) {
	if a.lines == nil {
		a.lines, a.swept = map[[2]float64]*envelope.Lines{}, map[sweepKey][2]envelope.Extreme{}
	}
	sk := sweepKey{ld, left, right}
	if r, ok := a.swept[sk]; ok {
		return r, nil
	}
	if r, ok := a.Memo.sweep(sk); ok {
		a.swept[sk] = r
		return r, nil
	}
	k := [2]float64{left, right}
	l, ok := a.lines[k]
	if !ok {
		var err error
		if right == 0 {
			l, err = envelope.NewLines([]float64{0, left}, [][]float64{{1, 0}})
		} else {
			l, err = envelope.NewLines([]float64{0, left, left + right}, [][]float64{{1, 0, 0}, {0, 1, 0}})
		}
		if err != nil {
			return [2]envelope.Extreme{}, err
		}
		a.lines[k] = l
	}
	var err error
	a.ext, err = a.calc.Envelope(l, ld, envelope.Options{}, a.ext[:0])
	if err != nil {
		return [2]envelope.Extreme{}, err
	}
	var r [2]envelope.Extreme
	r[0] = a.ext[0].Max
	if right > 0 {
		r[1] = a.ext[1].Max
	}
	a.swept[sk] = r
	a.Memo.keepSweep(sk, r)
	return r, nil
}

// live sweeps one train over the track's floor-system lines.
func (a *Analyser) live(x []float64, ld *envelope.Load) (trackLive, error) {
	if tl, ok := a.track[ld]; ok {
		return tl, nil
	}
	n := len(x) - 1
	tl := trackLive{moment: make([]envelope.Extreme, n), shear: make([]envelope.Extreme, n), reaction: make([]envelope.Extreme, n+1)}
	if a.peaks == nil {
		a.peaks, a.track = map[peakKey]Peak{}, map[*envelope.Load]trackLive{}
	}
	for j := 0; j < n; j++ {
		p := x[j+1] - x[j]
		k := peakKey{ld, p}
		pk, ok := a.peaks[k]
		if !ok {
			if pk, ok = a.Memo.peak(k); !ok {
				var err error
				if pk, err = MaxMoment(ld.Train(), p); err != nil {
					return tl, err
				}
				a.Memo.keepPeak(k, pk)
			}
			a.peaks[k] = pk
		}
		tl.moment[j] = shift(pk.Extreme, x[j])
		right := 0.0
		if j+1 < n {
			right = x[j+2] - x[j+1]
		}
		r, err := a.pairSweep(p, right, ld)
		if err != nil {
			return tl, err
		}
		// Both ends and both directions: the span is its own mirror image.
		tl.shear[j] = shift(r[0], x[j])
		if j+1 < n {
			tl.reaction[j+1] = shift(r[1], x[j])
		}
	}
	tl.reaction[0] = tl.shear[0]
	tl.reaction[n] = mirror(tl.shear[n-1], x[n-1], x[n])
	a.track[ld] = tl
	return tl, nil
}

// mirror gives the placement of an extreme found on a line over [a, b] for the line's mirror
// image: the same train running the other way.
func mirror(e envelope.Extreme, a, b float64) envelope.Extreme {
	if e.Loaded {
		e.HeadM = a + b - e.HeadM
		e.LoadedFromM, e.LoadedToM = a+b-e.LoadedToM, a+b-e.LoadedFromM
		e.Direction = 1 - e.Direction
	}
	return e
}

// shift moves a placement found on lines starting at 0 to the bridge's coordinates.
func shift(e envelope.Extreme, x0 float64) envelope.Extreme {
	if e.Loaded {
		e.HeadM += x0
		e.LoadedFromM += x0
		e.LoadedToM += x0
	}
	return e
}

// Live gives every element's largest live effect (Max; Min is the empty bridge's zero, the
// effects being one-signed) under the trains, before the dynamic allowance, each naming the
// train that governs it.
func (a *Analyser) Live(s System, els []Element, loads []*envelope.Load) ([]envelope.Extremes, error) {
	if !slices.Equal(a.x, s.PanelX) {
		// Another bridge: the trains' results kept are for the panels of the last one.
		a.Reset()
		a.x = slices.Clone(s.PanelX)
	}
	out := make([]envelope.Extremes, len(els))
	for _, ld := range loads {
		tl, err := a.live(s.PanelX, ld)
		if err != nil {
			return nil, fmt.Errorf("floor system, train %s: %w", ld.Name(), err)
		}
		for i, e := range els {
			var src envelope.Extreme
			switch e.src.kind {
			case srcMoment:
				src = tl.moment[e.src.index]
			case srcShear:
				src = tl.shear[e.src.index]
			default:
				src = tl.reaction[e.src.index]
			}
			src.Value *= e.factor
			if src.Value > out[i].Max.Value {
				out[i].Max = src
			}
		}
	}
	return out, nil
}

// Reset forgets the kept lines, sweeps and moments. Live resets by itself when the panel
// points change; a caller resets between bridges to keep the memory small, and must reset
// when a prepared train it swept before may have changed.
func (a *Analyser) Reset() {
	clear(a.lines)
	clear(a.swept)
	clear(a.peaks)
	clear(a.track)
}

// ResultEffect reads a result's label ("S1-3:M", "FB4:V"): the element's label and the
// effect; ok false for a label that is not a floor element's result (a truss member's).
func ResultEffect(label string) (element string, eff Effect, ok bool) {
	base, suffix, found := strings.Cut(label, ":")
	if !found || !IsLabel(base) {
		return "", "", false
	}
	switch suffix {
	case "M":
		return base, Moment, true
	case "V":
		return base, Shear, true
	}
	return "", "", false
}

// KindOf is the kind of the element a result's label names: stringer or floor-beam, or
// "truss member" for any other label.
func KindOf(label string) string {
	base, _, ok := ResultEffect(label)
	switch {
	case !ok:
		return "truss member"
	case strings.HasPrefix(base, "FB"):
		return string(KindFloorBeam)
	}
	return string(KindStringer)
}
