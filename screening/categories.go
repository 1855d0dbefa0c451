package screening

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// NetworkTrains are the trains of the network view, prepared once per run: the reference
// wagon trains of the line categories, one per wagon geometry (screening/network), and
// Cooper E80. Rating a bridge by them costs a sweep per geometry and one for E80 (9 in all)
// more than the screening alone, fewer where E80 is among the scenarios' trains (swept once),
// the wagons swept as one long train where that gives the same envelope
// (network.LongSuffices); BENCHMARKS.md, "Network view", has the measured cost.
type NetworkTrains struct {
	Geometries []network.Geometry
	loads      []*envelope.Load // Geometries' unit trains
	long       []*envelope.Load // Geometries' long trains (network.LongSuffices)
	E80        *envelope.Load
	// cut are the trains cut to the wagons a span's lines can feel (network_wagons.go).
	cut wagonLoads
}

// NewNetworkTrains prepares the trains of the network view.
func NewNetworkTrains() (*NetworkTrains, error) {
	nt := &NetworkTrains{Geometries: network.Geometries()}
	for _, g := range nt.Geometries {
		ld, err := envelope.Prepare(g.Unit)
		if err != nil {
			return nil, fmt.Errorf("reference wagons %s: %w", g.Unit.Name, err)
		}
		long, err := envelope.Prepare(g.Long)
		if err != nil {
			return nil, fmt.Errorf("reference wagons %s: %w", g.Long.Name, err)
		}
		nt.loads, nt.long = append(nt.loads, ld), append(nt.long, long)
	}
	e80, err := envelope.Prepare(traffic.Cooper(network.CooperE))
	if err != nil {
		return nil, fmt.Errorf("Cooper E80: %w", err)
	}
	nt.E80 = e80
	return nt, nil
}

// NetworkResult is a bridge's network outcome: its line categories and Cooper E rating, and
// each member's E rating (MemberE, indexing Result.Members, the floor elements' too; NaN where
// the member is not rated under Cooper E80).
type NetworkResult struct {
	network.Rating
	MemberE []float64
}

// rateNetwork rates the bridge's truss members, and its floor elements where the floor
// system is rated (floor_network.go), under the network trains, with each member's
// dynamic allowance and the bridge's cross-section (each track alone and all tracks with the
// multiple-presence rule, on both trusses where their loads differ: sectionEnvelopes, as the
// scenarios are loaded), by rating.Rate with each member's capacities (or stored rating
// factor and its reference train, refs) as the scenarios are rated. members holds the truss
// members' dead loads and labels; the sweeps go through w.sweep, so a train already swept for
// this bridge is not swept again. Where every influence line (ords) changes sign at most
// once, the categories' trains are swept as long trains at one count, which gives the same
// envelope (network.LongSuffices) in a fraction of the time.
func (w *Screener) rateNetwork(b Bridge, s *Settings, el *envelope.Lines, ords [][]float64, members []MemberResult, refs map[string][][]Envelope, trusses []string, md memberDyn) (*NetworkResult, error) {
	nt := s.Network
	envelopes := func(ld *envelope.Load) ([][]Envelope, error) {
		return w.sectionEnvelopes(el, Scenario{Name: ld.Name(), Trains: []*envelope.Load{ld}}, b, trusses, s.Presence, md)
	}
	unit := make([][][]Envelope, len(nt.loads))
	loads, err := nt.forSpan(el.SpanM(), network.LongSuffices(ords))
	if err != nil {
		return nil, err
	}
	for g, ld := range loads {
		env, err := envelopes(ld)
		if err != nil {
			return nil, fmt.Errorf("network view, %s: %w", ld.Name(), err)
		}
		unit[g] = env
	}
	e80, err := envelopes(nt.E80)
	if err != nil {
		return nil, fmt.Errorf("network view, Cooper E80: %w", err)
	}
	// rate is member i's lowest rating factor on truss k under a live envelope scaled by f.
	rate := func(i, k int, e Envelope, f float64) (rating.Factor, bool) {
		m := members[i]
		inv := b.memberOf(trusses[k], m.Label)
		l := rating.Loading{Demand: rating.Demand{Dead: m.Dead, LiveMax: f * e.Max.Value, LiveMin: f * e.Min.Value, Impact: e.Impact}}
		if r, ok := refs[inv.ReferenceTrain]; ok && inv.HasStoredRating() {
			d := demand(m.Dead, r[k][i])
			l.Reference = &d
		}
		rfs, _ := rating.Rate(inv, l, s.Method)
		return rating.Worst(rfs)
	}
	// worst is member i's lowest rating factor over the trusses screened, and the truss.
	worst := func(i int, env [][]Envelope, f float64) (rating.Factor, int, bool) {
		var best rating.Factor
		bk, found := -1, false
		for k := range trusses {
			if r, ok := rate(i, k, env[k][i], f); ok && (!found || r.RF < best.RF) {
				best, bk, found = r, k, true
			}
		}
		return best, bk, found
	}
	out := &NetworkResult{Rating: network.Rating{ERating: math.NaN()}, MemberE: make([]float64, len(members))}
	for i := range members {
		out.MemberE[i] = math.NaN()
		if f, _, ok := worst(i, e80, 1); ok && !math.IsInf(f.RF, 0) {
			out.MemberE[i] = network.ERating(f.RF)
			if math.IsNaN(out.ERating) || out.MemberE[i] < out.ERating {
				out.ERating, out.EMember = out.MemberE[i], members[i].Label
			}
		}
	}
	// The floor elements, where rated, follow the truss members (floor_network.go).
	fl, err := w.floorNetwork(nt)
	if err != nil {
		return nil, err
	}
	if fl != nil {
		for i, el := range fl.els {
			e := math.NaN()
			if f, ok := fl.rate(b, s, i, fl.e80[i], 1); ok && !math.IsInf(f.RF, 0) {
				e = network.ERating(f.RF)
				if math.IsNaN(out.ERating) || e < out.ERating {
					out.ERating, out.EMember = e, el.Label
				}
			}
			out.MemberE = append(out.MemberE, e)
		}
	}
	geomOf := make([]int, len(network.Categories))
	for g, geo := range nt.Geometries {
		for _, c := range geo.Categories {
			geomOf[c] = g
		}
	}
	short, long := 0, len(nt.Geometries)-1
	pass := make([]bool, len(network.Categories))
	rated := false
	for c, cat := range network.Categories {
		cr := network.CategoryRating{Category: cat.Name, RF: math.Inf(1)}
		lim, limK, sense := -1, 0, rating.Tension
		for i := range members {
			f, k, ok := worst(i, unit[geomOf[c]], cat.AxleLoadKN())
			if !ok {
				continue
			}
			rated = true
			if f.RF < cr.RF {
				cr.RF, lim, limK, sense = f.RF, i, k, f.Sense
			}
		}
		if lim >= 0 {
			cr.Member = members[lim].Label
			cr.Limit = network.LimitMassPerMetre
			if network.AxleLoadGoverns(live(unit[short][limK][lim], sense), live(unit[long][limK][lim], sense),
				nt.Geometries[short].LengthM, nt.Geometries[long].LengthM) {
				cr.Limit = network.LimitAxleLoad
			}
		}
		if fl != nil && fl.worstCategory(b, s, nt, c, geomOf[c], &cr) {
			rated = true
		}
		cr.Pass = cr.RF >= 1
		pass[c] = cr.Pass
		out.Categories = append(out.Categories, cr)
	}
	if !rated {
		// Nothing rated: no category can be said to be carried.
		clear(pass)
	}
	carried := network.Closure(pass)
	for c := range out.Categories {
		out.Categories[c].Carried = carried[c]
	}
	out.Highest = network.Highest(carried)
	return out, nil
}

// live is the magnitude of a member's live extreme in the sense.
func live(e Envelope, s rating.Sense) float64 {
	if s == rating.Compression {
		return -e.Min.Value
	}
	return e.Max.Value
}
