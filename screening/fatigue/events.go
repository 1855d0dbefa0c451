package fatigue

import (
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

// maxKeptEventLists bounds the lists a Calculator keeps: a bridge of 62 members, each with
// lines of its own kinks, under 6 trains of passages both ways stays below it.
const maxKeptEventLists = 1024

// eventsOf is the ordered events of tr over k, from the kept lists or merged and kept.
func (c *Calculator) eventsOf(k *kinks, tr *Train) []event {
	h := uint64(14695981039346656037) // FNV-1a over the positions' bits
	for _, x := range k.x {
		h ^= math.Float64bits(x)
		h *= 1099511628211
	}
	key := eventKey{tr: tr, n: len(k.x), h: h}
	if i, ok := c.eventIndex[key]; ok && slices.Equal(c.eventLists[i].x, k.x) {
		return c.eventLists[i].ev
	} else if ok {
		// Another list has the hash: merge into scratch and keep nothing.
		c.events = mergeKinks(c.events, &c.eventScratch, k, tr)
		return c.events
	}
	if len(c.eventLists) >= maxKeptEventLists || c.eventIndex == nil {
		c.forgetEvents()
	}
	if len(c.eventLists) < cap(c.eventLists) {
		c.eventLists = c.eventLists[:len(c.eventLists)+1]
	} else {
		c.eventLists = append(c.eventLists, eventList{})
	}
	l := &c.eventLists[len(c.eventLists)-1]
	l.tr, l.x = tr, k.x
	l.ev = mergeKinks(l.ev, &c.eventScratch, k, tr)
	c.eventIndex[key] = len(c.eventLists) - 1
	return l.ev
}

// forgetEvents lets go of the kept lists (their storage stays for reuse).
func (c *Calculator) forgetEvents() {
	for i := range c.eventLists {
		c.eventLists[i].tr, c.eventLists[i].x = nil, nil
	}
	c.eventLists = c.eventLists[:0]
	if c.eventIndex == nil {
		c.eventIndex = map[eventKey]int{}
	}
	clear(c.eventIndex)
}

// mergeKinks writes into dst every position where an item of tr reaches a kink of k, in
// order of position, and returns it; tmp is scratch. The items are in order of offset, and
// adding a kink's x keeps that order (also in floating point), so each kink's events are
// already a sorted run; the runs, in order of kinks, are merged pairwise, about log2(kinks)
// linear passes. Among equal positions earlier kinks come first, then earlier items: the
// order (position, kink, item), which History's sums follow.
func mergeKinks(dst []event, tmp *[]event, k *kinks, tr *Train) []event {
	ni := len(tr.items)
	n := ni * len(k.x)
	src := slices.Grow(dst[:0], n)[:n]
	pos := 0
	for j, x := range k.x {
		for i, it := range tr.items {
			src[pos] = event{s: x + it.d, it: int32(i), j: int32(j)}
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
