package fatigue

import (
	"cmp"
	"math"
	"slices"
)

// A passage's events depend on the train and on where the line kinks, not on the line's
// ordinates: members whose lines kink at the same panel points (every member of a truss with
// a polygonal chord kinks at every panel point; in a Pratt truss a chord and the diagonal or
// vertical carrying the same panel's shear share theirs) take one merged list. The Calculator
// keeps the lists of the current bridge (Forget lets them go), by train and kink positions.

// eventKey finds a kept list: the train, the number of kinks and a hash of their positions
// (a hash shared by different positions is told apart by comparing them).
type eventKey struct {
	tr *Train
	n  int
	h  uint64
}

// eventList is one kept list: the events of tr over kinks at x (the kinks' own slice, which
// the line keeps unchanged).
type eventList struct {
	tr *Train
	x  []float64
	ev []event
}

// maxKeptEventLists and maxKeptEvents bound the lists a Calculator keeps, and the events in
// them (16 bytes each): a bridge of 62 members, each with lines of its own kinks, under 6
// trains of passages both ways stays below them. A larger bridge's lists are let go and
// merged again (a truss of over a hundred members whose every line kinks at every panel
// point would otherwise hold tens of megabytes in each worker).
const (
	maxKeptEventLists = 1024
	maxKeptEvents     = 1 << 16
)

// eventsOf is the ordered events of tr over k, from the kept lists or merged and kept.
func (c *Calculator) eventsOf(k *kinks, tr *Train) []event {
	return c.keptEvents(k, tr, nil, nil)
}

// eventsExtending is eventsOf(k, tb) for a train tb whose items begin with ta's (ta with
// more vehicles at its tail), given ta's events eva: tb's own items' events merged into eva.
func (c *Calculator) eventsExtending(k *kinks, ta, tb *Train, eva []event) []event {
	return c.keptEvents(k, tb, ta, eva)
}

// keptEvents finds tr's events over k among the kept lists, or builds them (from the events
// eva of the train ta whose items tr's begin with, when ta is not nil) and keeps them.
func (c *Calculator) keptEvents(k *kinks, tr, ta *Train, eva []event) []event {
	h := uint64(14695981039346656037) // FNV-1a over the positions' bits
	for _, x := range k.x {
		h ^= math.Float64bits(x)
		h *= 1099511628211
	}
	key := eventKey{tr: tr, n: len(k.x), h: h}
	build := func(dst []event) []event {
		if ta == nil {
			return mergeKinks(dst, &c.eventScratch, k, tr.items, 0)
		}
		return c.extendEvents(dst, k, tr, len(ta.items), eva)
	}
	if i, ok := c.eventIndex[key]; ok && slices.Equal(c.eventLists[i].x, k.x) {
		return c.eventLists[i].ev
	} else if ok {
		// Another list has the hash: build into scratch (or, extending eva, which may be that
		// scratch, anew) and keep nothing.
		if ta != nil {
			return build(nil)
		}
		c.events = build(c.events)
		return c.events
	}
	if len(c.eventLists) >= maxKeptEventLists || c.eventsKept+len(k.x)*len(tr.items) > maxKeptEvents || c.eventIndex == nil {
		c.forgetEvents()
	}
	if len(c.eventLists) < cap(c.eventLists) {
		c.eventLists = c.eventLists[:len(c.eventLists)+1]
	} else {
		c.eventLists = append(c.eventLists, eventList{})
	}
	l := &c.eventLists[len(c.eventLists)-1]
	l.tr, l.x = tr, k.x
	if ta != nil && sameArray(l.ev, eva) {
		// The slot's storage is eva's (the lists were let go just now): build anew.
		l.ev = nil
	}
	l.ev = build(l.ev)
	c.eventsKept += cap(l.ev)
	c.eventIndex[key] = len(c.eventLists) - 1
	return l.ev
}

// extendEvents writes into dst the events of tr over k, given the events eva of the train
// made of tr's first na items, and returns it: the events of the items from na on, merged
// (mergeKinks) and then merged into eva. The order is (position, kink, item) as mergeKinks':
// every item from na on comes after every item before, so among equal positions and kinks
// eva's event comes first, and only the position and the kink decide otherwise. eva's events
// before the first new position are copied as they are.
func (c *Calculator) extendEvents(dst []event, k *kinks, tr *Train, na int, eva []event) []event {
	ex := mergeKinks(c.extraEvents, &c.eventScratch, k, tr.items[na:], int32(na))
	c.extraEvents = ex
	n := len(eva) + len(ex)
	out := slices.Grow(dst[:0], n)
	if len(ex) == 0 {
		return append(out, eva...)
	}
	i, _ := slices.BinarySearchFunc(eva, ex[0].s, func(e event, s float64) int { return cmp.Compare(e.s, s) })
	out = append(out, eva[:i]...)
	j := 0
	for i < len(eva) && j < len(ex) {
		if e, a := ex[j], eva[i]; e.s < a.s || e.s == a.s && e.j < a.j {
			out = append(out, e)
			j++
		} else {
			out = append(out, a)
			i++
		}
	}
	out = append(out, eva[i:]...)
	return append(out, ex[j:]...)
}

// forgetEvents lets go of the kept lists (their storage stays for reuse, up to the bound).
func (c *Calculator) forgetEvents() {
	all := c.eventLists[:cap(c.eventLists)]
	held := 0
	for i := range all {
		all[i].tr, all[i].x = nil, nil
		held += cap(all[i].ev)
	}
	if held > maxKeptEvents {
		// More than the bound: the storage goes too.
		for i := range all {
			all[i].ev = nil
		}
	}
	c.eventLists, c.eventsKept = c.eventLists[:0], 0
	if c.eventIndex == nil {
		c.eventIndex = map[eventKey]int{}
	}
	clear(c.eventIndex)
}

// mergeKinks writes into dst every position where one of items (the train's items from index
// first on) reaches a kink of k, in order of position, and returns it; tmp is scratch. The items are in order of offset, and
// adding a kink's x keeps that order (also in floating point), so each kink's events are
// already a sorted run; the runs, in order of kinks, are merged pairwise, about log2(kinks)
// linear passes. Among equal positions earlier kinks come first, then earlier items: the
// order (position, kink, item), which History's sums follow.
//
// A line of a few kinks (a chord's three, a diagonal's four) takes a direct merge instead:
// the kink whose next event comes first gives it, the first such kink among equals.
func mergeKinks(dst []event, tmp *[]event, k *kinks, items []item, first int32) []event {
	ni := len(items)
	n := ni * len(k.x)
	if len(k.x) <= fewKinks {
		return mergeFewKinks(slices.Grow(dst[:0], n)[:n], k.x, items, first)
	}
	src := slices.Grow(dst[:0], n)[:n]
	pos := 0
	for j, x := range k.x {
		for i, it := range items {
			src[pos] = event{s: x + it.d, it: first + int32(i), j: int32(j)}
			pos++
		}
	}
	out := slices.Grow((*tmp)[:0], n)[:n]
	for run := ni; run > 0 && run < n; run *= 2 {
		for lo := 0; lo < n; lo += 2 * run {
			mid, hi := min(lo+run, n), min(lo+2*run, n)
			a, b, o := src[lo:mid], src[mid:hi], out[lo:hi]
			i, j := 0, 0
			for q := range o {
				// take from b only when strictly earlier: a's kinks come first among equals
				if i < len(a) && (j == len(b) || a[i].s <= b[j].s) {
					o[q] = a[i]
					i++
				} else {
					o[q] = b[j]
					j++
				}
			}
		}
		src, out = out, src
	}
	*tmp = out
	return src
}

// fewKinks is the most kinks mergeFewKinks takes.
const fewKinks = 6

// mergeFewKinks fills dst (len(items) len(x) long) with the events of items over kinks at x,
// in the order (position, kink, item), and returns it. At the top of each iteration next[j]
// is the position of kink j's next event (item at[j]), +Inf when it has none left.
func mergeFewKinks(dst []event, x []float64, items []item, first int32) []event {
	if len(items) == 0 {
		return dst
	}
	var next [fewKinks]float64
	var at [fewKinks]int32
	nk := len(x)
	for j := range nk {
		next[j] = x[j] + items[0].d
	}
	for q := range dst {
		best := 0
		for j := 1; j < nk; j++ {
			if next[j] < next[best] {
				best = j
			}
		}
		i := at[best]
		dst[q] = event{s: next[best], it: first + i, j: int32(best)}
		i++
		at[best] = i
		if int(i) < len(items) {
			next[best] = x[best] + items[i].d
		} else {
			next[best] = math.Inf(1)
		}
	}
	return dst
}

// sameArray reports whether a and b begin at the same element of one array (every list here
// begins at its array's first).
func sameArray(a, b []event) bool {
	return cap(a) > 0 && cap(b) > 0 && &a[:1][0] == &b[:1][0]
}
