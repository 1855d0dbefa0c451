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
