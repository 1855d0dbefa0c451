package envelope

import (
	"cmp"
	"math"
	"slices"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// event: item it of the train reaches vertex j of the grid when the front stands at s.
type event struct {
	s  float64
	it int32
	j  int32
}

// stream is one of the functions of the train position that a sweep follows. A train of
// axles and whole parts has one, giving both extremes. A part applied where unfavourable
// differs by sense, so each sense gets its own; a part cut at the unfavourable length is
// either absent or present with its rear end at the best vertex, one stream each.
type stream struct {
	max, min bool
	cut      bool
	curved   bool
}

// found is a candidate extreme: the front at s (grid coordinates), on the side of s (-1:
// just before, +1: just after, 0: at s) where a jump of the influence line at a bearing
// makes the extreme a limit, in sweep run of the given stream. room is how far the next event
// on that side lies (+Inf when none): the placement is reported within it.
type found struct {
	s      float64
	room   float64
	side   int8
	stream int8
	run    int32
	// via is 1 + the member whose left-to-right sweep found a right-to-left extreme over a
	// truss that is its own mirror image (see mirrorSweeps); 0 for the member's own sweep.
	via int32
}

// sweepState is the per-member state of one stream: value, slope and curvature in s.
type sweepState struct {
	v, g, c []float64
	// t is where each member's v was last brought up to date (sweepLinear only).
	t []float64
}

func streamsFor(ld *Load) []stream {
	curved := len(ld.train.Parts) > 0
	switch {
	case !ld.hasUnfav && !ld.hasCut:
		return []stream{{max: true, min: true, curved: curved}}
	case !ld.hasUnfav:
		return []stream{{max: true, min: true, curved: curved}, {max: true, cut: true, curved: true}, {min: true, cut: true, curved: true}}
	case !ld.hasCut:
		return []stream{{max: true, curved: true}, {min: true, curved: true}}
	}
	return []stream{{max: true, curved: true}, {max: true, cut: true, curved: true}, {min: true, curved: true}, {min: true, cut: true, curved: true}}
}

// buildEvents lists in c.events, in order of the front's position, every position where an item of the train
// reaches a vertex of the grid: between two of them every stream is linear or quadratic.
//
// Taking the items in order of their offsets, the events at one vertex are already in order
// (adding the vertex's x keeps the order of the offsets, also in floating point), so the list
// is built as one sorted run per vertex and the runs are merged pairwise, as in a merge sort
// that starts from runs of that length: about log2(vertices) linear passes instead of a full
// sort. Equal positions keep the order of their vertices, then of their items.
func (c *Calculator) buildEvents(gr *grid, items []item) {
	order := c.order[:0]
	for k := range items {
		order = append(order, int32(k))
	}
	if !slices.IsSortedFunc(items, func(a, b item) int { return cmp.Compare(a.d, b.d) }) {
		slices.SortStableFunc(order, func(a, b int32) int { return cmp.Compare(items[a].d, items[b].d) })
	}
	c.order = order
	n := len(items) * len(gr.x)
	dst := slices.Grow(c.events[:0], n)[:n]
	k := 0
	for j, x := range gr.x {
		for _, it := range order {
			dst[k] = event{s: x + items[it].d, it: it, j: int32(j)}
			k++
		}
	}
	src, tmp := dst, slices.Grow(c.eventsTmp[:0], n)[:n]
	for w := len(items); w > 0 && w < n; w *= 2 {
		for lo := 0; lo < n; lo += 2 * w {
			mergeEvents(tmp[lo:min(lo+2*w, n)], src[lo:min(lo+w, n)], src[min(lo+w, n):min(lo+2*w, n)])
		}
		src, tmp = tmp, src
	}
	c.events, c.eventsTmp = src, tmp
}

// mergeEvents merges the ordered lists a and b into dst (len(a)+len(b) long), a first
// among equal positions.
func mergeEvents(dst, a, b []event) {
	i, j, k := 0, 0, 0
	for i < len(a) && j < len(b) {
		if b[j].s < a[i].s {
			dst[k] = b[j]
			j++
		} else {
			dst[k] = a[i]
			i++
		}
		k++
	}
	k += copy(dst[k:], a[i:])
	copy(dst[k:], b[j:])
}

// sweep moves the train with n vehicles in its last group across the grid, front first from
// the left, and records each member's extremes in c.best. Items of vehicles beyond n are
// skipped, so one event list serves every count.
//
// Sweeps of one direction come in ascending counts, and a sweep with more vehicles is the
// same as the one before it until the first vehicle beyond that count reaches the bridge:
// every event before then belongs to vehicles both trains have. So each sweep saves its
// state where the next, larger count first differs (c.ck), and the next sweep starts there
// instead of from the beginning. The skipped positions give the same values, bit for bit, as
// the earlier sweep already recorded, and the extremes keep the first sweep that reached
// them, so the result is the same as sweeping every count in full.
func (c *Calculator) sweep(gr *grid, ld *Load, n int, run int32, dense bool) {
	m := c.m
	nx := len(gr.x)
	streams := c.streams
	items := c.items
	ev := c.events
	start := 0
	var sPrev float64
	if c.ck.ok && c.ck.n < n {
		start, sPrev = c.ck.restore(c.state[:len(streams)])
	} else {
		for si := range streams {
			st := &c.state[si]
			clear(st.g)
			clear(st.c)
			for i := range m {
				v := 0.0
				for _, a := range ld.ahead {
					switch {
					case a.mode != traffic.WhereUnfavourable:
						v += a.q * gr.areaNet[i]
					case streams[si].max:
						v += a.q * gr.areaPos[i]
					default:
						v += a.q * gr.areaNeg[i]
					}
				}
				st.v[i] = v
			}
		}
		// Before the first event nothing has reached the bridge (parts reaching ahead cover it).
		sPrev = math.Inf(-1)
		if len(ev) > 0 {
			sPrev = ev[0].s - 1
		}
		for si := range streams {
			c.offer(si, sPrev, 0, 0, run)
		}
	}
	c.ck.ok = false
	save := c.firstGroupBeyond(n)
	if !c.curved && len(streams) == 1 {
		c.sweepLinear(gr, n, run, sPrev, start, save)
		return
	}
	if !gr.endJumps && !ld.hasUnfav && !dense {
		c.sweepSparse(gr, n, run, sPrev, start, save)
		return
	}
	endJump := gr.endJumps
	// At the top of each iteration, every stream's state is the members' value, slope and
	// curvature with the front at sPrev, the last event group applied (all its changes in), and
	// the extremes hold every value up to sPrev; g0 is the next group.
	for g0 := start; g0 < len(ev); {
		if g0 == save {
			c.ck.save(n, g0, sPrev, c.state[:len(streams)])
		}
		s := ev[g0].s
		g1, active := g0, false
		for ; g1 < len(ev) && ev[g1].s == s; g1++ {
			if items[ev[g1].it].unit <= int32(n) {
				active = true
			}
		}
		if !active {
			g0 = g1
			continue
		}
		var before, after float64 // needed only where a jump makes a limit
		if endJump || ld.hasCut {
			before, after = c.gaps(gr, g0, g1)
		}
		dt := s - sPrev
		for si, sm := range streams {
			st := &c.state[si]
			if sm.curved {
				c.advanceCurved(si, dt, sPrev, run)
			} else {
				for i := range m {
					st.v[i] += st.g[i] * dt
				}
			}
		}
		enter, exit := false, false
		if endJump {
			for _, e := range ev[g0:g1] {
				if it := items[e.it]; it.kind == axle && it.unit <= int32(n) {
					enter = enter || e.j == 0
					exit = exit || int(e.j) == nx-1
				}
			}
		}
		if enter {
			for si := range streams {
				c.offer(si, s, -1, before, run)
			}
		}
		// Value jumps at the point itself: an axle arriving on the bridge, and a cut part's
		// best rear end moving to the vertex just reached.
		cutJump := false
		for _, e := range ev[g0:g1] {
			it := items[e.it]
			if it.unit > int32(n) {
				continue
			}
			base := int(e.j) * m
			switch {
			case it.kind == axle && e.j == 0 && endJump:
				for si := range streams {
					addScaled(c.state[si].v, gr.jump[base:base+m], it.w)
				}
			case it.kind == cutFront:
				cutJump = true
				for si, sm := range streams {
					if !sm.cut {
						continue
					}
					drop := gr.dropMin
					if !sm.max {
						drop = gr.dropMax
					}
					addScaled(c.state[si].v, drop[base:base+m], it.w)
				}
			}
		}
		point := pointSide(enter || cutJump, exit)
		for si := range streams {
			c.offer(si, s, point, roomOn(point, before, after), run)
		}
		if exit {
			for _, e := range ev[g0:g1] {
				if it := items[e.it]; it.kind == axle && int(e.j) == nx-1 && it.unit <= int32(n) {
					base := int(e.j) * m
					for si := range streams {
						addScaled(c.state[si].v, gr.jump[base:base+m], it.w)
					}
				}
			}
			for si := range streams {
				c.offer(si, s, 1, after, run)
			}
		}
		for _, e := range ev[g0:g1] {
			it := items[e.it]
			if it.unit > int32(n) {
				continue
			}
			base := int(e.j) * m
			for si, sm := range streams {
				st := &c.state[si]
				switch it.kind {
				case axle:
					addScaled(st.g, gr.slope[base:base+m], it.w)
				case wholeEnd:
					addScaled(st.g, gr.jump[base:base+m], it.w)
					addScaled(st.c, gr.slope[base:base+m], it.w)
				case unfavEnd:
					jump, slope := gr.jumpPos, gr.slopePos
					if !sm.max {
						jump, slope = gr.jumpNeg, gr.slopeNeg
					}
					addScaled(st.g, jump[base:base+m], it.w)
					addScaled(st.c, slope[base:base+m], it.w)
				case cutFront:
					if sm.cut {
						addScaled(st.g, gr.jump[base:base+m], it.w)
						addScaled(st.c, gr.slope[base:base+m], it.w)
					}
				}
			}
		}
		sPrev = s
		g0 = g1
	}
}

// sweepLinear is sweep for the common case of axles only: one stream, straight between
// events, no jumps except at bearings with non-zero ordinates.
//
// A member's force changes slope only where an axle passes a vertex of that member's own
// line, and a truss member's line has a kink at few panel points (a chord's at its moment
// centre, a diagonal's at the ends of its panel), so most events leave most members straight.
// Each member is therefore brought up to date (v += g (s - t), t its last update) only at its
// own breakpoints, where its extremes lie, using the vertex's list of members that kink there;
// at a bearing, where every line starts or ends, all are.
//
// It starts at event group start with sPrev the position of the last one applied, and saves
// its state at group save for the next count (see sweep).
func (c *Calculator) sweepLinear(gr *grid, n int, run int32, sPrev float64, start, save int) {
	m := c.m
	st := &c.state[0]
	v, g, t := st.v, st.g, st.t
	if start == 0 {
		for i := range m {
			t[i] = sPrev
		}
	}
	ev := c.events
	// Events need not be taken in groups of equal position: a member's second event at the
	// same position finds it up to date (t[i] == s) and only adds its slope change. Only the
	// jumps at the bearings look at a whole group, before its first slope change. The save
	// point is a group's first event.
	saveAt := func(g0 int) {
		if g0 == save {
			c.ck.save(n, g0, sPrev, c.state[:1])
		}
	}
	if !gr.endJumps {
		end := len(ev)
		if save >= start {
			sPrev = c.linearEvents(gr, start, save, n, run, sPrev)
			saveAt(save)
			start = save
		}
		sPrev = c.linearEvents(gr, start, end, n, run, sPrev)
	}
	for g0 := start; gr.endJumps && g0 < len(ev); {
		saveAt(g0)
		g1 := c.groupJumps(gr, g0, n, run)
		sPrev = c.linearEvents(gr, g0, g1, n, run, sPrev)
		g0 = g1
	}
	// Bring every member to the end, as the other sweeps leave them.
	for i := range m {
		v[i] += g[i] * (sPrev - t[i])
		t[i] = sPrev
	}
}

// firstGroupBeyond is the index of the first event group holding an item of a vehicle beyond
// the n-th of the last group, or -1 when there is none.
func (c *Calculator) firstGroupBeyond(n int) int {
	for k, e := range c.events {
		if c.items[e.it].unit > int32(n) {
			for k > 0 && c.events[k-1].s == e.s {
				k--
			}
			return k
		}
	}
	return -1
}

// checkpoint is a sweep's state before event group g0, for a later sweep of a larger count.
type checkpoint struct {
	ok         bool
	n          int // the count of the sweep that saved it
	g0         int
	sPrev      float64
	v, g, c, t [][]float64 // per stream
}

func (ck *checkpoint) save(n, g0 int, sPrev float64, state []sweepState) {
	ck.ok, ck.n, ck.g0, ck.sPrev = true, n, g0, sPrev
	for len(ck.v) < len(state) {
		ck.v, ck.g, ck.c, ck.t = append(ck.v, nil), append(ck.g, nil), append(ck.c, nil), append(ck.t, nil)
	}
	for si, st := range state {
		ck.v[si] = append(ck.v[si][:0], st.v...)
		ck.g[si] = append(ck.g[si][:0], st.g...)
		ck.c[si] = append(ck.c[si][:0], st.c...)
		ck.t[si] = append(ck.t[si][:0], st.t...)
	}
}

// restore puts the saved state back and returns where the sweep goes on from.
func (ck *checkpoint) restore(state []sweepState) (g0 int, sPrev float64) {
	for si := range state {
		copy(state[si].v, ck.v[si])
		copy(state[si].g, ck.g[si])
		copy(state[si].c, ck.c[si])
		copy(state[si].t, ck.t[si])
	}
	return ck.g0, ck.sPrev
}

// groupJumps applies the jumps at the bearings of the event group that starts at event g0,
// if it has an axle of the first n vehicles at a bearing, bringing every member up to date
// first.
func (c *Calculator) groupJumps(gr *grid, g0, n int, run int32) (g1 int) {
	ev, nx := c.events, len(gr.x)
	s := ev[g0].s
	g1, jumps := g0, false
	for ; g1 < len(ev) && ev[g1].s == s; g1++ {
		if e := ev[g1]; c.items[e.it].unit <= int32(n) && (e.j == 0 || int(e.j) == nx-1) {
			jumps = true
		}
	}
	if !jumps {
		return g1
	}
	st := &c.state[0]
	for i := range c.m {
		st.v[i] += st.g[i] * (s - st.t[i])
		st.t[i] = s
	}
	before, after := c.gaps(gr, g0, g1)
	c.sweepJumps(gr, ev[g0:g1], n, s, before, after, run)
	return g1
}

// linearEvents applies events from to to (exclusive) of the items of the first n vehicles,
// updating each member at its own kinks, and returns the position of the last one applied
// (sPrev if none).
func (c *Calculator) linearEvents(gr *grid, from, to, n int, run int32, sPrev float64) float64 {
	st := &c.state[0]
	v, g, t := st.v, st.g, st.t
	bmax, bmin := c.maxV, c.minV
	items := c.items
	un := int32(n)
	for _, e := range c.events[from:to] {
		it := &items[e.it]
		if it.unit > un {
			continue
		}
		s, w := e.s, it.w
		lo, hi := gr.kinkStart[e.j], gr.kinkStart[e.j+1]
		slope := gr.kinkSlope[lo:hi]
		for k, i := range gr.kinkMember[lo:hi] {
			if t[i] != s {
				vi := v[i] + g[i]*(s-t[i])
				v[i], t[i] = vi, s
				if vi > bmax[i] {
					bmax[i] = vi
					c.maxAt[i] = found{s: s, run: run}
				} else if vi < bmin[i] {
					bmin[i] = vi
					c.minAt[i] = found{s: s, run: run}
				}
			}
			g[i] += w * slope[k]
		}
		sPrev = s
	}
	return sPrev
}

// sweepJumps handles a group of events at s that includes an axle reaching a bearing where
// some line has a non-zero ordinate: the left limit, the value at s (axle on the bridge) and
// the right limit all count.
func (c *Calculator) sweepJumps(gr *grid, group []event, n int, s, before, after float64, run int32) {
	m, nx := c.m, len(gr.x)
	v := c.state[0].v
	c.offer(0, s, -1, before, run)
	for _, e := range group {
		if it := c.items[e.it]; it.unit <= int32(n) && e.j == 0 {
			addScaled(v, gr.jump[:m], it.w)
		}
	}
	enter, exit := false, false
	for _, e := range group {
		if c.items[e.it].unit <= int32(n) {
			enter = enter || e.j == 0
			exit = exit || int(e.j) == nx-1
		}
	}
	point := pointSide(enter, exit)
	c.offer(0, s, point, roomOn(point, before, after), run)
	for _, e := range group {
		if it := c.items[e.it]; it.unit <= int32(n) && int(e.j) == nx-1 {
			base := int(e.j) * m
			addScaled(v, gr.jump[base:base+m], it.w)
		}
	}
	c.offer(0, s, 1, after, run)
}

// gaps is how far the events just before and just after the group ev[g0:g1] lie from it
// (+Inf where there is none), over gr. Events within rounding of the group (1e-12 of the
// span or of the position, as two axles at one offset reach a vertex) count as at it. Any
// other event counts, also one of a vehicle beyond the count swept: the room it leaves is
// smaller than the value's true stretch, never larger.
func (c *Calculator) gaps(gr *grid, g0, g1 int) (before, after float64) {
	ev := c.events
	s := ev[g0].s
	tiny := 1e-12 * max(1, gr.x[len(gr.x)-1]-gr.x[0], math.Abs(s))
	before, after = math.Inf(1), math.Inf(1)
	for k := g0 - 1; k >= 0; k-- {
		if d := s - ev[k].s; d > tiny {
			before = d
			break
		}
	}
	for k := g1; k < len(ev); k++ {
		if d := ev[k].s - s; d > tiny {
			after = d
			break
		}
	}
	return before, after
}

// roomOn is the room on the given side of a position.
func roomOn(side int8, before, after float64) float64 {
	switch side {
	case -1:
		return before
	case 1:
		return after
	}
	return 0
}

// advanceCurved moves stream si on by dt, offering any interior stationary point.
func (c *Calculator) advanceCurved(si int, dt, sPrev float64, run int32) {
	st := &c.state[si]
	sm := c.streams[si]
	for i := range c.m {
		v, g, cc := st.v[i], st.g[i], st.c[i]
		if cc != 0 {
			c.turn(sm, si, i, v, g, cc, sPrev, dt, run)
		}
		st.v[i] = v + g*dt + cc*dt*dt/2
		st.g[i] = g + cc*dt
	}
}

// turn offers member i's top (or bottom) of the parabola v + g t + cc t²/2 of stream si,
// from position from over dt, where it lies inside and the stream looks for that sense.
func (c *Calculator) turn(sm stream, si, i int, v, g, cc, from, dt float64, run int32) {
	gEnd := g + cc*dt
	if (cc < 0 && sm.max && g > 0 && gEnd < 0) || (cc > 0 && sm.min && g < 0 && gEnd > 0) {
		t := -g / cc
		val := v + g*t/2 // v + g t + cc t²/2 with t = -g/cc
		if cc < 0 && val > c.maxV[i] {
			c.maxV[i] = val
			c.maxAt[i] = found{s: from + t, stream: int8(si), run: run}
		}
		if cc > 0 && val < c.minV[i] {
			c.minV[i] = val
			c.minAt[i] = found{s: from + t, stream: int8(si), run: run}
		}
	}
}

// offer records stream si's current values where they beat the extremes so far.
func (c *Calculator) offer(si int, s float64, side int8, room float64, run int32) {
	sm := c.streams[si]
	v := c.state[si].v
	for i := range c.m {
		if sm.max && v[i] > c.maxV[i] {
			c.maxV[i] = v[i]
			c.maxAt[i] = found{s: s, room: room, side: side, stream: int8(si), run: run}
		}
		if sm.min && v[i] < c.minV[i] {
			c.minV[i] = v[i]
			c.minAt[i] = found{s: s, room: room, side: side, stream: int8(si), run: run}
		}
	}
}

func addScaled(dst, src []float64, w float64) {
	src = src[:len(dst)]
	for i := range dst {
		dst[i] += w * src[i]
	}
}

// pointSide is where to report a value taken at a position where the line jumps at a
// bearing. A value that includes an axle just arrived (and none just leaving) holds on the
// right of the position too, one that includes an axle about to leave holds on the left;
// reporting the placement there, a hair's breadth off the jump, makes it reproducible in
// floating point. Only arrivals and departures at the same position keep the exact point.
func pointSide(arrive, leave bool) int8 {
	switch {
	case arrive && !leave:
		return 1
	case leave && !arrive:
		return -1
	}
	return 0
}
