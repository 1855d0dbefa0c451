package analysis

import (
	"math"
	"strings"

	"github.com/trussfleet/trussfleet/screening/truss"
	"gonum.org/v1/gonum/mat"
)

// MechanismError is a mechanism with the joints that move in it. It wraps ErrMechanism.
type MechanismError struct {
	// Joints are the names of the joints that move in some mechanism of the truss, in joint
	// order; empty when they could not be found.
	Joints []string
	detail string
}

func (e *MechanismError) Error() string {
	s := ErrMechanism.Error()
	if e.detail != "" {
		s += ": " + e.detail
	}
	if len(e.Joints) > 0 {
		s += "; joints that move: " + strings.Join(e.Joints, ", ")
	}
	return s
}

func (e *MechanismError) Unwrap() error { return ErrMechanism }

// movingJoints finds the joints of a mechanism: the free joints that move in the null space
// of the stiffness matrix (eigenvectors of the dense matrix whose eigenvalues are zero to
// working precision). It runs only when the banded factorisation has failed, so the dense
// eigen-decomposition's cost does not matter.
func movingJoints(t *truss.Truss, s *system) []string {
	k := mat.NewSymDense(s.n, nil)
	for i, mb := range t.Members {
		c, sn, e := s.cos[i], s.sin[i], s.ea[i]/s.len[i]
		g := [4]float64{-c, -sn, c, sn}
		d := [4]int{s.dof[2*mb.A], s.dof[2*mb.A+1], s.dof[2*mb.B], s.dof[2*mb.B+1]}
		for p := 0; p < 4; p++ {
			for q := p; q < 4; q++ {
				if d[p] < 0 || d[q] < 0 {
					continue
				}
				k.SetSym(d[p], d[q], k.At(d[p], d[q])+e*g[p]*g[q])
			}
		}
	}
	var eig mat.EigenSym
	if !eig.Factorize(k, true) {
		return nil
	}
	vals := eig.Values(nil)
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	top := 0.0
	for _, v := range vals {
		top = max(top, math.Abs(v))
	}
	moves := make([]bool, s.n)
	for c, v := range vals {
		if math.Abs(v) > 1e-9*top {
			continue
		}
		big := 0.0
		for r := 0; r < s.n; r++ {
			big = max(big, math.Abs(vecs.At(r, c)))
		}
		for r := 0; r < s.n; r++ {
			if math.Abs(vecs.At(r, c)) > 1e-6*big {
				moves[r] = true
			}
		}
	}
	var out []string
	for j, jt := range t.Joints {
		for a := 0; a < 2; a++ {
			if d := s.dof[2*j+a]; d >= 0 && moves[d] {
				out = append(out, jt.Name)
				break
			}
		}
	}
	return out
}

// mechanism builds the error for a failed factorisation.
func mechanism(t *truss.Truss, s *system, detail string) error {
	return &MechanismError{Joints: movingJoints(t, s), detail: detail}
}

// Degree is the degree of static indeterminacy m + r - 2j of a truss (common practice): 0
// for a determinate truss, positive for a redundant one; negative means a mechanism.
func Degree(t *truss.Truss) int {
	r := 0
	for _, sp := range t.Supports {
		for _, f := range sp.Fixed {
			if f {
				r++
			}
		}
	}
	return len(t.Members) + r - 2*len(t.Joints)
}
