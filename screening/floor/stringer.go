package floor

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// flatTrain is a train as a simple span with influence lines that are never negative sees
// it: every load adds to the effect, so a part applied where unfavourable is applied whole, a
// part cut at the unfavourable length runs on for ever, a uniform load of variable length is
// as long as it may be, and a variable consist has as many vehicles as can matter.
type flatTrain struct {
	name  string
	count int
	lenM  float64
	axles []traffic.Axle // offsets behind the front
	parts []flatPart
	// cut is the start of a part cut at the unfavourable length (hasCut), for the placement.
	cut    float64
	hasCut bool
}

type flatPart struct {
	from, to, q float64 // offsets behind the front, from may be -Inf, to +Inf
}

// flatten prepares t for a span of spanM.
func flatten(t *traffic.Train, spanM float64) flatTrain {
	f := flatTrain{name: t.Name}
	if u := t.Uniform; u != nil {
		f.parts = []flatPart{{from: 0, to: u.MaxM, q: u.QKNPerM}}
		f.lenM = u.MaxM
		return f
	}
	tail := 0.0
	for _, p := range t.Parts {
		to := p.ToM
		if p.Mode == traffic.CutUnfavourable {
			to = math.Inf(1)
			f.cut, f.hasCut = p.FromM, true
		}
		f.parts = append(f.parts, flatPart{from: p.FromM, to: to, q: p.QKNPerM})
		for _, e := range []float64{p.FromM, p.ToM} {
			if !math.IsInf(e, 0) {
				tail = max(tail, e)
			}
		}
	}
	if n := len(t.Consist); n > 0 {
		last := t.Consist[n-1]
		r0 := t.FixedLengthM()
		tail = max(tail, r0)
		// More vehicles only add load behind; beyond this count a window of the span's
		// length that meets a further vehicle sees what an earlier window saw (the shift
		// argument of envelope's steadyCount), so this count stands for every larger one.
		c := math.Floor(2+(tail+spanM-r0)/last.Vehicle.LengthM) + 1
		f.count = last.Max
		if c < float64(last.Max) {
			f.count = max(last.Min, int(c))
		}
		f.axles = t.Axles(f.count)
		f.lenM = t.LengthM(f.count)
	}
	return f
}

// Peak is the largest moment of a simple span under one train: its value (kN·m, full train
// load), the section where it stands (m from the end the train enters over) and the train's
// position.
type Peak struct {
	Value    float64
	SectionM float64
	Extreme  envelope.Extreme
}

// item is a point of the span that moves with the train (an axle or a part's end) or stays
// (a bearing).
type item struct {
	d     float64 // offset behind the front; for a bearing, its x
	fixed bool    // a bearing
}

// beam is a simple span loaded by a train standing with its front at s. The train's axles
// are in ascending offset, so those on the span are a window of them, [i0, i1).
type beam struct {
	span   float64
	t      *flatTrain
	s      float64
	ra     float64 // left reaction
	i0, i1 int
	pts    []float64 // scratch of best
}

func (b *beam) place(s float64) {
	b.s = s
	L := b.span
	ax := b.t.axles
	// On the span: 0 < s - d < L, that is s - L < d < s.
	b.i0 = sort.Search(len(ax), func(i int) bool { return ax[i].AtM > s-L })
	b.i1 = b.i0 + sort.Search(len(ax)-b.i0, func(i int) bool { return ax[b.i0+i].AtM >= s })
	ra := 0.0
	for _, a := range ax[b.i0:b.i1] {
		ra += a.LoadKN * (L - (s - a.AtM)) / L
	}
	for _, p := range b.t.parts {
		lo, hi := max(s-p.to, 0), min(s-p.from, L)
		if hi > lo {
			ra += p.q * (hi - lo) * (L - (lo+hi)/2) / L
		}
	}
	b.ra = ra
}

// load is the total load on the span.
func (b *beam) load() float64 {
	w := 0.0
	for _, a := range b.t.axles[b.i0:b.i1] {
		w += a.LoadKN
	}
	return w + b.partLoad()
}

func (b *beam) partLoad() float64 {
	w := 0.0
	for _, p := range b.t.parts {
		lo, hi := max(b.s-p.to, 0), min(b.s-p.from, b.span)
		if hi > lo {
			w += p.q * (hi - lo)
		}
	}
	return w
}

// x is where an item stands.
func (b *beam) x(it item) float64 {
	if it.fixed {
		return it.d
	}
	return b.s - it.d
}

// moment is the bending moment at xi (sagging positive).
func (b *beam) moment(xi float64) float64 {
	m := b.ra * xi
	for _, a := range b.t.axles[b.i0:b.i1] {
		if x := b.s - a.AtM; x < xi {
			m -= a.LoadKN * (xi - x)
		}
	}
	for _, p := range b.t.parts {
		lo, hi := max(b.s-p.to, 0), min(b.s-p.from, xi)
		if hi > lo {
			m -= p.q * ((xi-lo)*(xi-lo) - (xi-hi)*(xi-hi)) / 2
		}
	}
	return m
}

// shearRight is the shear just right of xi (the loads at xi included on its left).
func (b *beam) shearRight(xi float64) float64 {
	v := b.ra
	for _, a := range b.t.axles[b.i0:b.i1] {
		if x := b.s - a.AtM; x <= xi {
			v -= a.LoadKN
		}
	}
	for _, p := range b.t.parts {
		lo, hi := max(b.s-p.to, 0), min(b.s-p.from, xi)
		if hi > lo {
			v -= p.q * (hi - lo)
		}
	}
	return v
}

// intensity is the distributed load at x (kN/m).
func (b *beam) intensity(x float64) float64 {
	w := 0.0
	for _, p := range b.t.parts {
		if x > b.s-p.to && x < b.s-p.from && x > 0 && x < b.span {
			w += p.q
		}
	}
	return w
}

// best is the largest moment along the span for the current position: under a load point,
// or where the shear vanishes inside a stretch of distributed load (for a fixed position the
// moment is concave between axles, so these are its only maxima).
func (b *beam) best() (m, at float64) {
	pts := append(b.pts[:0], 0, b.span)
	for _, a := range b.t.axles[b.i0:b.i1] {
		pts = append(pts, b.s-a.AtM)
	}
	for _, p := range b.t.parts {
		for _, e := range [2]float64{p.from, p.to} {
			if x := b.s - e; x > 0 && x < b.span {
				pts = append(pts, x)
			}
		}
	}
	slices.Sort(pts)
	b.pts = pts
	for k, x := range pts {
		if v := b.moment(x); v > m {
			m, at = v, x
		}
		if k+1 == len(pts) || len(b.t.parts) == 0 {
			continue
		}
		x1 := pts[k+1]
		if w := b.intensity((x + x1) / 2); w > 0 {
			if v0 := b.shearRight(x); v0 > 0 && v0 < w*(x1-x) {
				if v := b.moment(x) + v0*v0/(2*w); v > m {
					m, at = v, x+v0/w
				}
			}
		}
	}
	return m, at
}

// MaxMoment is the absolute largest bending moment anywhere along a simple span of spanM
// under the train's full load (both directions give the same, the span being its own mirror
// image).
//
// Method. Between two train positions at which some axle or part end crosses a bearing, the
// same loads stand on the span, and the moment under an axle or a part end, and the largest
// moment in a stretch of distributed load (M(a) + V(a)²/2w with the shear V(a) just right of
// the stretch's start a, where the shear vanishes inside it), are polynomials of degree at most
// 4 in the position. For a fixed position the span's largest moment is at one of those
// points, so the absolute maximum is at a position where one of these polynomials is
// stationary, where the shear's zero reaches a stretch's end, or at a crossing. Each is found
// exactly (poly.go) and the span is evaluated there directly. With axles only, the stationary
// position is the classical one: mid-span halfway between the axle and the resultant of the
// loads on the span.
func MaxMoment(t *traffic.Train, spanM float64) (Peak, error) {
	if !(spanM > 0) || math.IsInf(spanM, 0) {
		return Peak{}, fmt.Errorf("stringer span %v m: must be positive and finite", spanM)
	}
	if err := t.Validate(); err != nil {
		return Peak{}, fmt.Errorf("train %q: %w", t.Name, err)
	}
	ft := flatten(t, spanM)
	var events []float64
	var moving []item
	for _, a := range ft.axles {
		moving = append(moving, item{d: a.AtM})
	}
	for _, p := range ft.parts {
		for _, e := range []float64{p.from, p.to} {
			if !math.IsInf(e, 0) {
				moving = append(moving, item{d: e})
			}
		}
	}
	for _, it := range moving {
		events = append(events, it.d, it.d+spanM)
	}
	slices.Sort(events)
	events = slices.Compact(events)
	// Before the first crossing and after the last the span's loading stays the same.
	events = append([]float64{events[0] - spanM}, events...)
	events = append(events, events[len(events)-1]+spanM)

	b := &beam{span: spanM, t: &ft}
	probe := &beam{span: spanM, t: &ft}
	peak := Peak{}
	try := func(s float64) {
		probe.place(s)
		if m, at := probe.best(); m > peak.Value {
			peak.Value, peak.SectionM = m, at
			peak.Extreme.Placement.HeadM = s
		}
	}
	// No loading of total W on a simple span makes a moment above WL/4: pieces whose bound
	// cannot beat the peak found are skipped, the most promising first. Within a piece the
	// axles on the span stay the same and the distributed load is linear in the position.
	type piece struct{ s0, s1, bound float64 }
	pieces := make([]piece, 0, len(events))
	for k := 0; k+1 < len(events); k++ {
		s0, s1 := events[k], events[k+1]
		b.place((s0 + s1) / 2)
		w := b.load() - b.partLoad()
		b.place(s0)
		w0 := b.partLoad()
		b.place(s1)
		w1 := b.partLoad()
		pieces = append(pieces, piece{s0, s1, (w + max(w0, w1)) * spanM / 4})
	}
	slices.SortFunc(pieces, func(p, q piece) int { return cmp.Compare(q.bound, p.bound) })
	var cand, ws []float64
	var on []item
	for _, pc := range pieces {
		s0, s1 := pc.s0, pc.s1
		if pc.bound <= peak.Value {
			break
		}
		try(s0)
		try(s1)
		b.place((s0 + s1) / 2)
		if b.partLoad() == 0 && pc.bound == b.load()*spanM/4 {
			// Axles alone on the span throughout the piece: the moment under axle k is
			// largest, the classical rule, where mid-span halves the distance between the
			// axle and the resultant of the axles on the span (clamped to the piece).
			w, wx := 0.0, 0.0
			for _, a := range ft.axles[b.i0:b.i1] {
				w += a.LoadKN
				wx += a.LoadKN * (b.s - a.AtM)
			}
			xbar := wx / w
			for _, a := range ft.axles[b.i0:b.i1] {
				xk := b.s - a.AtM
				try(min(max(b.s+(spanM-xbar-xk)/2, s0), s1))
			}
			continue
		}
		on = onSpan(b, on[:0])
		pos := func(u float64) float64 { return s0 + u*(s1-s0) }
		cand = cand[:0]
		// Moments under the load points on the span.
		for _, it := range on {
			if it.fixed {
				continue
			}
			var v [polyDeg + 1]float64
			for j, u := range nodes {
				b.place(pos(u))
				v[j] = b.moment(b.x(it))
			}
			c := fit(v)
			cand = roots(deriv(c[:]), cand)
		}
		// The largest moment inside each stretch of distributed load.
		b.place((s0 + s1) / 2)
		ws = ws[:0]
		for j := 0; j+1 < len(on); j++ {
			ws = append(ws, b.intensity((b.x(on[j])+b.x(on[j+1]))/2))
		}
		for j, w := range ws {
			if !(w > 0) {
				continue
			}
			lo, hi := on[j], on[j+1]
			var g, v0, room [polyDeg + 1]float64
			for n, u := range nodes {
				b.place(pos(u))
				xa := b.x(lo)
				v0[n] = b.shearRight(xa)
				room[n] = w*(b.x(hi)-xa) - v0[n]
				g[n] = b.moment(xa) + v0[n]*v0[n]/(2*w)
			}
			cg, cv, cr := fit(g), fit(v0), fit(room)
			cand = roots(deriv(cg[:]), cand)
			cand = roots(cv[:], cand)
			cand = roots(cr[:], cand)
		}

		for _, u := range cand {
			try(pos(u))
		}
	}
	if peak.Value > 0 {
		peak.Extreme = placement(&ft, spanM, peak)
	}
	return peak, nil
}

// onSpan lists the items standing on the span for b's position, in order along it: the
// bearings, the axles and the parts' ends.
func onSpan(b *beam, out []item) []item {
	out = append(out, item{d: 0, fixed: true}, item{d: b.span, fixed: true})
	for _, a := range b.t.axles[b.i0:b.i1] {
		out = append(out, item{d: a.AtM})
	}
	for _, p := range b.t.parts {
		for _, e := range [2]float64{p.from, p.to} {
			if x := b.s - e; !math.IsInf(e, 0) && x >= 0 && x <= b.span {
				out = append(out, item{d: e})
			}
		}
	}
	slices.SortFunc(out, func(p, q item) int {
		xp, xq := b.x(p), b.x(q)
		switch {
		case xp < xq:
			return -1
		case xp > xq:
			return 1
		}
		return 0
	})
	return out
}

// placement describes the train's position at the peak as the envelope package does.
func placement(ft *flatTrain, spanM float64, p Peak) envelope.Extreme {
	s := p.Extreme.HeadM
	e := envelope.Extreme{Value: p.Value, Train: ft.name}
	e.Loaded = true
	e.Direction = envelope.LeftToRight
	e.HeadM = s
	e.Count = ft.count
	e.LengthM = ft.lenM
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, a := range ft.axles {
		if x := s - a.AtM; x >= 0 && x <= spanM {
			lo, hi = min(lo, x), max(hi, x)
		}
	}
	for _, q := range ft.parts {
		a, b := max(s-q.to, 0), min(s-q.from, spanM)
		if b > a {
			lo, hi = min(lo, a), max(hi, b)
		}
	}
	if lo <= hi {
		e.LoadedFromM, e.LoadedToM = lo, hi
	}
	if ft.hasCut {
		// The cut part runs from its start back to the span's far bearing (x = 0).
		e.TrailingM = max(0, s-ft.cut)
	}
	return e
}
