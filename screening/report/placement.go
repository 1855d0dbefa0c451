package report

import (
	"math"
	"sort"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// pointLoad is an axle standing on the bridge: x from the left bearing and its load (kN,
// the full axle, before the truss share and the dynamic allowance).
type pointLoad struct {
	XM, LoadKN float64
}

// stretch is a distributed load over [FromM, ToM] of the bridge.
type stretch struct {
	FromM, ToM, QKNPerM float64
}

// onBridge is what a train placed as an extreme puts on the bridge.
type onBridge struct {
	Axles     []pointLoad
	Stretches []stretch
}

// edgeTolM admits axles that the sweep put exactly on a bearing (rounding of HeadM).
const edgeTolM = 1e-6

// placeTrain puts train t where placement p says, over a span of spanM, and returns the
// axles on the bridge and the loaded stretches. xs and eta are the member's influence line;
// sign is +1 for the largest tension, −1 for the largest compression: a part applied only
// where unfavourable (Load Model 71) loads the stretches where sign·eta > 0.
func placeTrain(t *traffic.Train, p envelope.Placement, spanM float64, xs, eta []float64, sign float64) onBridge {
	var out onBridge
	if t == nil || !p.Loaded {
		return out
	}
	if t.Uniform != nil {
		if p.LoadedToM > p.LoadedFromM {
			out.Stretches = append(out.Stretches, stretch{p.LoadedFromM, p.LoadedToM, t.Uniform.QKNPerM})
		}
		return out
	}
	// at maps a distance behind the front to x on the bridge.
	at := func(d float64) float64 {
		if p.Direction == envelope.RightToLeft {
			return p.HeadM + d
		}
		return p.HeadM - d
	}
	for _, a := range t.Axles(p.Count) {
		x := at(a.AtM)
		if x >= -edgeTolM && x <= spanM+edgeTolM {
			out.Axles = append(out.Axles, pointLoad{XM: min(max(x, 0), spanM), LoadKN: a.LoadKN})
		}
	}
	sort.Slice(out.Axles, func(i, k int) bool { return out.Axles[i].XM < out.Axles[k].XM })
	for _, part := range t.Parts {
		from, to := part.FromM, part.ToM
		if part.Mode == traffic.CutUnfavourable {
			to = from + p.TrailingM
		}
		a, b := at(to), at(from)
		if a > b {
			a, b = b, a
		}
		a, b = max(a, 0), min(b, spanM)
		if !(a < b) {
			continue
		}
		if part.Mode != traffic.WhereUnfavourable {
			out.Stretches = append(out.Stretches, stretch{a, b, part.QKNPerM})
			continue
		}
		for _, s := range signIntervals(xs, eta, sign) {
			lo, hi := max(a, s[0]), min(b, s[1])
			if lo < hi {
				out.Stretches = append(out.Stretches, stretch{lo, hi, part.QKNPerM})
			}
		}
	}
	sort.Slice(out.Stretches, func(i, k int) bool { return out.Stretches[i].FromM < out.Stretches[k].FromM })
	return out
}

// signIntervals gives the stretches where sign·eta > 0 of a line that is linear between the
// points xs (and zero beyond them), adjacent stretches merged.
func signIntervals(xs, eta []float64, sign float64) [][2]float64 {
	var out [][2]float64
	add := func(a, b float64) {
		if !(a < b) {
			return
		}
		if n := len(out); n > 0 && out[n-1][1] >= a {
			out[n-1][1] = max(out[n-1][1], b)
			return
		}
		out = append(out, [2]float64{a, b})
	}
	for k := 0; k+1 < len(xs); k++ {
		e0, e1 := sign*eta[k], sign*eta[k+1]
		x0, x1 := xs[k], xs[k+1]
		switch {
		case e0 >= 0 && e1 >= 0:
			if e0 > 0 || e1 > 0 {
				add(x0, x1)
			}
		case e0 > 0: // crosses from + to −
			add(x0, x0+(x1-x0)*e0/(e0-e1))
		case e1 > 0: // crosses from − to +
			add(x0+(x1-x0)*e0/(e0-e1), x1)
		}
	}
	return out
}

// integral is the integral of the piecewise-linear line (xs, eta) over [a, b], exact: the
// trapezoid rule on the line's own breakpoints.
func integral(xs, eta []float64, a, b float64) float64 {
	if len(xs) == 0 || !(a < b) {
		return 0
	}
	a, b = max(a, xs[0]), min(b, xs[len(xs)-1])
	if !(a < b) {
		return 0
	}
	pts := []float64{a}
	for _, x := range xs {
		if x > a && x < b {
			pts = append(pts, x)
		}
	}
	pts = append(pts, b)
	sum := 0.0
	for i := 0; i+1 < len(pts); i++ {
		y0, y1 := analysis.Interpolate(xs, eta, pts[i]), analysis.Interpolate(xs, eta, pts[i+1])
		sum += 0.5 * (y0 + y1) * (pts[i+1] - pts[i])
	}
	return sum
}

// effect is the static member force of the loads for a unit line (xs, eta), before the truss
// share: the sum of P·eta(x) over the axles and q·∫eta over the stretches.
func (o onBridge) effect(xs, eta []float64) float64 {
	sum := 0.0
	for _, a := range o.Axles {
		sum += a.LoadKN * analysis.Interpolate(xs, eta, a.XM)
	}
	for _, s := range o.Stretches {
		sum += s.QKNPerM * integral(xs, eta, s.FromM, s.ToM)
	}
	return sum
}

// finite reports whether v is a number that can be drawn or printed as one.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// placementOf gives the one placement shown for a member's extreme under train t, in the
// explanation and in the drawing alike. It is the run's own (stored), which the priority list
// and the exports name, whenever placing t there gives the stored force: several placements
// may give the same force (another count of a long consist, the mirror image on a symmetric
// truss), and a recomputation for one member may find another of them. Otherwise (the store
// keeps no trailing length of a part cut where unfavourable) the envelope is recomputed for
// that one train on the member's line (exact and cheap), and its placement is used if it gives
// the stored force. ok is false when t is nil or no longer gives the stored force (the train's
// definition has changed since the run); the stored extreme is then returned as it is.
func placementOf(t *traffic.Train, stored envelope.Extreme, xs, eta []float64, share, sign float64) (e envelope.Extreme, ok bool) {
	if t == nil || !stored.Loaded || len(xs) < 2 {
		return stored, false
	}
	// Same force to rounding of the sweep (the run stored it as a double).
	same := func(v float64) bool { return math.Abs(v-stored.Value) <= 1e-6*math.Max(1, math.Abs(stored.Value)) }
	if same(placeTrain(t, stored.Placement, xs[len(xs)-1]-xs[0], xs, eta, sign).effect(xs, eta) * share) {
		e = stored
		if t.Uniform == nil {
			e.LengthM = t.LengthM(e.Count)
		}
		return e, true
	}
	ex, err := envelope.Compute(xs, [][]float64{eta}, t, envelope.Options{Share: share})
	if err != nil {
		return stored, false
	}
	e = ex[0].Max
	if sign < 0 {
		e = ex[0].Min
	}
	if !same(e.Value) {
		return stored, false
	}
	e.Train = stored.Train
	return e, true
}
