package report

import (
	"fmt"
	"strings"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// formCaption describes a truss's form in a line: spans (several for a continuous truss),
// panels, depth (at midspan and at the ends for a polygonal top chord), or the size of a
// joint table.
func formCaption(t *truss.Truss, u units.System) string {
	lu := u.Name(units.Length)
	l := func(v float64) string { return qty(u, units.Length, v) + " " + lu }
	p := t.Params
	var parts []string
	spans := t.SpanLengthsM()
	if len(spans) > 1 {
		s := make([]string, len(spans))
		for i, v := range spans {
			s[i] = qty(u, units.Length, v)
		}
		parts = append(parts, fmt.Sprintf("continuous over %d spans of %s %s", len(spans), strings.Join(s, " + "), lu))
	} else {
		parts = append(parts, "span "+l(t.SpanM()))
	}
	if len(spans) > 1 && p.Type != truss.TableType {
		parts = append(parts, fmt.Sprintf("%d panels per span", p.Panels))
	} else {
		parts = append(parts, fmt.Sprintf("%d panels", p.Panels))
	}
	switch {
	case p.Type == truss.TableType:
		parts = append(parts, fmt.Sprintf("depth %s; joint table of %d joints and %d members", l(p.DepthM), len(t.Joints), len(t.Members)))
	case len(p.DepthsM) > 0:
		lo := p.DepthM
		for _, d := range p.DepthsM {
			lo = min(lo, d)
		}
		parts = append(parts, fmt.Sprintf("polygonal top chord, depth %s to %s", l(lo), l(p.DepthM)))
	case p.EndDepthM > 0:
		parts = append(parts, fmt.Sprintf("parabolic top chord, depth %s at the ends to %s at midspan", l(p.EndDepthM), l(p.DepthM)))
	default:
		parts = append(parts, "depth "+l(p.DepthM))
	}
	return strings.Join(parts, ", ")
}

// specialForm reports whether a truss is more than a parallel-chord truss of one span, so
// that its form is worth a line of its own.
func specialForm(t *truss.Truss) bool {
	return t.Params.Polygonal() || len(t.SpanLengthsM()) > 1 || t.Params.Type == truss.TableType
}

// supportWord says where the truss bears, for the drawing's caption.
func supportWord(t *truss.Truss) string {
	switch {
	case t.Params.Type == truss.TableType:
		return "Supports as the joint table gives them: a triangle is a pin, a triangle on wheels a roller."
	case len(t.Supports) > 2:
		return "Pin at the left bearing, rollers at the right bearing and at each intermediate pier."
	}
	return "Pin at the left bearing, roller at the right."
}
