// Package geomap writes a run's bridges as a GeoJSON map layer (RFC 7946) for an owner's GIS:
// a FeatureCollection of Point features, one a bridge with coordinates, each with the
// bridge's summary as properties (rank, worst rating factor, flags, line categories, Cooper E
// rating). Positions are [longitude, latitude] in WGS 84 degrees, as RFC 7946 section 3.1.1
// requires, and the document has no "crs" member (RFC 7946 section 4 removed it). Bridges
// without coordinates, or with coordinates outside the ranges of longitude and latitude,
// are left out and counted. The collection carries the screening caution as a foreign
// member (RFC 7946 section 6.1).
package geomap

import (
	"encoding/json"
	"math"

	"github.com/trussfleet/trussfleet/internal/ranking"
)

// Caution goes with every map: what the properties are, and what they are not.
const Caution = "Screening only, not a load rating. A licensed engineer's rating under the governing code and the owner's standards decides; line categories are EN 15528's (values from memory) with trussfleet's own reference wagons, and the E rating is 80 x the RF under Cooper E80."

type point struct {
	Type        string     `json:"type"`
	Coordinates [2]float64 `json:"coordinates"`
}

type feature struct {
	Type       string         `json:"type"`
	ID         string         `json:"id"`
	Geometry   point          `json:"geometry"`
	Properties map[string]any `json:"properties"`
}

type collection struct {
	Type     string    `json:"type"`
	Caution  string    `json:"caution"`
	Run      int64     `json:"run"`
	Features []feature `json:"features"`
}

// Bridges is the GeoJSON of a run's priority-list rows, and the number of rows left out for
// want of valid coordinates. rows are not modified.
func Bridges(runID int64, rows []ranking.Row) (doc []byte, leftOut int, err error) {
	c := collection{Type: "FeatureCollection", Caution: Caution, Run: runID, Features: []feature{}}
	for _, r := range rows {
		if !located(r) {
			leftOut++
			continue
		}
		flags := r.Flags
		if flags == nil {
			flags = []string{}
		}
		props := map[string]any{
			"rank": r.Rank, "bridge_id": r.BridgeID, "name": r.Name, "line": r.Line, "chainage_km": r.ChainageKm,
			"truss_type": r.TrussType, "span_m": r.SpanM, "status": r.Status,
			"worst_member": r.WorstMember, "rf_existing": r.RFExisting, "rf_proposed": r.RFProposed, "headroom": r.Headroom,
			"flags": flags, "categories": r.Categories, "e_rating": r.ERating, "e_member": r.EMember,
		}
		c.Features = append(c.Features, feature{Type: "Feature", ID: r.BridgeID,
			Geometry:   point{Type: "Point", Coordinates: [2]float64{*r.Longitude, *r.Latitude}},
			Properties: props})
	}
	doc, err = json.MarshalIndent(c, "", " ")
	return doc, leftOut, err
}

// located says whether a row has a position RFC 7946 can hold: longitude from -180 to 180,
// latitude from -90 to 90 degrees.
func located(r ranking.Row) bool {
	if r.Latitude == nil || r.Longitude == nil {
		return false
	}
	lat, lon := *r.Latitude, *r.Longitude
	return !math.IsNaN(lat) && !math.IsNaN(lon) && lat >= -90 && lat <= 90 && lon >= -180 && lon <= 180
}
