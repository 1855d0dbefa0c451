// Package trusstest draws random valid truss parameters for property tests.
package trusstest

import (
	"github.com/trussfleet/trussfleet/screening/truss"
	"pgregory.net/rapid"
)

// RandomParams draws valid parameters of any type, for property tests here and in the
// packages that analyse trusses. The trusses drawn are statically determinate (one span);
// a through truss of a type that allows it may have a polygonal top chord (a parabola or a
// list of depths).
func RandomParams(t *rapid.T) truss.Params {
	names := truss.TypeNames()
	typ := truss.Types[rapid.SampledFrom(names).Draw(t, "type")]
	n := rapid.IntRange(1, 8).Draw(t, "halfPanels") * 2
	if typ.PanelsMultiple > 1 {
		n = rapid.IntRange(1, 4).Draw(t, "mainPanelPairs") * typ.PanelsMultiple
	} else if !typ.EvenPanels {
		n = rapid.IntRange(2, 16).Draw(t, "panels")
	}
	n = max(n, typ.MinPanels)
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
	if !typ.Polygonal || p.Deck == truss.DeckTop {
		return p
	}
	shallow := max(lo, 0.6*depth)
	switch rapid.IntRange(0, 2).Draw(t, "chord") {
	case 1:
		p.EndDepthM = rapid.Float64Range(shallow, depth).Draw(t, "endDepth")
	case 2:
		tr, err := truss.Build(p)
		if err != nil {
			t.Fatalf("%+v: %v", p, err)
		}
		for _, j := range tr.Joints {
			if j.Name[0] == 'U' {
				p.DepthsM = append(p.DepthsM, rapid.Float64Range(shallow, depth).Draw(t, "depthAt"))
			}
		}
		p.DepthM = 0 // the largest of the list
	}
	return p
}
