package importers

import (
	"strings"

	"github.com/trussfleet/trussfleet/store"
)

// The bridges.csv columns of the truss forms of older fleets (docs/inventory.md, "Truss
// forms"): a polygonal top chord as a list of depths or an end depth, and the number of
// continuous spans.
var (
	colDepths   = column{name: "depths_m", alt: "depths_ft", factor: metresPerFoot, maxChars: maxDepthsChars}
	colEndDepth = column{name: "end_depth_m", alt: "end_depth_ft", factor: metresPerFoot}
)

// maxDepthsChars bounds a list of depths: 81 joints of up to 11 characters each.
const maxDepthsChars = 1000

// form is what parseForm found.
type form struct {
	listed bool // a list of depths was given
}

// depthColumn is the depth column's rule for the row: it may be left empty where a list of
// depths gives the largest depth.
func depthColumn(f form) column {
	c := colDepth
	if f.listed {
		c.required = false
	}
	return c
}

// parseForm reads the polygonal-chord and span columns into b.
func parseForm(r bridgeRecord, p *row, b *store.Bridge) form {
	raw := pickRaw(p, colDepths, r.DepthsM, r.DepthsFt)
	name := p.pick(colDepths)
	for _, f := range strings.Fields(raw) {
		v := p.number(name, f, true)
		if v == nil {
			continue
		}
		if p.src.has(colDepths.alt) {
			*v *= colDepths.factor
		}
		if !(*v > 0) {
			p.fail(name, raw, "every depth must be greater than zero")
		}
		b.DepthsM = append(b.DepthsM, *v)
	}
	if end := p.quantity(colEndDepth, r.EndDepthM, r.EndDepthFt); end != nil {
		p.positive(p.pick(colEndDepth), pickRaw(p, colEndDepth, r.EndDepthM, r.EndDepthFt), end)
		b.EndDepthM = *end
	}
	b.Spans = p.integer("spans", r.Spans, false, 1)
	if b.Spans < 1 {
		p.fail("spans", r.Spans, "must be a whole number from 1 to 3")
	}
	return form{listed: len(b.DepthsM) > 0}
}

// tableRowForm refuses the parametric form columns on a row whose truss is a joint table:
// the table alone gives its form.
func tableRowForm(r bridgeRecord, p *row, b store.Bridge) {
	for _, c := range []struct {
		col   column
		given bool
	}{
		{column{name: "end_posts"}, b.EndPosts != ""},
		{colDepths, len(b.DepthsM) > 0},
		{colEndDepth, b.EndDepthM > 0},
		{column{name: "spans"}, b.Spans > 1},
	} {
		if name := p.pick(c.col); c.given && !p.failed[name] {
			p.fail(name, rawOf(r, name), "a truss of type %q takes its form from its joint table; leave this empty", "table")
		}
	}
}
