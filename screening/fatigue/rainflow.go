package fatigue

import "math"

// Cycle is a count of cycles of one range: Count is 1 for a full cycle, 0.5 for a half cycle.
type Cycle struct {
	Range, Count float64
}

// Rainflow counts the cycles of a sequence of turning points (see Turning) by rainflow
// counting, ASTM E1049 section 5.4.4 (three-point method, with half cycles): each new point is
// pushed on a stack; while the latest range X (the last two points) is at least the range Y
// before it, Y is a full cycle and its two points leave the stack, unless Y holds the
// history's starting point, in which case Y is a half cycle and only that point leaves. What
// is left at the end counts as half cycles. It appends to dst[:0].
//
// A passage's history starts and ends at zero, so its first and last ranges are half cycles
// that a following passage would close into a full cycle; counting them as halves, as the
// standard does for one history, keeps each passage on its own.
func Rainflow(points []float64, dst []Cycle, stack []float64) ([]Cycle, []float64) {
	dst = dst[:0]
	st := stack[:0]
	// The bottom of the stack is always the current starting point: points leave from the
	// top, except the starting point itself.
	for _, p := range points {
		st = append(st, p)
		for len(st) >= 3 {
			n := len(st)
			x := math.Abs(st[n-1] - st[n-2])
			y := math.Abs(st[n-2] - st[n-3])
			if x < y {
				break
			}
			if n == 3 {
				dst = append(dst, Cycle{Range: y, Count: 0.5})
				st[0], st[1] = st[1], st[2]
				st = st[:2]
				continue
			}
			dst = append(dst, Cycle{Range: y, Count: 1})
			st[n-3] = st[n-1]
			st = st[:n-2]
		}
	}
	for k := 1; k < len(st); k++ {
		dst = append(dst, Cycle{Range: math.Abs(st[k] - st[k-1]), Count: 0.5})
	}
	return dst, st
}

// RainflowRepeated counts the cycles of one passage as one of the passages that follow one
// another over the bridge, each starting and ending with the bridge empty: the history taken
// as repeating, rearranged to start and end at its largest peak or deepest valley, counted by Rainflow
// (ASTM E1049's simplified rainflow counting for repeating histories, from memory). Every
// range is then part of a full cycle (two half cycles of one range, at most, make it one), and
// the passage's largest range, its highest peak to its lowest valley, counts as one full
// cycle: a single axle over a line that changes sign gives one cycle of max - min, as is
// common practice. Rainflow on the passage alone would count that range as half a cycle and
// its two ends as two more halves, which leaves the damage of a member whose force reverses
// too low (by three eighths for a single axle over equal positive and negative parts, slope
// 3). Where the force never reverses, both count the same. points are turning points
// (Turning); rot is scratch space for the rearranged history.
func RainflowRepeated(points []float64, dst []Cycle, stack, rot []float64) ([]Cycle, []float64, []float64) {
	n := len(points)
	if n < 3 {
		dst, stack = Rainflow(points, dst, stack)
		return dst, stack, rot
	}
	q := points
	if q[0] == q[n-1] {
		q = q[:n-1] // the passage closes on itself: the join adds no range
	}
	// The run starts at its extreme of the larger size (the first of equals), so that a
	// passage and its negative (a line read with the other sign) pair their points alike.
	top, bottom := 0, 0
	for k, v := range q {
		if v > q[top] {
			top = k
		}
		if v < q[bottom] {
			bottom = k
		}
	}
	lo, hi := q[bottom], q[top]
	if math.Abs(lo) > math.Abs(hi) || (math.Abs(lo) == math.Abs(hi) && bottom < top) {
		top = bottom
	}
	// Differences within rounding of the largest value (Turning's tolerance, TurningTol) are
	// no reversal here either.
	tol := 1e-9 * max(math.Abs(lo), math.Abs(hi))
	if len(q) < n && (q[0] <= lo+tol || q[0] >= hi-tol) {
		// The passage starts and ends at its lowest or highest point (a force that never
		// reverses): counted from there it is already the repeating run's count.
		dst, stack = Rainflow(points, dst, stack)
		return dst, stack, rot
	}
	rot = rot[:0]
	for k := range len(q) + 1 {
		v := q[(top+k)%len(q)]
		m := len(rot)
		switch {
		case m > 0 && math.Abs(v-rot[m-1]) <= tol:
		case m >= 2 && (rot[m-1]-rot[m-2])*(v-rot[m-1]) > 0:
			rot[m-1] = v // on in the same sense: the join made rot[m-1] no turning point
		default:
			rot = append(rot, v)
		}
	}
	dst, stack = Rainflow(rot, dst, stack)
	return dst, stack, rot
}
