package fatigue

import (
	"math"
	"slices"
)

// passageCycles are the cycles of one passage of a train over a member in one direction, at
// unit force (kN): for a train with a long run of identical vehicles, those of two shorter
// trains (a and b, with one vehicle more) and the number of vehicles the real train has
// beyond a's (extra): see steady.
type passageCycles struct {
	tr       *Train
	k        *kinks // the line as the train sees it
	a, b     []Cycle
	extra    float64
	maxRange float64
}

// damage is the passage's Miner sum on curve with ranges multiplied by scale: D(a) +
// extra (D(b) - D(a)).
func (pc *passageCycles) damage(curve Curve, scale float64) float64 {
	d := curve.Damage(pc.a, scale)
	if pc.extra > 0 {
		d += pc.extra * (curve.Damage(pc.b, scale) - d)
	}
	return d
}

// steady is a count n of the last group's vehicles from which one more vehicle adds the same
// cycles to a passage, whatever the count: the passage of a train with N >= n vehicles has
// the cycles of n vehicles plus N - n times the difference between n + 1 and n.
//
// Why. Measure offsets behind the front; beyond tailM the train is a plain repetition of the
// last group's vehicle (length L). While the bridge (span S) sees only offsets beyond tailM
// the force is periodic in the train's position with period L; that holds for every front
// position at which the bridge's window begins beyond tailM and ends within the run of
// vehicles. With n = ceil((tailM - r0 + S) / L) + 3 vehicles the periodic stretch lasts at
// least two full periods, so that rainflow counting has reached its steady state (after one
// period the largest peak and deepest valley of a period are on the stack, below the
// points a period adds; every later period then closes the same cycles and leaves the stack
// as it found it) before the train's tail reaches the bridge. One more vehicle adds one more
// period to that stretch, which adds the cycles of one period and changes nothing before or
// after it. TestSteadyCountsAreLinear checks it against passages of every count.
func (tr *Train) steady(spanM float64) int {
	if len(tr.unit) == 0 || !(tr.unitLen > 0) {
		return tr.count
	}
	n := math.Ceil((tr.tailM-tr.r0+spanM)/tr.unitLen) + 3
	if !(n < float64(tr.count)) {
		return tr.count
	}
	return max(int(n), 1)
}

// withCount is tr with n vehicles in its last group (n <= tr.count), kept in the
// Calculator's cache.
func (c *Calculator) withCount(tr *Train, n int) *Train {
	if n == tr.count {
		return tr
	}
	for _, s := range c.shorter {
		if s.of == tr && s.t.count == n {
			return s.t
		}
	}
	t := *tr
	t.count = n
	t.items = tr.itemsWith(n, nil)
	if len(c.shorter) >= 16 {
		c.shorter = c.shorter[1:]
	}
	c.shorter = append(c.shorter, shorterTrain{of: tr, t: &t})
	return &t
}

type passageKey struct {
	tr *Train
	k  *kinks
}

// Forget lets go of the passages kept (and of the lines they hold): call it between bridges,
// whose lines are not shared.
func (c *Calculator) Forget() {
	for i := range c.passages {
		c.passages[i].tr, c.passages[i].k = nil, nil // their cycles' storage stays for reuse
	}
	c.passages = c.passages[:0]
	if c.kept == nil {
		c.kept = map[passageKey]int{}
	}
	clear(c.kept)
	c.forgetEvents()
}

// maxKeptPassages bounds the passages a Calculator keeps: a bridge's members times its
// trains and directions stay below it (a 16-panel truss, 62 members, 4 trains both ways).
const maxKeptPassages = 512

type shorterTrain struct {
	of, t *Train
}

// passage gives the cycles of a passage of tr over l in direction dir, computed once per
// line as the train sees it (kept by the line's kinks, which the cache holds, so that their
// storage is never reused while it is kept): a train in both scenarios is counted once, and
// a member of a symmetric truss (Line.Mirror) counts its mirror's passages the other way.
func (c *Calculator) passage(l *Line, tr *Train, dir Direction, spanM float64) *passageCycles {
	k := l.dir[0]
	if dir == RightToLeft {
		k = l.dir[1]
	}
	key := passageKey{tr, k}
	if i, ok := c.kept[key]; ok {
		return &c.passages[i]
	}
	if len(c.passages) >= maxKeptPassages || c.kept == nil {
		c.Forget()
	}
	c.kept[key] = len(c.passages)
	if len(c.passages) < cap(c.passages) {
		c.passages = c.passages[:len(c.passages)+1]
	} else {
		c.passages = append(c.passages, passageCycles{})
	}
	p := &c.passages[len(c.passages)-1]
	p.tr, p.k, p.extra, p.maxRange = tr, k, 0, 0
	n := tr.steady(spanM)
	if 2*n+1 >= tr.count {
		// The two shorter trains would cost more than the train itself.
		c.turn = c.TurningOf(l, tr, dir, c.turn)
		p.a, c.stack, c.rot = RainflowRepeated(c.turn, p.a, c.stack, c.rot)
		p.maxRange = largestRange(p.a)
		return p
	}
	c.shorterPassages(p, l, c.withCount(tr, n), c.withCount(tr, n+1), dir)
	p.extra = float64(tr.count - n)
	p.maxRange = max(largestRange(p.a), largestRange(p.b))
	return p
}

// shorterPassages counts into p.a and p.b the cycles of passages of ta and of tb, which is ta
// with one more vehicle at its tail, over l in direction dir.
//
// tb's passage is ta's until the first of tb's extra items reaches the line's first kink (at
// stop): until then both trains have the same events, in the same order (tb's items begin
// with ta's, and the extra items' events all lie at or beyond stop), so the same sums give the
// same values, bit for bit, and the same turning points. So ta's walk saves its state there
// (walkState) and tb's walk starts from it with the turning points gathered so far, over tb's
// events (ta's with the extra items' merged in: eventsExtending). Where tb's items do not
// begin with ta's (a consist whose axles lie beyond its vehicles' ends), tb is walked whole.
func (c *Calculator) shorterPassages(p *passageCycles, l *Line, ta, tb *Train, dir Direction) {
	k := l.kinksFor(dir)
	tol := PassageTol(l, ta) // ta and tb keep the train's own total load, so tb's too
	eva := c.eventsOf(k, ta)
	na := len(ta.items)
	extends := len(tb.items) > na && slices.Equal(tb.items[:na], ta.items)
	stop := math.Inf(1)
	if extends {
		stop = k.x[0] + tb.items[na].d
	}
	oa := passageOut{t: turning{tol: tol, dst: c.turn[:0]}}
	snap := c.walk(k, ta, eva, walkState{}, stop, &oa)
	c.turn = oa.t.dst
	p.a, c.stack, c.rot = RainflowRepeated(c.turn, p.a, c.stack, c.rot)
	ob := passageOut{t: turning{tol: tol, dst: c.turnB[:0]}}
	var evb []event
	if extends {
		evb = c.eventsExtending(k, ta, tb, eva)
	} else {
		evb = c.eventsOf(k, tb)
	}
	if snap.next > 0 {
		ob.t.dst = append(ob.t.dst, c.turn[:snap.turns]...)
		ob.t.dst[snap.turns-1], ob.t.dir = snap.lastTurn, snap.turnTo
	}
	c.walk(k, tb, evb, snap, math.Inf(1), &ob)
	c.turnB = ob.t.dst
	p.b, c.stack, c.rot = RainflowRepeated(c.turnB, p.b, c.stack, c.rot)
}

// largestRange is the largest range of the cycles (0 for none).
func largestRange(cycles []Cycle) float64 {
	m := 0.0
	for _, cy := range cycles {
		m = max(m, cy.Range)
	}
	return m
}
