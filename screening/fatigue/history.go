package fatigue

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// Direction is the way a train runs over the bridge (envelope's own).
type Direction = envelope.Direction

// The two directions of a passage.
const (
	LeftToRight = envelope.LeftToRight
	RightToLeft = envelope.RightToLeft
)

// ErrNotAPassage is returned (wrapped, with the reason) for a train that describes an envelope
// of loadings rather than one definite train: a uniform load of variable length, a part
// applied only where unfavourable or cut at the unfavourable length, or a part reaching
// indefinitely ahead or behind. Such a load has no single force history.
var ErrNotAPassage = errors.New("not one definite train")

// Train is a train prepared for passages: its axles and the ends of its distributed parts as
// offsets behind its front, ordered by offset. It is read-only and safe for concurrent use.
type Train struct {
	name  string
	items []item
	// totalKN is the sum of the loads (axles, and parts' q times their length).
	totalKN float64
	// parts: the train has distributed parts.
	parts bool
	// The consist's structure, for passages with fewer vehicles in its last group (see
	// steady): fixed holds every load but the last group's, unit one vehicle of the last
	// group from its front, r0 where that group begins, unitLen its vehicles' length, count
	// the number of them in this train, and tailM the offset beyond which the train is a
	// plain repetition of that vehicle (the largest of r0 and the parts' ends).
	fixed, unit        []item
	r0, unitLen, tailM float64
	count              int
}

// item is an axle (w = load, kN) or one end of a distributed part (w = +q at its front end,
// -q at its rear end, kN/m), at d metres behind the train's front.
type item struct {
	d    float64
	w    float64
	part bool
}

// PrepareTrain checks that t is one definite train and prepares it. A consist whose last group
// varies in count runs with its largest count (the longest train the scenario allows); a
// scenario that knows its trains' real lengths names a train of fixed count.
//
// Distributed parts applied whole over a finite length are exact (their effect is piecewise
// quadratic in the train's position). Parts applied only where unfavourable (Load Model 71),
// cut at the unfavourable length (Cooper's trailing load), or reaching indefinitely ahead or
// behind, and uniform loads of variable length, are refused with an error wrapping
// ErrNotAPassage: they are envelopes of many loadings, built for strength checks, and no real
// train applies them; counting their cycles would count cycles that never happen.
func PrepareTrain(t *traffic.Train) (*Train, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("train %q: %w", t.Name, err)
	}
	if t.Uniform != nil {
		return nil, fmt.Errorf("train %q is a uniform load of variable length, not a passage of one train: %w", t.Name, ErrNotAPassage)
	}
	tr := &Train{name: t.Name}
	if n := len(t.Consist); n > 0 {
		last := t.Consist[n-1]
		tr.count, tr.r0, tr.unitLen = last.Max, t.FixedLengthM(), last.Vehicle.LengthM
		for _, a := range t.Axles(0) {
			tr.fixed = append(tr.fixed, item{d: a.AtM, w: a.LoadKN})
		}
		for _, a := range last.Vehicle.Axles {
			tr.unit = append(tr.unit, item{d: a.AtM, w: a.LoadKN})
		}
	}
	tr.tailM = tr.r0
	for i, p := range t.Parts {
		switch {
		case p.Mode != traffic.Whole:
			return nil, fmt.Errorf("train %q, parts[%d]: a part applied %s is an envelope of loadings, not a passage of one train: %w", t.Name, i, p.Mode, ErrNotAPassage)
		case math.IsInf(p.FromM, 0) || math.IsInf(p.ToM, 0):
			return nil, fmt.Errorf("train %q, parts[%d]: a part reaching indefinitely ahead or behind never leaves the bridge empty: %w", t.Name, i, ErrNotAPassage)
		}
		tr.fixed = append(tr.fixed, item{d: p.FromM, w: p.QKNPerM, part: true}, item{d: p.ToM, w: -p.QKNPerM, part: true})
		tr.parts = true
		tr.tailM = max(tr.tailM, p.FromM, p.ToM)
	}
	tr.items = tr.itemsWith(tr.count, nil)
	if len(tr.items) == 0 {
		return nil, fmt.Errorf("train %q has no loads: %w", t.Name, ErrNotAPassage)
	}
	for _, it := range tr.items {
		if !it.part {
			tr.totalKN += it.w
		}
	}
	for _, p := range t.Parts {
		tr.totalKN += p.QKNPerM * (p.ToM - p.FromM)
	}
	return tr, nil
}

// itemsWith lays out the train with n vehicles in its last group, ordered by offset.
func (tr *Train) itemsWith(n int, dst []item) []item {
	dst = append(dst[:0], tr.fixed...)
	for v := range n {
		front := tr.r0 + float64(v)*tr.unitLen
		for _, it := range tr.unit {
			it.d += front
			dst = append(dst, it)
		}
	}
	slices.SortStableFunc(dst, func(a, b item) int { return cmp.Compare(a.d, b.d) })
	return dst
}

// Name is the train's name.
func (tr *Train) Name() string { return tr.name }

// Loads is the number of axles and part ends a passage moves over the bridge.
func (tr *Train) Loads() int { return len(tr.items) }

// Line is one member's influence line prepared for passages: the ordinates eta (kN per kN) at
// ascending deck panel points x (m), linear between them and zero beyond x[0] and x[last].
// Only the vertices where the line kinks or jumps change a passage's course, so only those are
// kept, for each direction. It is read-only and safe for concurrent use.
type Line struct {
	x0, xl float64
	// maxAbs is the largest ordinate's size.
	maxAbs float64
	// dir[d] is the line as a train running in direction d sees it, mirrored for right to
	// left so that every passage runs left to right.
	dir [2]*kinks
	// own holds the kinks NewLine made (dir points at them, or, for a mirror image, at the
	// other line's).
	own [2]kinks
	// base, when set, is a line whose passages this one counts, its ranges factor times
	// (CountedAs, proportional.go).
	base   *Line
	factor float64
}

// Mirror is the line of the mirror-image member: what a train running one way does to l, it
// does running the other way to the mirror. It shares l's storage, so that passages counted
// over one serve the other (Calculator keeps them by the line's kinks).
func (l *Line) Mirror() *Line {
	m := *l
	m.dir[0], m.dir[1] = l.dir[1], l.dir[0]
	if l.base != nil {
		m.base = l.base.Mirror()
	}
	return &m
}

// Matches reports whether o, read left to right, is l read left to right (same) or right to
// left (mirror), to within 1e-9 of the larger line's largest ordinate and of its span: a
// member of a symmetric truss and its mirror image, or two members with the same line.
func (l *Line) Matches(o *Line) (same, mirror bool) {
	tol := 1e-9 * max(l.maxAbs, o.maxAbs, math.SmallestNonzeroFloat64)
	xtol := 1e-9 * max(l.xl-l.x0, 1)
	eq := func(a, b *kinks) bool {
		if len(a.x) != len(b.x) {
			return false
		}
		for j := range a.x {
			// slopes are ordinates per metre: their tolerance is the ordinates' over the span
			if math.Abs(a.x[j]-b.x[j]) > xtol || math.Abs(a.jump[j]-b.jump[j]) > tol ||
				math.Abs(a.slope[j]-b.slope[j]) > tol || math.Abs(a.eta0[j]-b.eta0[j]) > tol || math.Abs(a.area[j]-b.area[j]) > tol*max(l.xl-l.x0, 1) {
				return false
			}
		}
		return true
	}
	return eq(l.dir[0], o.dir[0]), eq(l.dir[0], o.dir[1])
}

// kinks are a line's vertices where its value jumps (at a bearing with a non-zero ordinate) or
// its slope changes, with the jump and the change of slope as a point crosses them rightwards,
// and the line's integral from x0 at each (for distributed parts).
type kinks struct {
	x, jump, slope []float64
	// eta0 is the ordinate just right of each vertex, area the integral from x[0] (both for
	// the value of a part standing partly on the bridge).
	eta0, area []float64
}

// NewLine prepares an influence line. x must ascend strictly, with at least two points, and
// every value be finite. The inputs are not modified nor kept.
func NewLine(x, eta []float64) (*Line, error) {
	if len(x) < 2 || len(eta) != len(x) {
		return nil, fmt.Errorf("influence line: need at least 2 panel points and one ordinate each, got %d points and %d ordinates", len(x), len(eta))
	}
	for k := range x {
		if math.IsNaN(x[k]) || math.IsInf(x[k], 0) || math.IsNaN(eta[k]) || math.IsInf(eta[k], 0) {
			return nil, fmt.Errorf("influence line: point %d: x %v, ordinate %v must be finite", k, x[k], eta[k])
		}
		if k > 0 && !(x[k] > x[k-1]) {
			return nil, fmt.Errorf("influence line: panel points must ascend, point %d at %v after %v", k, x[k], x[k-1])
		}
	}
	n := len(x)
	l := &Line{x0: x[0], xl: x[n-1]}
	for _, e := range eta {
		l.maxAbs = max(l.maxAbs, math.Abs(e))
	}
	// Both directions' kinks (five lists of at most n each) and the mirrored line are worked
	// out in scratch (on the stack for a line of up to 21 points), and what the kinks keep is
	// copied to one array: a screening builds a line for every member of every bridge.
	var stack [12 * 21]float64
	tmp := stack[:]
	if 12*n > len(stack) {
		tmp = make([]float64, 12*n)
	}
	mx, meta := tmp[10*n:11*n], tmp[11*n:12*n]
	for j := range x {
		mx[j] = x[0] + x[n-1] - x[n-1-j]
		meta[j] = eta[n-1-j]
	}
	k0, k1 := kinksOf(x, eta, tmp[:5*n]), kinksOf(mx, meta, tmp[5*n:10*n])
	n0 := 5 * len(k0.x)
	buf := make([]float64, n0+5*len(k1.x))
	l.own[0], l.own[1] = k0.copyTo(buf[:n0]), k1.copyTo(buf[n0:])
	l.dir[0], l.dir[1] = &l.own[0], &l.own[1]
	return l, nil
}

// copyTo is k with its lists copied to buf (5 len(k.x) long).
func (k kinks) copyTo(buf []float64) kinks {
	n := len(k.x)
	out := kinks{x: buf[0:n:n], jump: buf[n : 2*n : 2*n], slope: buf[2*n : 3*n : 3*n], eta0: buf[3*n : 4*n : 4*n], area: buf[4*n : 5*n : 5*n]}
	copy(out.x, k.x)
	copy(out.jump, k.jump)
	copy(out.slope, k.slope)
	copy(out.eta0, k.eta0)
	copy(out.area, k.area)
	return out
}

// kinksOf keeps the vertices where a line kinks or jumps. A slope change below 1e-12 of the
// steepest slope the ordinates could make is rounding noise of a straight line (it moves a
// force by less than 1e-12 of the largest it could be) and is not kept; the bearings are.
// The lists take their storage from buf (5 len(x) long).
func kinksOf(x, eta []float64, buf []float64) kinks {
	n := len(x)
	minDx, scale := math.Inf(1), 0.0
	for j := range x {
		if j > 0 {
			minDx = min(minDx, x[j]-x[j-1])
		}
		scale = max(scale, math.Abs(eta[j]))
	}
	noise := 1e-12 * scale / minDx
	k := kinks{x: buf[0:0:n], jump: buf[n : n : 2*n], slope: buf[2*n : 2*n : 3*n], eta0: buf[3*n : 3*n : 4*n], area: buf[4*n : 4*n : 5*n]}
	left, area := 0.0, 0.0
	for j := range x {
		right := 0.0
		if j+1 < n {
			right = (eta[j+1] - eta[j]) / (x[j+1] - x[j])
		}
		if j > 0 {
			area += (eta[j-1] + eta[j]) / 2 * (x[j] - x[j-1])
		}
		jump, e0 := 0.0, eta[j]
		switch j {
		case 0:
			jump = eta[0]
		case n - 1:
			jump, e0 = -eta[n-1], 0
		}
		if d := right - left; j == 0 || j == n-1 || math.Abs(d) > noise {
			k.x = append(k.x, x[j])
			k.jump = append(k.jump, jump)
			k.slope = append(k.slope, d)
			k.eta0 = append(k.eta0, e0)
			k.area = append(k.area, area)
		}
		left = right
	}
	return k
}

// Point is one point of a force history: the train's front at HeadM (in the coordinates of
// the line's x for either direction) and the member force Value (kN, tension positive).
type Point struct {
	HeadM, Value float64
}

// event: item it of the train reaches kink j with the front at s.
type event struct {
	s     float64
	it, j int32
}

// Calculator computes passages, keeping its scratch space between calls. It is not safe for
// concurrent use; give each goroutine its own. The zero value is ready to use.
type Calculator struct {
	// events is mergeKinks' output where no list is kept (valid within one History),
	// eventScratch its scratch; eventLists the merged lists kept for the current bridge, by
	// eventIndex (events.go).
	events       []event
	eventScratch []event
	eventLists   []eventList
	eventIndex   map[eventKey]int
	eventsKept   int             // the kept lists' capacity, in events
	extraEvents  []event         // extendEvents' scratch
	turnB        []float64       // passage's scratch: the turning points of the longer train
	dyn          []dynamicFactor // the dynamic factors computed last (assess.go)
	// Check's scratch, valid within one passage of yearly.
	hist   []Point
	turn   []float64
	cycles []Cycle
	stack  []float64
	rot    []float64 // RainflowRepeated's scratch
	// passages are the current member's passages counted so far (valid within one Check),
	// shorter the trains of fewer vehicles made for them (kept across calls).
	passages []passageCycles
	kept     map[passageKey]int // index in passages by train and line
	shorter  []shorterTrain
}

// History appends to dst[:0] the force history of one passage of tr over l in direction dir,
// at the full train load (scale it by the truss share), and returns it. It starts and ends
// with the bridge empty (value 0) and holds every position where the force changes course:
// every position where an axle or a part's end passes a kink of the line (both limits where
// an axle arriving or leaving at a bearing makes the force jump, and the value with the axle
// on the bearing between them) and every interior stationary point of a quadratic piece.
// Between consecutive points the force is linear or, with distributed parts, quadratic and
// monotonic, so the points hold every peak and valley of the passage exactly.
//
// Positions are those of the train's front in the coordinates the train sees: for right to
// left, measured from x[last] leftwards and shifted by x[0] (the mirrored line's).
func (c *Calculator) History(l *Line, tr *Train, dir Direction, dst []Point) []Point {
	o := passageOut{all: true, hist: dst[:0]}
	k := l.kinksFor(dir)
	c.walk(k, tr, c.eventsOf(k, tr), walkState{}, math.Inf(1), &o)
	if len(o.hist) == 0 {
		o.hist = append(o.hist, Point{l.x0, 0})
	}
	return o.hist
}

// TurningOf appends to dst[:0] the turning points of one passage (Turning of History, with the
// tolerance 1e-9 of the largest force the train could cause on the line, PassageTol) without
// keeping the history: what the fatigue check needs of a passage.
func (c *Calculator) TurningOf(l *Line, tr *Train, dir Direction, dst []float64) []float64 {
	o := passageOut{t: turning{tol: PassageTol(l, tr), dst: dst[:0]}}
	k := l.kinksFor(dir)
	c.walk(k, tr, c.eventsOf(k, tr), walkState{}, math.Inf(1), &o)
	if len(o.t.dst) == 0 {
		o.t.dst = append(o.t.dst, 0)
	}
	return o.t.dst
}

// PassageTol is 1e-9 of the largest force tr could cause on l: every load at the line's
// largest ordinate.
func PassageTol(l *Line, tr *Train) float64 {
	return 1e-9 * tr.totalKN * l.maxAbs
}

// kinksFor is the line as a train running in direction dir sees it.
func (l *Line) kinksFor(dir Direction) *kinks {
	if dir == RightToLeft {
		return l.dir[1]
	}
	return l.dir[0]
}

// passageOut receives a walk's points: every one (all, into hist: History), or only their
// turning points (t: TurningOf and the fatigue check).
type passageOut struct {
	all  bool
	hist []Point
	t    turning
}

func (o *passageOut) emit(s, v float64) {
	if o.all {
		o.hist = append(o.hist, Point{s, v})
		return
	}
	o.t.push(s, v)
}

// walkState is where a walk stands at the top of an iteration: the next group of events at
// index next (0: the walk has not begun), the front at s with the force v, its slope g and
// curvature cc there; and, for a walk gathering turning points, the number of them so far
// (turns), the last one's value and the sense (turning.dir).
type walkState struct {
	next             int
	s, v, g, cc      float64
	turns            int
	lastTurn, turnTo float64
}

// state is a walk's state (walkState) at the top of the iteration of the events from next.
func (o *passageOut) state(next int, s, v, g, cc float64) walkState {
	st := walkState{next: next, s: s, v: v, g: g, cc: cc, turns: len(o.t.dst), turnTo: o.t.dir}
	if len(o.t.dst) > 0 {
		st.lastTurn = o.t.dst[len(o.t.dst)-1]
	}
	return st
}

// walkThin is walk gathering turning points of a train of axles over a line without jumps:
// one event at a time, a group of events at one position ending where the next begins.
// At the top of each iteration v is the force with the front at sPrev and g its slope,
// every event before q applied; when open, the events at sPrev began with the slope before.
func (c *Calculator) walkThin(k *kinks, tr *Train, ev []event, from walkState, stop float64, o *passageOut) (snap walkState) {
	v, g, sPrev := from.v, from.g, from.s
	q := from.next
	if q == 0 {
		// Before the first event no load has reached the bridge.
		o.emit(ev[0].s-1, 0)
		v, g, sPrev = 0, 0, ev[0].s
	}
	snapped, open, before := false, false, g
	for ; q < len(ev); q++ {
		e := ev[q]
		if !open || e.s != sPrev {
			if open && !(before > 0 && g > 0) && !(before < 0 && g < 0) {
				o.emit(sPrev, v)
			}
			if !snapped && e.s >= stop {
				snap, snapped = o.state(q, sPrev, v, g, 0), true
			}
			if dt := e.s - sPrev; dt > 0 {
				v += g * dt
			}
			sPrev, before, open = e.s, g, true
		}
		g += tr.items[e.it].w * k.slope[e.j]
	}
	// The last event's value is passed: the final zero is set, not summed.
	o.emit(sPrev, v)
	o.emit(sPrev+1, 0)
	return snap
}

// walk visits the history of one passage of tr over k (events ev: eventsOf) from the state
// from (the zero state: the beginning), passing each point to o (see History), and returns
// the state at the top of the first iteration whose events are at or beyond stop (the zero
// state if none is).
//
// Gathering turning points only (not o.all) of a train of axles over a line without jumps
// (walkThin), a point on a straight stretch that goes on in the same sense (the slopes
// before and after it of one sign) is not passed:
// its neighbours' values bracket it (floating-point sums of terms of one sign are monotonic;
// the last event's point is passed, as the final zero is set rather than summed),
// and such a point never changes the turning points (turning.push keeps the last value of a
// run in one sense, and a value between its neighbours neither starts nor ends a run).
// Elsewhere (distributed parts: quadratic pieces; jumps at a bearing) every point is passed.
func (c *Calculator) walk(k *kinks, tr *Train, ev []event, from walkState, stop float64, o *passageOut) (snap walkState) {
	if len(ev) == 0 {
		return snap
	}
	last := int32(len(k.x) - 1)
	jumps := k.jump[0] != 0 || k.jump[last] != 0
	if !o.all && !jumps && !tr.parts {
		return c.walkThin(k, tr, ev, from, stop, o)
	}
	v, g, cc, sPrev := from.v, from.g, from.cc, from.s
	if from.next == 0 {
		// Before the first event no load has reached the bridge.
		o.emit(ev[0].s-1, 0)
		v, g, cc, sPrev = 0, 0, 0, ev[0].s
	}
	snapped := false
	// At the top of each iteration v, g, cc hold the force and its derivatives with the front
	// at sPrev, every event before g0 applied, and every point up to sPrev is emitted.
	for g0 := from.next; g0 < len(ev); {
		s := ev[g0].s
		if !snapped && s >= stop {
			snap, snapped = o.state(g0, sPrev, v, g, cc), true
		}
		g1 := g0 + 1
		for g1 < len(ev) && ev[g1].s == s {
			g1++
		}
		if dt := s - sPrev; dt > 0 {
			if cc != 0 {
				if t := -g / cc; t > 0 && t < dt {
					o.emit(sPrev+t, v+g*t/2) // v + g t + cc t²/2 at t = -g/cc
				}
				v += g*dt + cc*dt*dt/2
				g += cc * dt
			} else {
				v += g * dt
			}
		}
		o.emit(s, v)
		if jumps {
			// Axles arriving at the left bearing: the value with them on it; then those
			// leaving at the right bearing: the value after.
			arrive, leave := false, false
			for _, e := range ev[g0:g1] {
				if it := tr.items[e.it]; !it.part && e.j == 0 && k.jump[0] != 0 {
					v += it.w * k.jump[0]
					arrive = true
				}
			}
			if arrive {
				o.emit(s, v)
			}
			for _, e := range ev[g0:g1] {
				if it := tr.items[e.it]; !it.part && e.j == last && k.jump[last] != 0 {
					v += it.w * k.jump[last]
					leave = true
				}
			}
			if leave {
				o.emit(s, v)
			}
		}
		for _, e := range ev[g0:g1] {
			it := tr.items[e.it]
			if it.part {
				g += it.w * k.jump[e.j]
				cc += it.w * k.slope[e.j]
			} else {
				g += it.w * k.slope[e.j]
			}
		}
		sPrev = s
		g0 = g1
	}
	// After the last event every load has left: the value is zero but for rounding.
	o.emit(sPrev+1, 0)
	return snap
}

// Turning reduces a history to its turning points: the first value, each value where the
// history changes from rising to falling or back, and the last. A reversal by no more than
// tol is not one: a passage's history is exact, but values meant to be equal (a long train's
// identical wagons, the empty bridge between them) differ by rounding, and their wiggles would
// count cycles of a size far below any cut-off. Pass tol = 1e-9 times the largest force (see
// TurningTol); 0 keeps every reversal. It appends to dst[:0].
func Turning(h []Point, tol float64, dst []float64) []float64 {
	t := turning{tol: tol, dst: dst[:0]}
	for _, p := range h {
		t.push(p.HeadM, p.Value)
	}
	return t.dst
}

// turning gathers turning points one value at a time (see Turning).
type turning struct {
	tol float64
	dst []float64
	dir float64 // +1 rising, -1 falling, 0 not yet moved by more than tol
}

func (t *turning) push(_, v float64) {
	n := len(t.dst)
	if n == 0 {
		t.dst = append(t.dst, v)
		return
	}
	last := t.dst[n-1]
	switch {
	case t.dir == 0:
		if math.Abs(v-last) > t.tol {
			t.dir = math.Copysign(1, v-last)
			t.dst = append(t.dst, v)
		}
	case (v-last)*t.dir >= 0:
		t.dst[n-1] = v // on in the same sense: a further peak or valley
	case math.Abs(v-last) > t.tol:
		t.dir = -t.dir
		t.dst = append(t.dst, v)
	}
}

// TurningTol is the tolerance Turning takes for a history: 1e-9 of its largest force.
func TurningTol(h []Point) float64 {
	m := 0.0
	for _, p := range h {
		m = max(m, math.Abs(p.Value))
	}
	return 1e-9 * m
}
