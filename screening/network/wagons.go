package network

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// WagonsThatMatter is the count of reference wagons of length lengthM beyond which more
// wagons change no envelope over influence lines spanning spanM (from the first panel point
// to the last): ceil(spanM / lengthM) + 2, at most WagonsMax.
//
// Why. A train of identical wagons loads the bridge, at any position, with a window of
// length spanM of itself. A window that holds the train's front (or its tail) is the same
// for every train of at least spanM / lengthM wagons; a window that holds neither end lies
// in the repeating body, and is the same as the window of any other train of these wagons at
// the same phase (its start modulo lengthM), which a train of n wagons offers whenever
// n lengthM > spanM + lengthM: a window may then start anywhere in the first wagon and still
// end before the tail. So a train of n = ceil(spanM / lengthM) + 2 wagons shows the bridge
// every load any longer train does, in either direction, and gives the same envelope; so
// does a rake of 1 to n wagons that of 1 to WagonsMax. TestFewerWagonsSameEnvelope checks it
// against the full trains over lines of every sign pattern.
func WagonsThatMatter(spanM, lengthM float64) int {
	if !(spanM > 0) || !(lengthM > 0) || math.IsInf(spanM, 0) {
		return WagonsMax
	}
	n := math.Ceil(spanM/lengthM) + 2
	if n >= WagonsMax {
		return WagonsMax
	}
	return int(n)
}

// Wagons is the geometry's unit-load train of 1 to n wagons, or, where long, of exactly n
// wagons (Unit and Long cut to n wagons: WagonsThatMatter).
func (g Geometry) Wagons(n int, long bool) *traffic.Train {
	n = min(max(n, 1), WagonsMax)
	lo := 1
	if long {
		lo = n
	}
	return wagonRake(fmt.Sprintf("reference wagons %.4g m", g.LengthM), g.LengthM, 1, lo, n)
}
