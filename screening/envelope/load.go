package envelope

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// Load is a train prepared for sweeping: its axles and the ends of its distributed parts as
// offsets behind its front, grouped so that a variable consist can be cut at any count.
// Prepare it once per train and use it for any number of trusses; it is read-only and safe
// for concurrent use.
type Load struct {
	name    string
	train   *traffic.Train
	uniform *traffic.Uniform

	// fixed holds the axles of every group but the last, and the part ends (unit 0); unit the
	// axles of one vehicle of the last group, measured from that vehicle's front.
	fixed   []item
	unit    []item
	unitLen float64
	r0      float64 // offset of the last group's first vehicle
	nMin    int
	nMax    int
	// periodic: no distributed parts, so a long run of identical last vehicles looks the same
	// from the bridge after a shift by one vehicle length (see counts).
	periodic bool
	hasUnfav bool
	hasCut   bool
	cutFrom  float64
	// tailM is where the train becomes a plain repetition of its last vehicle: the largest
	// of r0 and the finite ends of its distributed parts, m behind the front (see counts).
	tailM float64
	// initial value of each part reaching indefinitely ahead (it covers the whole bridge while
	// the train approaches), by which area it multiplies.
	ahead []aheadPart
}

type aheadPart struct {
	q    float64
	mode traffic.PartMode
}

type itemKind uint8

const (
	axle     itemKind = iota // a point load w (kN)
	wholeEnd                 // an end of a part applied whole: +q at its front end, -q at its rear
	unfavEnd                 // an end of a part applied where unfavourable
	cutFront                 // the start of a part cut at the unfavourable length
)

type item struct {
	d    float64 // distance behind the train's front, m
	w    float64
	kind itemKind
	unit int32 // which vehicle of the last group carries it (1-based); 0: always present
}

// Prepare checks a train and prepares it for sweeping.
func Prepare(t *traffic.Train) (*Load, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("train %q: %w", t.Name, err)
	}
	ld := &Load{name: t.Name, train: t}
	if t.Uniform != nil {
		u := *t.Uniform
		ld.uniform = &u
		return ld, nil
	}
	if n := len(t.Consist); n > 0 {
		last := t.Consist[n-1]
		ld.r0 = t.FixedLengthM()
		ld.nMin, ld.nMax = last.Min, last.Max
		ld.unitLen = last.Vehicle.LengthM
		for _, a := range t.Axles(0) {
			ld.fixed = append(ld.fixed, item{d: a.AtM, w: a.LoadKN, kind: axle})
		}
		for _, a := range last.Vehicle.Axles {
			ld.unit = append(ld.unit, item{d: a.AtM, w: a.LoadKN, kind: axle})
		}
	}
	ld.periodic = len(t.Parts) == 0
	ld.tailM = ld.r0
	for _, p := range t.Parts {
		for _, e := range []float64{p.FromM, p.ToM} {
			if !math.IsInf(e, 0) {
				ld.tailM = max(ld.tailM, e)
			}
		}
	}
	for _, p := range t.Parts {
		switch p.Mode {
		case traffic.Whole, traffic.WhereUnfavourable:
			kind := wholeEnd
			if p.Mode == traffic.WhereUnfavourable {
				kind = unfavEnd
				ld.hasUnfav = true
			}
			if math.IsInf(p.FromM, -1) {
				ld.ahead = append(ld.ahead, aheadPart{q: p.QKNPerM, mode: p.Mode})
			} else {
				ld.fixed = append(ld.fixed, item{d: p.FromM, w: p.QKNPerM, kind: kind})
			}
			if !math.IsInf(p.ToM, 1) {
				ld.fixed = append(ld.fixed, item{d: p.ToM, w: -p.QKNPerM, kind: kind})
			}
		case traffic.CutUnfavourable:
			ld.hasCut = true
			ld.cutFrom = p.FromM
			ld.fixed = append(ld.fixed, item{d: p.FromM, w: p.QKNPerM, kind: cutFront})
		}
	}
	return ld, nil
}

// Name is the train's name.
func (ld *Load) Name() string { return ld.name }

// Train is the train the load was prepared from.
func (ld *Load) Train() *traffic.Train { return ld.train }

// count is one sweep of a variable consist: the train with sweep vehicles in its last group
// stands for the train with report vehicles (report >= sweep); placements whose bridge
// window reaches the last swept vehicle move back by (report - sweep) vehicle lengths.
type count struct{ sweep, report int }

// counts lists the sweeps that cover every count from nMin to nMax on a span of spanM; all
// lists every count, for the tests that compare the shortcut with the full list.
//
// Only vehicles on the bridge matter. With no distributed parts, a window of the span's
// length that sees the train's fixed front part cannot see beyond the first k = ceil(span /
// vehicle length) + 1 vehicles of the last group, a window that sees the train's tail sees
// none of its fixed part once the group has k + 1 vehicles, and windows over the group alone
// repeat with the vehicle length. So any count of at least k + 1 = cMax shows the bridge the
// same loadings as cMax itself, shifted along the train, and the sweeps are the counts below
// cMax plus one at cMax standing for the rest.
//
// With distributed parts the counts up to steadyCount are swept, and no more: see there.
func (ld *Load) counts(spanM float64, all bool) []count {
	hi := ld.lastSwept(spanM, all)
	if ld.periodic && !all && len(ld.unit) > 0 && hi < ld.nMax {
		// hi = cMax: the counts below it, and cMax standing for every count from it on.
		out := make([]count, 0, max(0, hi-ld.nMin)+1)
		for n := ld.nMin; n < hi; n++ {
			out = append(out, count{n, n})
		}
		return append(out, count{hi, max(ld.nMin, hi)})
	}
	out := make([]count, 0, hi-ld.nMin+1)
	for n := ld.nMin; n <= hi; n++ {
		out = append(out, count{n, n})
	}
	return out
}

// lastSwept is the largest count counts sweeps, computed without listing them, so that a
// train too large to sweep is refused before anything is allocated for it.
func (ld *Load) lastSwept(spanM float64, all bool) int {
	switch {
	case len(ld.unit) == 0:
		return ld.nMin
	case all:
		return ld.nMax
	case !ld.periodic:
		return min(ld.nMax, max(ld.nMin, ld.steadyCount(spanM)))
	}
	// cMax = ceil(span / vehicle length) + 2, in floating point: it may exceed any int.
	if k := math.Ceil(spanM/ld.unitLen) + 2; k < float64(ld.nMax) {
		return int(k)
	}
	return ld.nMax
}

// steadyCount is a count c of the last group beyond which one more vehicle shows the bridge
// no loading that c vehicles do not: every count above it gives the same envelope as c.
//
// Why. Measure offsets d behind the train's front; vehicle v of the last group covers
// [F(v), F(v) + L], F(v) = r0 + (v-1) L, and beyond tailM (the largest of r0 and the finite
// part ends) the train is its parts' constant loads (a part reaching indefinitely behind,
// applied whole, where unfavourable or cut anywhere behind its start) plus a plain
// repetition of the vehicle. So for d > tailM, the train with n vehicles loads d + L exactly
// as the train with n - 1 loads d. A window of the bridge's length sees offsets [s - xl, s -
// x0] with the front at s. The trains with n and n - 1 vehicles differ only where the window
// meets vehicle n, and then the window starts at s - xl >= F(n) - span. If F(n-1) - span >
// tailM, the window moved back by one vehicle (front at s - L) starts beyond tailM and shows
// the train with n - 1 vehicles the same loading; the converse holds by the same shift. So
// for every n with r0 + (n-2) L - span > tailM, counts n and n - 1 give the same extremes;
// c is the largest n failing that, plus one for rounding. In words: once the extra vehicles
// can stand on the bridge only where the locomotive and the parts' ends are entirely beyond
// it, more vehicles change nothing. The result is at least 1 and at most nMax (computed in
// floating point, which cannot overflow, before it is made an int).
func (ld *Load) steadyCount(spanM float64) int {
	c := math.Floor(2+(ld.tailM+spanM-ld.r0)/ld.unitLen) + 1
	if !(c < float64(ld.nMax)) { // also NaN
		return ld.nMax
	}
	return max(1, int(c))
}

// items lays out the train with n vehicles in its last group: fixed items, then the axles of
// vehicles 1..n tagged with their vehicle number.
func (ld *Load) items(n int, dst []item) []item {
	dst = append(dst[:0], ld.fixed...)
	for v := 1; v <= n; v++ {
		front := ld.r0 + float64(v-1)*ld.unitLen
		for _, it := range ld.unit {
			it.d += front
			it.unit = int32(v)
			dst = append(dst, it)
		}
	}
	return dst
}

// lengthM is the train's length over buffers with n vehicles in its last group.
func (ld *Load) lengthM(n int) float64 {
	if len(ld.unit) == 0 {
		return ld.r0
	}
	return ld.r0 + float64(n)*ld.unitLen
}
