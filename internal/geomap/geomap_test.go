package geomap

import (
	"encoding/json"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/trussfleet/trussfleet/internal/ranking"
)

func ptr[T any](v T) *T { return &v }

// invented rows: two located bridges (one west of Greenwich and south of the equator, so
// that a swapped or unsigned position shows), one without coordinates, one with a latitude
// out of range.
func rows() []ranking.Row {
	return []ranking.Row{
		{Rank: 1, BridgeID: "T-1", Name: "Testbrook Bridge", Line: "Test Line", ChainageKm: ptr(3.5), RFProposed: ptr(0.85),
			Flags: []string{"exceeds"}, Categories: []string{"C4", "D2"}, ERating: ptr(52.5), EMember: "L2-L3",
			Latitude: ptr(-33.25), Longitude: ptr(-70.5), Status: "done"},
		{Rank: 2, BridgeID: "T-2", Name: "Nowhere Viaduct", Status: "done"},
		{Rank: 3, BridgeID: "T-3", Name: "Northfold Girders", Categories: []string{}, Latitude: ptr(57.125), Longitude: ptr(12.75), Status: "done"},
		{Rank: 4, BridgeID: "T-4", Latitude: ptr(95.0), Longitude: ptr(10.0), Status: "failed"},
	}
}

// TestParsesAsGeoJSON: a general-purpose GeoJSON reader (github.com/paulmach/orb/geojson)
// reads the map, every position as [longitude, latitude] (RFC 7946 section 3.1.1), and the
// bridges without valid coordinates are left out and counted.
func TestParsesAsGeoJSON(t *testing.T) {
	doc, left, err := Bridges(7, rows())
	if err != nil {
		t.Fatal(err)
	}
	if left != 2 {
		t.Errorf("left out %d bridges, want 2 (T-2 without coordinates, T-4 latitude 95)", left)
	}
	fc, err := geojson.UnmarshalFeatureCollection(doc)
	if err != nil {
		t.Fatalf("orb cannot read the map: %v", err)
	}
	if len(fc.Features) != 2 {
		t.Fatalf("%d features, want 2", len(fc.Features))
	}
	want := map[string]orb.Point{"T-1": {-70.5, -33.25}, "T-3": {12.75, 57.125}} // orb.Point is [lon, lat]
	for _, f := range fc.Features {
		id, _ := f.ID.(string)
		p, ok := f.Geometry.(orb.Point)
		if !ok || p != want[id] {
			t.Errorf("%s: geometry %v, want point %v", id, f.Geometry, want[id])
		}
		if f.Properties.MustString("bridge_id") != id {
			t.Errorf("%s: bridge_id %v", id, f.Properties["bridge_id"])
		}
	}
	if got := fc.Features[0].Properties.MustFloat64("e_rating"); got != 52.5 {
		t.Errorf("T-1 e_rating %v, want 52.5", got)
	}
}

// TestFollowsRFC7946: the rules of RFC 7946 checked on the raw document: a FeatureCollection
// (section 3.3) of Features (3.2) with "geometry" and "properties" members, Point geometries
// whose position has two numbers in range (3.1.1, 3.1.2), and no "crs" member anywhere
// (section 4: the CRS is WGS 84, and the member was removed).
func TestFollowsRFC7946(t *testing.T) {
	doc, _, err := Bridges(7, rows())
	if err != nil {
		t.Fatal(err)
	}
	var v any
	if err := json.Unmarshal(doc, &v); err != nil {
		t.Fatal(err)
	}
	var noCRS func(any)
	noCRS = func(v any) {
		switch x := v.(type) {
		case map[string]any:
			if _, ok := x["crs"]; ok {
				t.Error(`a "crs" member (RFC 7946 section 4)`)
			}
			for _, e := range x {
				noCRS(e)
			}
		case []any:
			for _, e := range x {
				noCRS(e)
			}
		}
	}
	noCRS(v)
	top := v.(map[string]any)
	if top["type"] != "FeatureCollection" || top["caution"] == "" {
		t.Errorf("top level: type %v, caution %v", top["type"], top["caution"])
	}
	for _, f := range top["features"].([]any) {
		f := f.(map[string]any)
		if f["type"] != "Feature" || f["properties"] == nil {
			t.Errorf("feature %v", f)
		}
		g := f["geometry"].(map[string]any)
		pos := g["coordinates"].([]any)
		if g["type"] != "Point" || len(pos) != 2 {
			t.Fatalf("geometry %v", g)
		}
		lon, lat := pos[0].(float64), pos[1].(float64)
		if lon < -180 || lon > 180 || lat < -90 || lat > 90 {
			t.Errorf("position %v out of range", pos)
		}
	}
}
