package screening_test

import (
	"reflect"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// wagons is a locomotive and 1 to 12 wagons of w kN axles.
func wagons(name string, w float64) *traffic.Train {
	loco := traffic.Vehicle{Name: "loco", LengthM: 18, Axles: []traffic.Axle{{AtM: 3, LoadKN: 200}, {AtM: 5, LoadKN: 200}, {AtM: 13, LoadKN: 200}, {AtM: 15, LoadKN: 200}}}
	wagon := traffic.Vehicle{Name: "wagon", LengthM: 14, Axles: []traffic.Axle{{AtM: 1.5, LoadKN: w}, {AtM: 3.3, LoadKN: w}, {AtM: 10.7, LoadKN: w}, {AtM: 12.5, LoadKN: w}}}
	return &traffic.Train{Name: name, Consist: []traffic.Group{{Vehicle: loco, Min: 1, Max: 1}, {Vehicle: wagon, Min: 1, Max: 12}}}
}

// TestShareTrainsSameResults: a train in both scenarios and as the reference of stored
// rating factors, swept once per bridge after ShareTrains, gives the same results as
// separately prepared copies each swept on its own (the reference).
func TestShareTrainsSameResults(t *testing.T) {
	build := func() *screening.Settings {
		prep := func(tr *traffic.Train) *envelope.Load {
			ld, err := envelope.Prepare(tr)
			if err != nil {
				t.Fatal(err)
			}
			return ld
		}
		return &screening.Settings{
			Existing:   screening.Scenario{Name: "existing", Trains: []*envelope.Load{prep(wagons("today", 180)), prep(wagons("passenger", 90))}},
			Proposed:   screening.Scenario{Name: "proposed", Trains: []*envelope.Load{prep(wagons("heavier", 240)), prep(wagons("passenger", 90))}},
			References: map[string]*envelope.Load{"today": prep(wagons("today", 180))},
			Dynamic:    traffic.Dynamic{Kind: traffic.AREMASteel},
			Method:     rating.WorkingStress,
			Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2},
		}
	}
	shared := build()
	shared.ShareTrains()
	if shared.Existing.Trains[1] != shared.Proposed.Trains[1] || shared.References["today"] != shared.Existing.Trains[0] {
		t.Fatal("trains defined alike were not shared")
	}
	if shared.Existing.Trains[0] == shared.Proposed.Trains[0] {
		t.Fatal("trains defined differently were shared")
	}
	separate := build()
	b := screening.Bridge{ID: "S-1", Truss: truss.Params{Type: "pratt", SpanM: 72, Panels: 12, DepthM: 9},
		TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 30, Members: map[string]rating.Member{
			"L2-L3": {CapacityTension: 2500, CapacityCompression: 2500},
			"U1-L2": {RatingFactor: 1.2, ReferenceTrain: "today"},
		}}
	var w screening.Screener
	got := w.Screen(b, shared)
	want := screening.ScreenBridge(b, separate)
	if got.Err != nil || want.Err != nil {
		t.Fatal(got.Err, want.Err)
	}
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("shared trains give\n%+v\nseparate ones\n%+v", got, want)
	}
}
