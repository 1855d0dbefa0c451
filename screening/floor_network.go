package screening

import (
	"fmt"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/screening/rating"
)

// floorRated is what screenFloor prepared of the bridge's rated floor system, kept on the
// Screener for the network view of the same bridge: the system, its elements, each
// element's 1 + I and the reference trains' live effects of stored rating factors.
type floorRated struct {
	sys    floor.System
	els    []floor.Element
	impact []float64
	refs   map[string][]envelope.Extremes
}

// floorNetwork are the floor elements' live effects under the network trains, before the
// dynamic allowance: unit[g] under geometry g's unit wagon train (a category's is unit[g]
// times its axle load), e80 under Cooper E80.
type floorNetwork struct {
	*floorRated
	unit [][]envelope.Extremes
	e80  []envelope.Extremes
}

// floorNetwork computes the floor elements' live effects under the network trains, by the
// analyser that rated the floor (so a train it swept for this bridge, such as E80 among the
// scenarios', is not swept again); nil where the bridge's floor system is not rated. The
// unit wagon trains serve: a floor element's lines never change sign, and the analyser takes
// as many wagons as can matter.
func (w *Screener) floorNetwork(nt *NetworkTrains) (*floorNetwork, error) {
	fr := w.floorRated
	if fr == nil {
		return nil, nil
	}
	fn := &floorNetwork{floorRated: fr, unit: make([][]envelope.Extremes, len(nt.loads))}
	for g, ld := range nt.loads {
		ext, err := w.floor.Live(fr.sys, fr.els, []*envelope.Load{ld})
		if err != nil {
			return nil, fmt.Errorf("network view, floor system, %s: %w", ld.Name(), err)
		}
		fn.unit[g] = ext
	}
	ext, err := w.floor.Live(fr.sys, fr.els, []*envelope.Load{nt.E80})
	if err != nil {
		return nil, fmt.Errorf("network view, floor system, Cooper E80: %w", err)
	}
	fn.e80 = ext
	return fn, nil
}

// rate is floor element i's lowest rating factor under a live effect e scaled by f, with
// its dynamic allowance, as screenFloor rates it.
func (fn *floorNetwork) rate(b Bridge, s *Settings, i int, e envelope.Extremes, f float64) (rating.Factor, bool) {
	el := fn.els[i]
	inv := b.Members[el.Label]
	l := rating.Loading{Demand: rating.Demand{Dead: el.Dead, LiveMax: f * e.Max.Value, LiveMin: f * e.Min.Value, Impact: fn.impact[i]}}
	if r, ok := fn.refs[inv.ReferenceTrain]; ok && inv.HasStoredRating() {
		d := demand(el.Dead, Envelope{Max: r[i].Max, Min: r[i].Min, Impact: fn.impact[i]})
		l.Reference = &d
	}
	rfs, _ := rating.Rate(inv, l, s.Method)
	return rating.Worst(rfs)
}

// worstCategory lowers cr to floor element i's rating factor for category c (geometry g)
// where that is lower, naming the element and its limit by network.AxleLoadGoverns from its
// unit effects under the shortest and the longest wagons, as for a truss member. It says
// whether any element is rated.
func (fn *floorNetwork) worstCategory(b Bridge, s *Settings, nt *NetworkTrains, c, g int, cr *network.CategoryRating) bool {
	rated := false
	short, long := 0, len(nt.Geometries)-1
	for i, el := range fn.els {
		f, ok := fn.rate(b, s, i, fn.unit[g][i], network.Categories[c].AxleLoadKN())
		if !ok {
			continue
		}
		rated = true
		if f.RF < cr.RF {
			cr.RF, cr.Member, cr.Limit = f.RF, el.Label, network.LimitMassPerMetre
			if network.AxleLoadGoverns(fn.unit[short][i].Max.Value, fn.unit[long][i].Max.Value,
				nt.Geometries[short].LengthM, nt.Geometries[long].LengthM) {
				cr.Limit = network.LimitAxleLoad
			}
		}
	}
	return rated
}
