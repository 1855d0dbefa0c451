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
