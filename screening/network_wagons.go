package screening

import (
	"fmt"
	"sync"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/network"
)

// cutWagons switches off forSpan's shortening of the network trains (for the test that
// compares the two).
var cutWagons = true

// wagonLoads are the network trains cut to a count of wagons, prepared once per run.
type wagonLoads struct {
	mu    sync.Mutex
	loads map[wagonKey]*envelope.Load
}

type wagonKey struct {
	geometry, wagons int
	long             bool
}

// forSpan gives each geometry's train for lines spanning spanM: the long trains (long) or the
// unit trains of 1 to any count, each cut to the wagons that can matter over the span
// (network.WagonsThatMatter: the same envelopes as the full trains, at a fraction of the
// sweep). Safe for concurrent use.
func (nt *NetworkTrains) forSpan(spanM float64, long bool) ([]*envelope.Load, error) {
	full := nt.loads
	if long {
		full = nt.long
	}
	if !cutWagons {
		return full, nil
	}
	out := make([]*envelope.Load, len(nt.Geometries))
	nt.cut.mu.Lock()
	defer nt.cut.mu.Unlock()
	if nt.cut.loads == nil {
		nt.cut.loads = map[wagonKey]*envelope.Load{}
	}
	for g, geo := range nt.Geometries {
		n := network.WagonsThatMatter(spanM, geo.LengthM)
		if n >= network.WagonsMax {
			out[g] = full[g]
			continue
		}
		k := wagonKey{g, n, long}
		ld, ok := nt.cut.loads[k]
		if !ok {
			var err error
			if ld, err = envelope.Prepare(geo.Wagons(n, long)); err != nil {
				return nil, fmt.Errorf("reference wagons %.4g m, %d wagons: %w", geo.LengthM, n, err)
			}
			nt.cut.loads[k] = ld
		}
		out[g] = ld
	}
	return out, nil
}

// wagonLoads sweeps the geometries' trains over the bridge's lines el (ordinates ords) and
// gives the loads whose envelopes w.sweep now holds for them. Where every line changes sign
// at most once, those are the long trains; where none does, the rakes of 1 to n wagons. Where
// some do, each geometry's long train is swept over every line and its rake only over the
// lines that need it, on lines of their own, and each member takes its rake's envelope from
// the sweep that gives it (network.LongSufficesFor: the two are equal where the long train
// may stand in): the rakes' envelopes, held under the rakes' loads, at a fraction of the
// sweep. A continuous span's or a subdivided truss's few members whose lines change sign
// twice no longer make every member take the rakes.
func (w *Screener) wagonLoads(nt *NetworkTrains, el *envelope.Lines, ords [][]float64) ([]*envelope.Load, error) {
	var needy []int
	for i, eta := range ords {
		if !network.LongSufficesFor(eta) {
			needy = append(needy, i)
		}
	}
	if len(needy) == 0 || len(needy) == len(ords) || !splitWagons {
		return nt.forSpan(el.SpanM(), len(needy) == 0)
	}
	long, err := nt.forSpan(el.SpanM(), true)
	if err != nil {
		return nil, err
	}
	rakes, err := nt.forSpan(el.SpanM(), false)
	if err != nil {
		return nil, err
	}
	few, err := el.Only(needy)
	if err != nil {
		return nil, err
	}
	for g, ld := range rakes {
		all, err := w.calc.Envelope(el, long[g], envelope.Options{}, nil)
		if err != nil {
			return nil, fmt.Errorf("network view, %s: %w", long[g].Name(), err)
		}
		some, err := w.calc.Envelope(few, ld, envelope.Options{}, nil)
		if err != nil {
			return nil, fmt.Errorf("network view, %s: %w", ld.Name(), err)
		}
		for k, i := range needy {
			all[i] = some[k]
		}
		for i := range all {
			all[i].Max.Train, all[i].Min.Train = ld.Name(), ld.Name()
		}
		w.remember(ld, all)
	}
	return rakes, nil
}

// splitWagons switches off wagonLoads' split of the lines (for the test that compares the
// two).
var splitWagons = true
