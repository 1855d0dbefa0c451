package envelope

import "math"

// sweepSparse is sweep for a train with distributed parts applied whole (a part over a
// locomotive) or cut at the unfavourable length (Cooper E's trailing load), on lines without
// jumps at the bearings. It takes sweepLinear's shortcut to the curved streams: between two of
// its own events a member's force in a stream is a quadratic in the front's position s (value,
// slope and curvature), since an axle or a part's end passing a vertex where the member's line
// is straight changes nothing, and a cut part's best rear end moves only at the vertices where
// the member's running extreme of the line's integral does (dropMinAt, dropMaxAt). So each
// member is brought up to date only at those events, and the top (or bottom) of the parabola
// between two of them is offered there, as advanceCurved does for every member at every event.
// On the refined grid that a cut part needs, every member's zero crossings are vertices, most
// of them straight points of the other members' lines, so most events touch few members.
//
// It starts at event group start with sPrev the position of the last one applied, and saves
// its state at group save for the next count (see sweep).
func (c *Calculator) sweepSparse(gr *grid, n int, run int32, sPrev float64, start, save int) {
	ns := len(c.streams)
	if start == 0 {
		for si := range ns {
			t := c.state[si].t
			for i := range c.m {
				t[i] = sPrev
			}
		}
	}
	if save >= start {
		sPrev = c.sparseEvents(gr, start, save, n, run, sPrev)
		c.ck.save(n, save, sPrev, c.state[:ns])
		start = save
	}
	sPrev = c.sparseEvents(gr, start, len(c.events), n, run, sPrev)
	// Bring every member to the end, as the other sweeps leave them.
	for si := range ns {
		for i := range c.m {
			c.bring(si, int32(i), sPrev, run)
		}
	}
}

// sparseEvents applies events from to to (exclusive) of the items of the first n vehicles to
// every stream, updating each member at its own events, and returns the position of the last
// one applied (sPrev if none).
func (c *Calculator) sparseEvents(gr *grid, from, to, n int, run int32, sPrev float64) float64 {
	items := c.items
	un := int32(n)
	for k := from; k < to; k++ {
		e := c.events[k]
		it := &items[e.it]
		if it.unit > un {
			continue
		}
		s, w := e.s, it.w
		lo, hi := gr.kinkStart[e.j], gr.kinkStart[e.j+1]
		members, slope := gr.kinkMember[lo:hi], gr.kinkSlope[lo:hi]
		for si, sm := range c.streams {
			st := &c.state[si]
			switch {
			case it.kind == axle:
				for kk, i := range members {
					if st.t[i] != s {
						c.bring(si, i, s, run)
					}
					st.g[i] += w * slope[kk]
				}
			case it.kind == wholeEnd || (it.kind == cutFront && sm.cut):
				// no jump in value or slope at a vertex: none at the bearings here
				for kk, i := range members {
					if st.t[i] != s {
						c.bring(si, i, s, run)
					}
					st.c[i] += w * slope[kk]
				}
			}
			if it.kind == cutFront && sm.cut {
				c.cutDrops(gr, si, k, w, run)
			}
		}
		sPrev = s
	}
	return sPrev
}

// cutDrops moves the best rear end of stream si's cut part to the vertex that event k's front
// has reached, for the members whose running extreme of the line's integral moves there: their
// value jumps, and holds just after s.
func (c *Calculator) cutDrops(gr *grid, si, k int, w float64, run int32) {
	sm := c.streams[si]
	st := &c.state[si]
	e := c.events[k]
	s := e.s
	drops := gr.dropMinAt
	if !sm.max {
		drops = gr.dropMaxAt
	}
	lo, hi := drops.start[e.j], drops.start[e.j+1]
	room := math.NaN()
	value := drops.value[lo:hi]
	for kk, i := range drops.member[lo:hi] {
		if st.t[i] != s {
			c.bring(si, i, s, run)
		}
		v := st.v[i] + w*value[kk]
		st.v[i] = v
		if (sm.max && v > c.maxV[i]) || (sm.min && v < c.minV[i]) {
			if math.IsNaN(room) {
				room = c.roomAfter(gr, k)
			}
			f := found{s: s, room: room, side: 1, stream: int8(si), run: run}
			if sm.max && v > c.maxV[i] {
				c.maxV[i], c.maxAt[i] = v, f
			} else {
				c.minV[i], c.minAt[i] = v, f
			}
		}
	}
}

// roomAfter is how far the first event beyond event k's position lies, as gaps counts it.
func (c *Calculator) roomAfter(gr *grid, k int) float64 {
	g1 := k + 1
	for g1 < len(c.events) && c.events[g1].s == c.events[k].s {
		g1++
	}
	_, after := c.gaps(gr, k, g1)
	return after
}

// bring brings member i of stream si from its last update to s, offering the parabola's top
// or bottom between them and the value at s, as the stream's senses ask.
func (c *Calculator) bring(si int, i int32, s float64, run int32) {
	sm := c.streams[si]
	st := &c.state[si]
	t := st.t[i]
	dt := s - t
	v, g, cc := st.v[i], st.g[i], st.c[i]
	if cc != 0 {
		c.turn(sm, si, int(i), v, g, cc, t, dt, run)
	}
	v += g*dt + cc*dt*dt/2
	st.v[i], st.g[i], st.t[i] = v, g+cc*dt, s
	if sm.max && v > c.maxV[i] {
		c.maxV[i], c.maxAt[i] = v, found{s: s, stream: int8(si), run: run}
	} else if sm.min && v < c.minV[i] {
		c.minV[i], c.minAt[i] = v, found{s: s, stream: int8(si), run: run}
	}
}
