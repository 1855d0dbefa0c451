package analysis

import (
	"fmt"
	"math"
	"sort"

	"github.com/trussfleet/trussfleet/screening/truss"
)

// jointForces solves the factorised system under downward joint loads (kN, by joint index)
// and gives each member's force (kN, tension positive).
func jointForces(t *truss.Truss, s *system, loadsKN []float64) []float64 {
	u := make([]float64, s.n)
	for j, p := range loadsKN {
		if d := s.dof[2*j+1]; d >= 0 {
			u[d] = -p
		}
	}
	s.solve(u, 1)
	disp := func(dof int) float64 {
		if d := s.dof[dof]; d >= 0 {
			return u[d]
		}
		return 0 // a restrained direction: the load goes straight into the support
	}
	out := make([]float64, len(t.Members))
	for i, mb := range t.Members {
		du := disp(2*mb.B) - disp(2*mb.A)
		dv := disp(2*mb.B+1) - disp(2*mb.A+1)
		out[i] = s.ea[i] / s.len[i] * (s.cos[i]*du + s.sin[i]*dv)
	}
	return out
}

// DeadJointLoads are the joint loads (kN, downward, by joint index) of a truss's own weight,
// wKNPerM per metre of span: half of it at the top chord's joints and half at the bottom
// chord's (common practice), each chord's half spread over that chord's joints by their
// tributary length along the span: from half-way to the previous joint of the chord (or the
// left bearing) to half-way to the next one (or the right bearing). A chord's joints are
// the ends of the members of its kind; a truss without members of one chord's kind puts
// that half on the other chord.
func DeadJointLoads(t *truss.Truss, wKNPerM float64) []float64 {
	out := make([]float64, len(t.Joints))
	top, bottom := chordJoints(t, truss.TopChord), chordJoints(t, truss.BottomChord)
	switch {
	case len(top) == 0:
		spread(t, bottom, wKNPerM, out)
	case len(bottom) == 0:
		spread(t, top, wKNPerM, out)
	default:
		spread(t, top, wKNPerM/2, out)
		spread(t, bottom, wKNPerM/2, out)
	}
	return out
}

// chordJoints lists the joints of the members of a kind, ordered by x.
func chordJoints(t *truss.Truss, k truss.Kind) []int {
	seen := map[int]bool{}
	var js []int
	for _, m := range t.Members {
		if m.Kind != k {
			continue
		}
		for _, j := range []int{m.A, m.B} {
			if !seen[j] {
				seen[j] = true
				js = append(js, j)
			}
		}
	}
	sort.Slice(js, func(a, b int) bool { return t.Joints[js[a]].X < t.Joints[js[b]].X })
	return js
}

// spread adds q per metre of span over the joints (ordered by x) by tributary length.
func spread(t *truss.Truss, js []int, q float64, out []float64) {
	span := t.SpanM()
	for k, j := range js {
		lo, hi := 0.0, span
		if k > 0 {
			lo = (t.Joints[js[k-1]].X + t.Joints[j].X) / 2
		}
		if k < len(js)-1 {
			hi = (t.Joints[j].X + t.Joints[js[k+1]].X) / 2
		}
		out[j] += q * (hi - lo)
	}
}

// DeadForces gives each member's force (kN, tension positive) under the truss's dead joint
// loads: loadsKN downward by joint index (DeadJointLoads, or any other).
func DeadForces(t *truss.Truss, opt Options, loadsKN []float64) ([]float64, error) {
	if len(loadsKN) != len(t.Joints) {
		return nil, fmt.Errorf("dead joint loads: %d values for %d joints", len(loadsKN), len(t.Joints))
	}
	for j, p := range loadsKN {
		if math.IsNaN(p) || math.IsInf(p, 0) {
			return nil, fmt.Errorf("dead joint load at %s is %v", t.Joints[j].Name, p)
		}
	}
	s, err := newSystem(t, opt.AxialStiffness)
	if err != nil {
		return nil, err
	}
	return jointForces(t, s, loadsKN), nil
}
