package envelope

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"

	"github.com/trussfleet/trussfleet/screening/analysis"
)

// Lines are the influence lines of one truss's members, prepared for moving loads in both
// directions. Build them once per truss with NewLines and sweep any number of trains over
// them; they are read-only afterwards and safe for concurrent use.
type Lines struct {
	x0, xl float64
	m      int
	// ord[i] are member i's ordinates at x.
	x   []float64
	ord [][]float64
	// dir[0] is the truss as given (trains running left to right); dir[1] its mirror image,
	// on which a train running right to left is swept as if it ran left to right.
	dir [2]direction
	// mirror, when the truss is its own mirror image (see mirrorOf), maps each member i to a
	// member whose line, as given, is i's line in the mirror image: a train running right to
	// left does to member i what it does, running left to right, to member mirror[i].
	mirror []int32
}

type direction struct {
	x   []float64
	ord [][]float64
	// plain has the panel points: enough for axles and whole distributed parts. The mirror
	// image's is built on first use, as a truss that is its own mirror image never needs it.
	plainOnce sync.Once
	plain     *grid
	// refined adds every member's zero crossings, for parts applied by sign and uniform
	// loads. Most trains never need it, so it is built on first use (once, also when several
	// goroutines sweep the same Lines).
	refinedOnce sync.Once
	refined     *grid
}

// plainGrid is direction d's grid of the panel points.
func (l *Lines) plainGrid(d int) *grid {
	dr := &l.dir[d]
	dr.plainOnce.Do(func() { dr.plain = newGrid(dr.x, dr.ord, false) })
	return dr.plain
}

// refinedGrid is direction d's refined grid, built on first use.
func (l *Lines) refinedGrid(d int) *grid {
	dr := &l.dir[d]
	dr.refinedOnce.Do(func() {
		rx := refine(dr.x, dr.ord)
		rord := make([][]float64, l.m)
		for i, o := range dr.ord {
			rord[i] = make([]float64, len(rx))
			for j, xv := range rx {
				rord[i][j] = analysis.Interpolate(dr.x, o, xv)
			}
		}
		dr.refined = newGrid(rx, rord, true)
		dr.refined.takeKinks(l.plainGrid(d))
	})
	return dr.refined
}

// takeKinks gives a refined grid the kinks of the plain grid p: a vertex the refined grid adds
// (a zero crossing) is a straight point of every line, and the slope changes at the panel
// points are those of the lines as given, not those of the interpolated ordinates, whose short
// segments' slopes carry rounding. So the kinks' slope changes sum as the plain grid's do, and
// a curvature built from them by sweepSparse returns to zero where the line ends; filtered
// noise would stay in it and grow with the square of the train's length.
func (g *grid) takeKinks(p *grid) {
	g.kinkStart = make([]int32, len(g.x)+1)
	g.kinkMember, g.kinkSlope = nil, nil
	k := 0
	for j, xv := range g.x {
		if k < len(p.x) && p.x[k] == xv {
			lo, hi := p.kinkStart[k], p.kinkStart[k+1]
			g.kinkMember = append(g.kinkMember, p.kinkMember[lo:hi]...)
			g.kinkSlope = append(g.kinkSlope, p.kinkSlope[lo:hi]...)
			k++
		}
		g.kinkStart[j+1] = int32(len(g.kinkMember))
	}
	if k != len(p.x) {
		panic("envelope: a refined grid lost a panel point")
	}
}

// grid holds, for every vertex j and member i (index j*m+i), how the influence line changes
// as a point moves rightwards across the vertex: its jump in value (non-zero only at the
// ends, where the line drops to zero outside the span) and its change of slope. For the
// refined grid, the same for the line's positive part (eta⁺ = max(eta, 0)) and negative part,
// and the running extremes of the line's integral that a load cut at the unfavourable length
// needs.
type grid struct {
	x           []float64
	eta         []float64 // ordinates at x
	jump, slope []float64
	endJumps    bool // some line is non-zero at a bearing
	// The entries of slope that are not rounding noise, by vertex (at the bearings, all):
	// vertex j's are kinkMember[kinkStart[j]:kinkStart[j+1]], with their slope changes in
	// kinkSlope.
	kinkStart  []int32
	kinkMember []int32
	kinkSlope  []float64
	// refined grid only
	jumpPos, slopePos, jumpNeg, slopeNeg []float64
	area                                 []float64 // integral E(x_j) of the line from x0
	dropMin, dropMax                     []float64 // fall of min(0, min E(x_k≤j)) at j, rise of the max
	dropMinAt, dropMaxAt                 byVertex  // their non-zero entries (sweepSparse)
	argMin, argMax                       []int32   // k attaining that min (max); -1 for 0 (beyond the left bearing)
	areaNet, areaPos, areaNeg            []float64 // per member
}

// NewLines prepares the influence lines of a truss: x are the deck panel points (m,
// strictly ascending, at least two), ordinates[i][j] member i's force (tension positive) per
// unit downward load at x[j]. Each line is linear between the given points and zero outside
// [x[0], x[last]]. The inputs are copied, not kept.
func NewLines(x []float64, ordinates [][]float64) (*Lines, error) {
	n := len(x)
	if n < 2 {
		return nil, fmt.Errorf("influence lines: need at least two panel points, got %d", n)
	}
	for j := 1; j < n; j++ {
		if !(x[j] > x[j-1]) || math.IsInf(x[j], 0) || math.IsNaN(x[j-1]) {
			return nil, fmt.Errorf("influence lines: panel points must ascend strictly, x[%d] = %v after %v", j, x[j], x[j-1])
		}
	}
	if len(ordinates) == 0 {
		return nil, errors.New("influence lines: no members")
	}
	// Members, vertices and kinks are indexed in 32 bits (the mirror table, the kink lists,
	// the vertices attaining a running extreme), on the refined grid too, which adds at most
	// one vertex per member and panel (a zero crossing): refuse lines whose worst case does
	// not fit, rather than let an index wrap. Real trusses stay far below (a few hundred
	// members and panel points give some 10^7).
	m := float64(len(ordinates))
	if worst := (float64(n) + m*float64(n-1)) * m; worst > math.MaxInt32 {
		return nil, fmt.Errorf("influence lines: %d members at %d panel points could need %.0f entries on the refined grid, more than the limit of %d", len(ordinates), n, worst, math.MaxInt32)
	}
	for i, o := range ordinates {
		if len(o) != n {
			return nil, fmt.Errorf("influence lines: member %d has %d ordinates for %d panel points", i, len(o), n)
		}
		for j, v := range o {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("influence lines: member %d ordinate %d is %v", i, j, v)
			}
		}
	}
	l := &Lines{x0: x[0], xl: x[n-1], m: len(ordinates), x: slices.Clone(x)}
	for _, o := range ordinates {
		l.ord = append(l.ord, slices.Clone(o))
	}
	mx := make([]float64, n)
	mord := make([][]float64, l.m)
	for j := range x {
		mx[j] = l.x0 + l.xl - x[n-1-j]
	}
	for i, o := range l.ord {
		mo := make([]float64, n)
		for j := range o {
			mo[j] = o[n-1-j]
		}
		mord[i] = mo
	}
	l.dir[0].x, l.dir[0].ord = l.x, l.ord
	l.dir[1].x, l.dir[1].ord = mx, mord
	l.plainGrid(0)
	l.mirror = mirrorOf(l.dir[0].x, l.dir[0].ord, mx, mord)
	return l, nil
}

// mirrorTol is how closely a truss must be its own mirror image for one direction's sweep
// to stand for the other's: panel points within 1e-9 of the span, ordinates within 1e-9 of
// the largest ordinate. A force taken from the mirror member then differs from the one the
// other direction's sweep would give by less than 1e-9 of the largest it could be, far below
// any digit a screening reports, while influence lines computed for a symmetric truss agree
// with their mirror images to rounding (about 1e-14).
const mirrorTol = 1e-9

// mirrorOf maps each member i to a member j whose line ord[j] matches i's mirrored line
// mord[i], when the panel points x are symmetric (mx, the mirrored points, match them) and
// every member has such a match; otherwise nil. Several members may share a match (equal
// lines, such as zero-force members), which is as good.
//
// Candidates are found by the lines' first moments about x's first index (a mirrored line's
// is that of its match) in a sorted list, then checked ordinate by ordinate.
func mirrorOf(x []float64, ord [][]float64, mx []float64, mord [][]float64) []int32 {
	n := len(x)
	span := x[n-1] - x[0]
	for j := range x {
		if math.Abs(mx[j]-x[j]) > mirrorTol*span {
			return nil
		}
	}
	scale := 0.0
	for _, o := range ord {
		for _, v := range o {
			scale = max(scale, math.Abs(v))
		}
	}
	tol := mirrorTol * max(scale, math.SmallestNonzeroFloat64)
	moment := func(o []float64) float64 {
		s := 0.0
		for k, v := range o {
			s += float64(k) * v
		}
		return s
	}
	type keyed struct {
		key float64
		i   int32
	}
	keys := make([]keyed, len(ord))
	for i, o := range ord {
		keys[i] = keyed{moment(o), int32(i)}
	}
	slices.SortFunc(keys, func(a, b keyed) int { return cmp.Compare(a.key, b.key) })
	// Matching lines differ by at most tol at each point, so their moments by at most
	// tol·n(n-1)/2 (and a little rounding).
	keyTol := tol*float64(n*n) + 1e-12*scale*float64(n*n)
	mirror := make([]int32, len(ord))
	for i, mo := range mord {
		want := moment(mo)
		k, _ := slices.BinarySearchFunc(keys, want-keyTol, func(a keyed, t float64) int { return cmp.Compare(a.key, t) })
		found := false
		for ; k < len(keys) && keys[k].key <= want+keyTol; k++ {
			if linesMatch(ord[keys[k].i], mo, tol) {
				mirror[i], found = keys[k].i, true
				break
			}
		}
		if !found {
			return nil
		}
	}
	return mirror
}

func linesMatch(a, b []float64, tol float64) bool {
	for k := range a {
		if math.Abs(a[k]-b[k]) > tol {
			return false
		}
	}
	return true
}

// Members is the number of influence lines.
func (l *Lines) Members() int { return l.m }

// SpanM is the length over which the lines are non-zero, x[last] - x[0].
func (l *Lines) SpanM() float64 { return l.xl - l.x0 }

// refine adds every member's zero crossings to the panel points, so that each line's positive
// and negative parts are linear between the refined points too.
func refine(x []float64, ord [][]float64) []float64 {
	out := slices.Clone(x)
	tiny := 1e-12 * (x[len(x)-1] - x[0])
	for _, o := range ord {
		for k := 0; k+1 < len(x); k++ {
			a, b := o[k], o[k+1]
			if a*b < 0 {
				xc := x[k] + (x[k+1]-x[k])*a/(a-b)
				if xc-x[k] > tiny && x[k+1]-xc > tiny {
					out = append(out, xc)
				}
			}
		}
	}
	slices.Sort(out)
	return slices.CompactFunc(out, func(a, b float64) bool { return math.Abs(b-a) <= tiny })
}

func newGrid(x []float64, ord [][]float64, refined bool) *grid {
	n, m := len(x), len(ord)
	g := &grid{x: x, eta: make([]float64, n*m)}
	for i, o := range ord {
		for j, v := range o {
			g.eta[j*m+i] = v
		}
	}
	g.jump, g.slope = changes(x, ord, func(v float64) float64 { return v })
	g.endJumps = slices.ContainsFunc(g.jump, func(v float64) bool { return v != 0 })
	if !refined { // a refined grid takes the plain grid's kinks (takeKinks)
		g.findKinks(x, ord)
	}
	g.areaNet = make([]float64, m)
	g.areaPos = make([]float64, m)
	g.areaNeg = make([]float64, m)
	for i, o := range ord {
		g.areaPos[i], g.areaNeg[i] = analysis.Areas(x, o)
		g.areaNet[i] = g.areaPos[i] + g.areaNeg[i]
	}
	if !refined {
		return g
	}
	// On the refined grid every zero crossing is a vertex, so the clipped lines are exact.
	g.jumpPos, g.slopePos = changes(x, ord, func(v float64) float64 { return max(v, 0) })
	g.jumpNeg, g.slopeNeg = changes(x, ord, func(v float64) float64 { return min(v, 0) })
	g.area = make([]float64, n*m)
	g.dropMin, g.dropMax = make([]float64, n*m), make([]float64, n*m)
	g.argMin, g.argMax = make([]int32, n*m), make([]int32, n*m)
	for i, o := range ord {
		e, lo, hi := 0.0, 0.0, 0.0
		argLo, argHi := int32(-1), int32(-1)
		for j := range x {
			if j > 0 {
				e += (o[j-1] + o[j]) / 2 * (x[j] - x[j-1])
			}
			g.area[j*m+i] = e
			if e < lo {
				g.dropMin[j*m+i] = lo - e
				lo, argLo = e, int32(j)
			}
			if e > hi {
				g.dropMax[j*m+i] = hi - e
				hi, argHi = e, int32(j)
			}
			g.argMin[j*m+i], g.argMax[j*m+i] = argLo, argHi
		}
	}
	g.dropMinAt, g.dropMaxAt = nonZero(g.dropMin, n, m), nonZero(g.dropMax, n, m)
	return g
}

// findKinks lists the grid's kinks: by vertex, the members whose line's slope changes there.
// A line straight through a vertex gives a slope change of rounding noise there, not zero;
// below 1e-12 of the steepest slope its ordinates could make over the panels beside the
// vertex, it is taken as none (which moves a force by at most 1e-12 of the largest it could
// be, times the span over the shorter of those panels: far below anything a truss's panel
// lengths make visible). The last bearing's change is the negative of the others' sum, so
// that a member's slope changes sum to zero exactly as the line's do: a slope, or a curvature
// that a distributed part builds from them (sweepSparse), returns to zero once the load has
// passed, whatever noise was left out.
func (g *grid) findKinks(x []float64, ord [][]float64) {
	n, m := len(x), len(ord)
	big := make([]float64, m)
	for i, o := range ord {
		for _, v := range o {
			big[i] = max(big[i], math.Abs(v))
		}
	}
	sum := make([]float64, m)
	g.kinkStart = make([]int32, n+1)
	for j := range n {
		inv := 0.0 // the steepest slope per unit ordinate over the panels beside vertex j
		if j > 0 {
			inv = max(inv, 1/(x[j]-x[j-1]))
		}
		if j+1 < n {
			inv = max(inv, 1/(x[j+1]-x[j]))
		}
		for i, d := range g.slope[j*m : j*m+m] {
			if j == n-1 {
				d = -sum[i]
			}
			if math.Abs(d) > 1e-12*big[i]*inv || j == 0 || j == n-1 {
				g.kinkMember = append(g.kinkMember, int32(i))
				g.kinkSlope = append(g.kinkSlope, d)
				sum[i] += d
			}
		}
		g.kinkStart[j+1] = int32(len(g.kinkMember))
	}
}

// byVertex lists, vertex by vertex, the members with a non-zero entry of some per-vertex,
// per-member quantity: vertex j's are member[start[j]:start[j+1]], with their values.
type byVertex struct {
	start  []int32
	member []int32
	value  []float64
}

// nonZero gives the non-zero entries of v (index j*m+i) by vertex.
func nonZero(v []float64, n, m int) byVertex {
	b := byVertex{start: make([]int32, n+1)}
	for j := range n {
		for i, d := range v[j*m : j*m+m] {
			if d != 0 {
				b.member = append(b.member, int32(i))
				b.value = append(b.value, d)
			}
		}
		b.start[j+1] = int32(len(b.member))
	}
	return b
}

// changes gives, at each vertex, the jump in value and the change in slope of f(eta) as a
// point crosses the vertex rightwards, the line being zero outside [x0, xl].
func changes(x []float64, ord [][]float64, f func(float64) float64) (jump, slope []float64) {
	n, m := len(x), len(ord)
	jump, slope = make([]float64, n*m), make([]float64, n*m)
	for i, o := range ord {
		left := 0.0
		for j := range x {
			right := 0.0
			if j+1 < n {
				right = (f(o[j+1]) - f(o[j])) / (x[j+1] - x[j])
			}
			slope[j*m+i] = right - left
			left = right
		}
		jump[i] = f(o[0])
		jump[(n-1)*m+i] = -f(o[n-1])
	}
	return jump, slope
}
