package envelope

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// Direction is the way a train runs over the bridge.
type Direction int8

const (
	// LeftToRight: the train enters at x[0], front first.
	LeftToRight Direction = iota
	// RightToLeft: the train enters at x[last], front first.
	RightToLeft
)

func (d Direction) String() string {
	if d == RightToLeft {
		return "right-to-left"
	}
	return "left-to-right"
}

// MarshalText writes the direction as "left-to-right" or "right-to-left".
func (d Direction) MarshalText() ([]byte, error) { return []byte(d.String()), nil }

// Placement says where a train stands when it causes an extreme.
type Placement struct {
	// Loaded is false when the extreme is zero with no train on the bridge; the other fields
	// are then zero.
	Loaded    bool
	Direction Direction
	// HeadM is the position of the train's front, in the coordinates of x (it may lie beyond
	// the bridge when the train is partly on it).
	HeadM float64
	// Count is the number of vehicles in the consist's last group, which matters for a
	// variable consist; 0 for a train without vehicles.
	Count int
	// LengthM is the consist's length over buffers, or for a uniform load of variable length
	// the length of the loaded train (+Inf for one of unlimited length).
	LengthM float64
	// LoadedFromM and LoadedToM bound the stretch of the bridge under the train's loads.
	LoadedFromM, LoadedToM float64
	// TrailingM is the length of a distributed part cut at the unfavourable length (Cooper's
	// trailing load), from its start; 0 when it is cut at zero or the train has none.
	TrailingM float64
}

// Extreme is one extreme member force (kN, tension positive) and where the train stands.
type Extreme struct {
	Value float64
	// Train names the train that causes it.
	Train string
	Placement
}

// Extremes are a member's largest tension (Max >= 0) and largest compression (Min <= 0).
type Extremes struct {
	Max, Min Extreme
}

// Options scale the train's effect. The zero value applies the full train load and no
// dynamic allowance.
type Options struct {
	// Share is the fraction of the track's load that the truss carries (0.5 for one track
	// centred between two trusses, common practice); 0 means 1.
	Share float64
	// Dynamic is the dynamic allowance; its factor is taken at the span x[last] - x[0] unless
	// it sets its own determinant length.
	Dynamic traffic.Dynamic
}

// Factor is the multiplier Options apply to the static effect of the full train load.
func (o Options) Factor(spanM float64) float64 {
	share := o.Share
	if share == 0 {
		share = 1
	}
	return share * o.Dynamic.Factor(spanM)
}

// Calculator sweeps trains over influence lines, keeping its scratch space between calls so
// that a screening run allocates little. A Calculator is not safe for concurrent use; give
// each goroutine its own. The zero value is ready to use.
//
// Nothing but storage carries from one call of Envelope to the next: reset starts each call.
// Within a call, each field is valid in these phases:
//   - m, maxV, minV, maxAt, minAt and runs, from reset to the end of the call: maxV[i] and
//     minV[i] are member i's largest and smallest force found so far (0, the empty bridge,
//     before any), maxAt[i] and minAt[i] where (run -1 for none), and runs the sweeps made, in
//     order, that a found's run indexes.
//   - streams, curved, items and state, for a train (not a uniform load), from the start of
//     train to the end of the call: the streams the train needs, whether it has distributed
//     parts (curved streams), its items at the largest count swept, and per stream the
//     members' value, slope and curvature at the last event a sweep applied (t, in
//     sweepLinear only, where each member was last brought up to date).
//   - events, from buildEvents through the sweeps of the direction whose grid it was built
//     for: every position where an item reaches a vertex, in order. order and eventsTmp are
//     buildEvents' own scratch.
//   - ck, only while ck.ok: the state a sweep saved for the next, larger count of the same
//     direction; it is cleared when a direction starts and when the next sweep starts.
//   - snapV and snapAt, inside mirrorSweeps only: the left-to-right extremes it reads while
//     merging in the mirrored ones.
type Calculator struct {
	m       int
	streams []stream
	state   []sweepState
	maxV    []float64
	minV    []float64
	maxAt   []found
	minAt   []found
	items   []item
	events  []event
	// scratch for building events: the items by offset, the other half of the merge
	order     []int32
	eventsTmp []event
	curved    bool
	runs      []runInfo
	ck        checkpoint
	// the extremes of the left-to-right sweeps, read while the mirrored ones are merged in
	snapV  []float64
	snapAt []found
	// a rake's sweep by windows (windows.go): each member's best windows, the phases, and the
	// vehicles' forces at one phase
	wMax, wMin     []windowBest
	wPhases, wVals []float64
}

// plainSweeps turns off the sweeps' shortcuts, for the tests that compare each shortcut with
// the plain sweeps it stands for. Envelope takes every shortcut (the zero value).
type plainSweeps struct {
	// fullSweeps sweeps every count of a variable consist from the beginning instead of
	// resuming where the previous count left off.
	fullSweeps bool
	// bothSweeps sweeps right to left also over a truss that is its own mirror image instead
	// of taking those extremes from the mirror members' left-to-right sweeps.
	bothSweeps bool
	// allCounts sweeps every count of a variable consist from its min to its max instead of
	// only those that show the bridge different loadings (Load.counts).
	allCounts bool
	// denseCurved sweeps a train with distributed parts event by event over every member
	// instead of at each member's own kinks (sweepSparse).
	denseCurved bool
	// countSweeps sweeps a rake of identical vehicles count by count instead of by windows
	// of an endless train (windows.go).
	countSweeps bool
}

// MaxEvents bounds the positions one sweep visits: the train's axles and part ends, at the
// largest count of its last group that is swept, times the vertices of the influence lines.
// It keeps every index of a sweep within 32 bits and its scratch space within about 512 MB
// (two lists of 16-byte events). Trains read from input stay far below it (the limits of
// screening/traffic: 2,000 axles; a long truss has a few hundred vertices).
const MaxEvents = 1 << 24

// ErrTooLarge is returned (wrapped, with the train and the counts) for a train that cannot
// be swept within MaxEvents.
var ErrTooLarge = errors.New("train too large to sweep")

type runInfo struct {
	dir int
	cnt count
}

// Envelope computes every member's extremes under the train ld over the lines l, exactly,
// with values scaled by opt.Factor. It appends to out[:0] (pass the previous result to reuse
// its storage) and returns it, one entry per line in the order given to NewLines.
//
// Axle trains and their distributed parts are swept in both directions: each member's force
// is linear (quadratic with distributed parts) in the train's position between the positions
// where an axle or a part's end passes a panel point or a bearing, so the extremes are among
// those positions and the stationary points between them. One sweep serves all members.
// A variable consist is swept at every count that shows the bridge a different loading (see
// Load); a uniform load of variable length is placed over the best feasible interval.
//
// A train that would need more than MaxEvents positions per sweep is refused with an error
// wrapping ErrTooLarge; nothing is computed for it.
func (c *Calculator) Envelope(l *Lines, ld *Load, opt Options, out []Extremes) ([]Extremes, error) {
	return c.envelope(l, ld, opt, out, plainSweeps{})
}

// envelope is Envelope without the shortcuts that plain turns off.
func (c *Calculator) envelope(l *Lines, ld *Load, opt Options, out []Extremes, plain plainSweeps) ([]Extremes, error) {
	c.reset(l.m)
	if ld.uniform != nil {
		out = c.uniform(l, ld, out)
	} else {
		if err := ld.fits(l, plain); err != nil {
			return out[:0], err
		}
		if !plain.countSweeps && ld.rakeWindows(l) {
			out = c.windows(l, ld, out)
		} else {
			out = c.train(l, ld, out, plain)
		}
	}
	f := opt.Factor(l.SpanM())
	for i := range out {
		for _, e := range []*Extreme{&out[i].Max, &out[i].Min} {
			e.Value *= f
			e.Train = ld.name
		}
	}
	return out, nil
}

// fits refuses a train whose sweeps over l would exceed MaxEvents. The count is taken in
// floating point, which cannot overflow. Only the grids swept count: a truss that is its own
// mirror image is swept left to right alone (mirrorSweeps), and its mirror image's refined
// grid is never built.
func (ld *Load) fits(l *Lines, plain plainSweeps) error {
	n := ld.lastSwept(l.SpanM(), plain.allCounts)
	items := float64(len(ld.fixed)) + float64(n)*float64(len(ld.unit))
	gr := l.plainGrid(0)
	if ld.hasUnfav || ld.hasCut {
		gr = l.refinedGrid(0)
		if l.mirror == nil || plain.bothSweeps {
			if r := l.refinedGrid(1); len(r.x) > len(gr.x) {
				gr = r
			}
		}
	}
	vertices := len(gr.x)
	if events := items * float64(vertices); events > MaxEvents {
		return fmt.Errorf("train %q: sweeping %d vehicles in its last group (of %d to %d) over %d positions of the influence lines takes %.0f positions per sweep, more than the limit of %d: %w",
			ld.name, n, ld.nMin, ld.nMax, vertices, events, MaxEvents, ErrTooLarge)
	}
	return nil
}

func (c *Calculator) reset(m int) {
	c.m = m
	c.maxV = resize(c.maxV, m)
	c.minV = resize(c.minV, m)
	c.maxAt = slices.Grow(c.maxAt[:0], m)[:m]
	c.minAt = slices.Grow(c.minAt[:0], m)[:m]
	for i := range m {
		c.maxAt[i] = found{run: -1}
		c.minAt[i] = found{run: -1}
	}
	c.runs = c.runs[:0]
}

func resize(s []float64, n int) []float64 {
	s = slices.Grow(s[:0], n)[:n]
	clear(s)
	return s
}

func (c *Calculator) train(l *Lines, ld *Load, out []Extremes, plain plainSweeps) []Extremes {
	counts := ld.counts(l.SpanM(), plain.allCounts)
	nItems := 0
	for _, k := range counts {
		nItems = max(nItems, k.sweep)
	}
	c.items = ld.items(nItems, c.items)
	c.streams = streamsFor(ld)
	c.curved = len(ld.train.Parts) > 0
	for len(c.state) < len(c.streams) {
		c.state = append(c.state, sweepState{})
	}
	for si := range c.streams {
		st := &c.state[si]
		st.v, st.g, st.c = resize(st.v, c.m), resize(st.g, c.m), resize(st.c, c.m)
		st.t = resize(st.t, c.m)
	}
	refined := ld.hasUnfav || ld.hasCut
	var prev *grid
	for d := range 2 {
		if d == 1 && l.mirror != nil && !plain.bothSweeps {
			c.mirrorSweeps(l.mirror)
			break
		}
		gr := l.plainGrid(d)
		if refined {
			gr = l.refinedGrid(d)
		}
		if prev == nil || !slices.Equal(prev.x, gr.x) {
			c.buildEvents(gr, c.items)
		}
		prev = gr
		c.ck.ok = false // a new direction starts from the beginning
		for _, k := range counts {
			if plain.fullSweeps {
				c.ck.ok = false // no resuming: every count from the beginning
			}
			c.runs = append(c.runs, runInfo{dir: d, cnt: k})
			c.sweep(gr, ld, k.sweep, int32(len(c.runs)-1), plain.denseCurved)
		}
	}
	out = slices.Grow(out[:0], c.m)[:c.m]
	for i := range c.m {
		out[i] = Extremes{
			Max: c.extreme(l, ld, i, c.maxV[i], c.maxAt[i], true),
			Min: c.extreme(l, ld, i, c.minV[i], c.minAt[i], false),
		}
	}
	return out
}

// mirrorSweeps stands in for the right-to-left sweeps over a truss that is its own mirror
// image: a train running right to left does to member i what it does running left to right
// to member mirror[i], so the left-to-right sweeps just made hold the right-to-left extremes
// too. Each run gets its right-to-left twin, and a mirror member's extreme replaces a
// member's own where it is larger by more than the tolerance the mirror was found with (a
// tie, as for a symmetric train, keeps left to right, as a sweep does).
func (c *Calculator) mirrorSweeps(mirror []int32) {
	n := len(c.runs)
	for _, r := range c.runs[:n] {
		c.runs = append(c.runs, runInfo{dir: 1, cnt: r.cnt})
	}
	for _, sense := range []struct {
		v  []float64
		at []found
		s  float64
	}{{c.maxV, c.maxAt, 1}, {c.minV, c.minAt, -1}} {
		c.snapV = append(c.snapV[:0], sense.v...)
		c.snapAt = append(c.snapAt[:0], sense.at...)
		for i, j := range mirror {
			mv, own := c.snapV[j], sense.v[i]
			if c.snapAt[j].run < 0 || sense.s*(mv-own) <= mirrorTol*max(math.Abs(mv), math.Abs(own)) {
				continue
			}
			f := c.snapAt[j]
			f.run += int32(n)
			f.via = j + 1
			sense.v[i], sense.at[i] = mv, f
		}
	}
}

// extreme turns a recorded candidate into a result with its placement in the truss's own
// coordinates.
func (c *Calculator) extreme(l *Lines, ld *Load, i int, v float64, f found, isMax bool) Extreme {
	if f.run < 0 || math.Abs(v) < 1e-9 {
		return Extreme{}
	}
	r := c.runs[f.run]
	// The sweep that found it: its direction's grid and the member it followed there (for a
	// mirrored extreme, the mirror member, left to right).
	sd := r.dir
	if f.via > 0 {
		sd, i = 0, int(f.via-1)
	}
	refined := ld.hasUnfav || ld.hasCut
	gr := l.plainGrid(sd)
	if refined {
		gr = l.refinedGrid(sd)
	}
	span := l.SpanM()
	h := f.s + offJump(f.side, f.room, span)
	if r.cnt.report > r.cnt.sweep && h-l.x0 >= ld.r0+float64(r.cnt.sweep-1)*ld.unitLen {
		h += float64(r.cnt.report-r.cnt.sweep) * ld.unitLen
	}
	p := Placement{Loaded: true, Direction: Direction(r.dir), Count: r.cnt.report, LengthM: ld.lengthM(r.cnt.report)}
	lo, hi := h-p.LengthM, h // loaded stretch, grid coordinates
	if p.LengthM == 0 {
		lo, hi = math.Inf(1), math.Inf(-1)
	}
	sign := 1.0
	if !isMax {
		sign = -1
	}
	for _, part := range ld.train.Parts {
		a, b := h-part.ToM, h-part.FromM
		switch part.Mode {
		case traffic.WhereUnfavourable:
			a, b = signExtent(gr, i, c.m, sign, a, b)
		case traffic.CutUnfavourable:
			b = h - part.FromM
			a = b
			if c.streams[f.stream].cut && b > l.x0 {
				k, found := slices.BinarySearch(gr.x, b)
				if !found {
					k--
				}
				k = min(k, len(gr.x)-1)
				arg := gr.argMin[k*c.m+i]
				if !isMax {
					arg = gr.argMax[k*c.m+i]
				}
				a = l.x0
				if arg >= 0 {
					a = gr.x[arg]
				}
				p.TrailingM = b - a
			}
		}
		if a < b {
			lo, hi = min(lo, a), max(hi, b)
		}
	}
	p.LoadedFromM, p.LoadedToM = max(lo, l.x0), min(hi, l.xl)
	p.HeadM = h
	l.inTruss(&p, r.dir)
	return Extreme{Value: v, Placement: p}
}

// offJump is how far off a jump of the line at a bearing a limit there is reported, on the
// side where it holds: a hair's breadth (1e-9 of the span), and never beyond the next event,
// room away, where the value may change (an axle spaced within rounding of the span).
func offJump(side int8, room, span float64) float64 {
	return float64(side) * min(1e-9*max(1, span), room/2)
}

// inTruss turns a placement found on direction dir's grid into the truss's own coordinates
// (direction 1's grid is the truss's mirror image).
func (l *Lines) inTruss(p *Placement, dir int) {
	if dir == 1 {
		p.HeadM = l.x0 + l.xl - p.HeadM
		p.LoadedFromM, p.LoadedToM = l.x0+l.xl-p.LoadedToM, l.x0+l.xl-p.LoadedFromM
	}
}

// signExtent bounds the stretches of [a, b] where member i's line has the given sign.
func signExtent(gr *grid, i, m int, sign, a, b float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for k := 0; k+1 < len(gr.x); k++ {
		e0, e1 := sign*gr.eta[k*m+i], sign*gr.eta[(k+1)*m+i]
		if e0 < 0 || e1 < 0 || e0+e1 == 0 {
			continue
		}
		sa, sb := max(a, gr.x[k]), min(b, gr.x[k+1])
		if sa < sb {
			lo, hi = min(lo, sa), max(hi, sb)
		}
	}
	return lo, hi
}

// Merge keeps, member by member, the larger tension and the larger compression of dst and
// src in dst: the envelope over several trains, each extreme naming the train that governs.
func Merge(dst, src []Extremes) {
	for i := range dst {
		if src[i].Max.Value > dst[i].Max.Value {
			dst[i].Max = src[i].Max
		}
		if src[i].Min.Value < dst[i].Min.Value {
			dst[i].Min = src[i].Min
		}
	}
}

// Compute is the one-call form: the extremes of every member whose influence line has
// ordinates[i] at the panel points x, under train t. For many trusses or trains, prepare the
// Lines and the Load once and reuse a Calculator.
func Compute(x []float64, ordinates [][]float64, t *traffic.Train, opt Options) ([]Extremes, error) {
	l, err := NewLines(x, ordinates)
	if err != nil {
		return nil, err
	}
	ld, err := Prepare(t)
	if err != nil {
		return nil, err
	}
	var c Calculator
	return c.Envelope(l, ld, opt, nil)
}
