// Package bridgegeom turns a stored bridge row into the truss it describes: the one place
// where the inventory's geometry columns meet the truss package's parameters, shared by the
// importers, the run and the report.
package bridgegeom

import (
	"encoding/json"

	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// Params gives the truss parameters of a stored bridge.
func Params(b store.Bridge) truss.Params {
	p := truss.Params{Type: b.TrussType, SpanM: b.SpanM, Panels: b.Panels, DepthM: b.DepthM, Deck: b.Deck, EndPosts: b.EndPosts,
		DepthsM: b.DepthsM, EndDepthM: b.EndDepthM}
	if b.Spans > 1 {
		p.Spans = b.Spans
	}
	return p
}

// Table decodes a stored joint table. A document that does not decode gives an empty table,
// which fails the bridge's screening with the reason (it has no deck joints).
func Table(doc json.RawMessage) *truss.Table {
	var tb truss.Table
	if err := json.Unmarshal(doc, &tb); err != nil {
		return &truss.Table{}
	}
	return &tb
}
