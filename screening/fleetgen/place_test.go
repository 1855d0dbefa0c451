package fleetgen

import (
	"math"
	"testing"
)

// TestPlaceStaysOnTheMap: a benchmark fleet's lines run to thousands of kilometres; every
// position must still be a valid latitude and longitude, near the junction, and successive
// bridges on a line stay as far apart as their chainages say (the fold keeps distances
// along the line: a lap's turn moves sideways by the lap gap only). The distance uses the
// local flat-earth approximation (common practice over a few hundred kilometres).
func TestPlaceStaysOnTheMap(t *testing.T) {
	const kmPerDegree = 111.32
	for line := range lines {
		prevLat, prevLon := place(line, 0)
		for c := 0.5; c < 20000; c += 0.5 {
			lat, lon := place(line, c)
			if !(lat > -90 && lat < 90 && lon > -180 && lon < 180) {
				t.Fatalf("line %d, chainage %v km: position %v, %v is off the map", line, c, lat, lon)
			}
			if math.Abs(lat-61.3) > 5 || math.Abs(lon-9.2) > 12 {
				t.Fatalf("line %d, chainage %v km: position %v, %v is far from the junction", line, c, lat, lon)
			}
			dn := (lat - prevLat) * kmPerDegree
			de := (lon - prevLon) * kmPerDegree * math.Cos(61.3*math.Pi/180)
			if d := math.Hypot(dn, de); d > 6.6 || (math.Mod(c, 400) != 0 && math.Abs(d-0.5) > 1e-6) {
				t.Fatalf("line %d, chainage %v km: %v km from the last position, want 0.5", line, c, d)
			}
			prevLat, prevLon = lat, lon
		}
	}
}
