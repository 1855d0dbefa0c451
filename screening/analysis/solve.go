package analysis

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/trussfleet/trussfleet/screening/truss"
	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// ErrMechanism is returned (wrapped) when the truss cannot carry load: it is a mechanism,
// unsupported, or so nearly so that its stiffness matrix is numerically singular.
var ErrMechanism = errors.New("truss is a mechanism or unsupported (singular stiffness)")

// minPivotRatio bounds how much of a diagonal stiffness term the factorisation may cancel:
// a pivot below it means the matrix is singular to working precision (a mechanism). Sound
// trusses of any proportion the geometry package allows stay many orders of magnitude above.
const minPivotRatio = 1e-10

// Options tune the analysis.
type Options struct {
	// AxialStiffness gives EA per member (any consistent unit); nil means equal EA for all.
	AxialStiffness []float64
}

// Lines holds the influence lines of one truss.
type Lines struct {
	// SpanM is the bearing-to-bearing span; X the deck panel points, ascending.
	SpanM float64
	X     []float64
	// Members in the truss's member order.
	Members []Line
	// Reactions per support (in truss.Supports order) per load position: Rx and Ry of the
	// support for a unit downward load at deck panel point k, upward and rightward positive.
	Reactions []Reaction
}

// Line is one member's influence line: the member force for a unit downward load at each deck
// panel point.
type Line struct {
	Label     string
	Kind      truss.Kind
	Ordinates []float64
}

// Reaction is one support's influence lines.
type Reaction struct {
	Joint  string
	Rx, Ry []float64
}

// InfluenceLines solves the truss for a unit load at every deck panel point.
func InfluenceLines(t *truss.Truss, opt Options) (*Lines, error) {
	m := len(t.Members)
	if opt.AxialStiffness != nil && len(opt.AxialStiffness) != m {
		return nil, fmt.Errorf("axial stiffness: %d values for %d members", len(opt.AxialStiffness), m)
	}
	s, err := newSystem(t, opt.AxialStiffness)
	if err != nil {
		return nil, err
	}
	nd := len(t.DeckJoints)
	// Right-hand sides, row-major (one row per equation, one column per deck panel point):
	// a unit downward load at the panel point's y dof.
	u := make([]float64, s.n*nd)
	for k, j := range t.DeckJoints {
		if d := s.dof[2*j+1]; d >= 0 {
			u[d*nd+k] = -1
		}
	}
	s.solve(u, nd)
	out := &Lines{SpanM: t.SpanM(), X: t.DeckX(), Members: make([]Line, m)}
	ord := make([]float64, m*nd)
	for i, mb := range t.Members {
		out.Members[i] = Line{Label: mb.Label, Kind: mb.Kind, Ordinates: ord[i*nd : (i+1)*nd : (i+1)*nd]}
	}
	disp := func(dof, k int) float64 {
		if d := s.dof[dof]; d >= 0 {
			return u[d*nd+k]
		}
		return 0
	}
	for i, mb := range t.Members {
		c, sn, k := s.cos[i], s.sin[i], s.ea[i]/s.len[i]
		o := out.Members[i].Ordinates
		for lc := 0; lc < nd; lc++ {
			du := disp(2*mb.B, lc) - disp(2*mb.A, lc)
			dv := disp(2*mb.B+1, lc) - disp(2*mb.A+1, lc)
			o[lc] = k * (c*du + sn*dv)
		}
	}
	out.Reactions = reactions(t, s, out)
	return out, nil
}

// reactions follow from joint equilibrium at each support: reaction + applied load + the pull
// of the members on the joint = 0.
func reactions(t *truss.Truss, s *system, l *Lines) []Reaction {
	nd := len(t.DeckJoints)
	rs := make([]Reaction, len(t.Supports))
	for si, sp := range t.Supports {
		r := Reaction{Joint: t.Joints[sp.Joint].Name, Rx: make([]float64, nd), Ry: make([]float64, nd)}
		for lc, dj := range t.DeckJoints {
			var fx, fy float64
			if dj == sp.Joint {
				fy = -1
			}
			for i, mb := range t.Members {
				n := l.Members[i].Ordinates[lc]
				switch sp.Joint {
				case mb.A:
					fx += n * s.cos[i]
					fy += n * s.sin[i]
				case mb.B:
					fx -= n * s.cos[i]
					fy -= n * s.sin[i]
				}
			}
			r.Rx[lc], r.Ry[lc] = -fx, -fy
		}
		rs[si] = r
	}
	return rs
}

// system is the assembled and factorised stiffness of a truss.
type system struct {
	n             int   // free degrees of freedom
	dof           []int // global dof (2·joint + axis) to equation number, -1 where restrained
	cos, sin, len []float64
	ea            []float64
	// kd is the half-bandwidth; band holds the Cholesky factor U (K = UᵀU) in LAPACK's
	// upper band layout, row-major: band[i*(kd+1) + (j-i)] = U[i][j].
	kd   int
	band []float64
}

func newSystem(t *truss.Truss, ea []float64) (*system, error) {
	nj, m := len(t.Joints), len(t.Members)
	if nj < 2 || m < 1 {
		return nil, fmt.Errorf("%w: %d joints and %d members", ErrMechanism, nj, m)
	}
	fixed := make([]bool, 2*nj)
	for _, sp := range t.Supports {
		fixed[2*sp.Joint] = fixed[2*sp.Joint] || sp.Fixed[0]
		fixed[2*sp.Joint+1] = fixed[2*sp.Joint+1] || sp.Fixed[1]
	}
	// Number the joints along the span so that the matrix is banded.
	order := make([]int, nj)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool {
		ja, jb := t.Joints[order[a]], t.Joints[order[b]]
		if ja.X != jb.X {
			return ja.X < jb.X
		}
		return ja.Y < jb.Y
	})
	s := &system{dof: make([]int, 2*nj), cos: make([]float64, m), sin: make([]float64, m), len: make([]float64, m), ea: make([]float64, m)}
	for _, j := range order {
		for a := 0; a < 2; a++ {
			if fixed[2*j+a] {
				s.dof[2*j+a] = -1
			} else {
				s.dof[2*j+a] = s.n
				s.n++
			}
		}
	}
	if s.n == 0 {
		return nil, fmt.Errorf("%w: every degree of freedom is restrained", ErrMechanism)
	}
	kd := 0
	for i, mb := range t.Members {
		a, b := t.Joints[mb.A], t.Joints[mb.B]
		l := math.Hypot(b.X-a.X, b.Y-a.Y)
		if !(l > 0) || math.IsInf(l, 0) {
			return nil, fmt.Errorf("member %s has zero or non-finite length", mb.Label)
		}
		s.len[i], s.cos[i], s.sin[i] = l, (b.X-a.X)/l, (b.Y-a.Y)/l
		s.ea[i] = 1
		if ea != nil {
			if !(ea[i] > 0) || math.IsInf(ea[i], 0) {
				return nil, fmt.Errorf("member %s: axial stiffness must be positive and finite, got %v", mb.Label, ea[i])
			}
			s.ea[i] = ea[i]
		}
		lo, hi := math.MaxInt, -1
		for _, d := range [...]int{s.dof[2*mb.A], s.dof[2*mb.A+1], s.dof[2*mb.B], s.dof[2*mb.B+1]} {
			if d >= 0 {
				lo, hi = min(lo, d), max(hi, d)
			}
		}
		if hi >= 0 {
			kd = max(kd, hi-lo)
		}
	}
	kd = min(kd, s.n-1)
	s.kd = kd
	ld := kd + 1
	s.band = make([]float64, s.n*ld)
	for i, mb := range t.Members {
		c, sn, e := s.cos[i], s.sin[i], s.ea[i]/s.len[i]
		g := [4]float64{-c, -sn, c, sn}
		d := [4]int{s.dof[2*mb.A], s.dof[2*mb.A+1], s.dof[2*mb.B], s.dof[2*mb.B+1]}
		for p := 0; p < 4; p++ {
			if d[p] < 0 {
				continue
			}
			for q := 0; q < 4; q++ {
				if d[q] >= d[p] {
					s.band[d[p]*ld+d[q]-d[p]] += e * g[p] * g[q]
				}
			}
		}
	}
	diag := make([]float64, s.n)
	for i := range diag {
		diag[i] = s.band[i*ld]
	}
	_, ok := lapack64.Pbtrf(blas64.SymmetricBand{Uplo: blas.Upper, N: s.n, K: kd, Data: s.band, Stride: ld})
	if !ok {
		return nil, mechanism(t, s, "")
	}
	// A pivot that lost nearly all of its diagonal term marks a mechanism that rounding
	// kept from failing the factorisation outright.
	for i := range diag {
		if p := s.band[i*ld]; p*p < minPivotRatio*diag[i] {
			return nil, mechanism(t, s, fmt.Sprintf("pivot %d is %.3g of its stiffness", i, p*p/diag[i]))
		}
	}
	return s, nil
}

// solve overwrites the row-major n×nrhs right-hand sides b with the solutions of UᵀU x = b.
func (s *system) solve(b []float64, nrhs int) {
	ld := s.kd + 1
	for i := 0; i < s.n; i++ { // Uᵀ y = b, forward
		row := b[i*nrhs : (i+1)*nrhs]
		floats.Scale(1/s.band[i*ld], row)
		for j := i + 1; j <= min(i+s.kd, s.n-1); j++ {
			floats.AddScaled(b[j*nrhs:(j+1)*nrhs], -s.band[i*ld+j-i], row)
		}
	}
	for i := s.n - 1; i >= 0; i-- { // U x = y, backward
		row := b[i*nrhs : (i+1)*nrhs]
		for j := i + 1; j <= min(i+s.kd, s.n-1); j++ {
			floats.AddScaled(row, -s.band[i*ld+j-i], b[j*nrhs:(j+1)*nrhs])
		}
		floats.Scale(1/s.band[i*ld], row)
	}
}

// At gives member i's influence-line ordinate for a unit load at x metres from the left
// bearing: linear between deck panel points, zero outside the span.
func (l *Lines) At(i int, x float64) float64 {
	return Interpolate(l.X, l.Members[i].Ordinates, x)
}

// Interpolate evaluates a piecewise-linear influence line given by ordinates at the ascending
// abscissae xs; it is zero outside [xs[0], xs[last]].
func Interpolate(xs, ys []float64, x float64) float64 {
	n := len(xs)
	if n == 0 || x < xs[0] || x > xs[n-1] {
		return 0
	}
	k := sort.SearchFloat64s(xs, x)
	if k < n && xs[k] == x {
		return ys[k]
	}
	x0, x1 := xs[k-1], xs[k]
	return ys[k-1] + (ys[k]-ys[k-1])*(x-x0)/(x1-x0)
}

// Areas gives the positive and negative areas under a piecewise-linear influence line (m per
// unit load; negative area ≤ 0), splitting each segment at its zero crossing.
func Areas(xs, ys []float64) (pos, neg float64) {
	for k := 1; k < len(xs); k++ {
		a, b, dx := ys[k-1], ys[k], xs[k]-xs[k-1]
		switch {
		case a >= 0 && b >= 0:
			pos += (a + b) / 2 * dx
		case a <= 0 && b <= 0:
			neg += (a + b) / 2 * dx
		default:
			z := dx * a / (a - b) // distance to the crossing
			if a > 0 {
				pos += a * z / 2
				neg += b * (dx - z) / 2
			} else {
				neg += a * z / 2
				pos += b * (dx - z) / 2
			}
		}
	}
	return pos, neg
}

// DeadLoad is the member force (kN) from a uniform dead load of qKNPerM over the whole span:
// q times the net area of the influence line given by ordinates ys at the ascending
// abscissae xs.
func DeadLoad(xs, ys []float64, qKNPerM float64) float64 {
	pos, neg := Areas(xs, ys)
	return qKNPerM * (pos + neg)
}

// SignChanges gives the abscissae where a piecewise-linear influence line crosses zero between
// two non-zero ordinates of opposite sign (touching zero at a panel point does not count).
func SignChanges(xs, ys []float64) []float64 {
	var out []float64
	const tiny = 1e-9
	last, lastX := 0.0, 0.0
	for k := range xs {
		y := ys[k]
		if math.Abs(y) <= tiny {
			continue
		}
		if last != 0 && (y > 0) != (last > 0) {
			// The crossing lies between lastX and xs[k]; the line is straight there only if
			// the two points are adjacent, otherwise it runs along zero in between.
			if k > 0 && xs[k-1] == lastX {
				out = append(out, lastX+(xs[k]-lastX)*last/(last-y))
			} else {
				out = append(out, (lastX+xs[k])/2)
			}
		}
		last, lastX = y, xs[k]
	}
	return out
}
