// Package trusstest draws random valid truss parameters for property tests.
package trusstest

import (
	"github.com/trussfleet/trussfleet/screening/truss"
	"pgregory.net/rapid"
)

// RandomParams draws valid parameters of any type, for property tests here and in the
// packages that analyse trusses.
func RandomParams(t *rapid.T) truss.Params {
	names := truss.TypeNames()
	typ := truss.Types[rapid.SampledFrom(names).Draw(t, "type")]
	n := rapid.IntRange(1, 8).Draw(t, "halfPanels") * 2
	if !typ.EvenPanels {
		n = rapid.IntRange(2, 16).Draw(t, "panels")
	}
	span := rapid.Float64Range(12, 120).Draw(t, "span")
	d := span / float64(n)
	// Depth between the limits of both proportion rules, kept well inside them.
	lo := max(span/30, d/5)
	hi := min(span/2, d*8)
	depth := rapid.Float64Range(lo, max(lo, hi)).Draw(t, "depth")
	p := truss.Params{Type: typ.Name, SpanM: span, Panels: n, DepthM: depth}
	p.Deck = rapid.SampledFrom(typ.DeckAllowed).Draw(t, "deck")
	if need := typ.DeckNeeds[p.Deck]; need != "" {
		p.EndPosts = need
	} else if len(typ.EndPosts) > 0 {
		p.EndPosts = rapid.SampledFrom(typ.EndPosts).Draw(t, "endPosts")
	}
	return p
}
