package report

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// TestElevationOfForms: every joint of every form lands inside the drawing where its
// coordinates put it (the drawing's scale is the same in x and y, so a polygonal chord and a
// K keep their shape), every support is drawn, rollers at every roller, and the caption
// names the form.
func TestElevationOfForms(t *testing.T) {
	shifted := func() *truss.Truss {
		// A joint table need not start at x = 0 nor keep above y = 0.
		tr, _ := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 6, DepthM: 7, Spans: 2})
		tb := truss.TableOf(tr)
		for i := range tb.Joints {
			tb.Joints[i].X += 100
			tb.Joints[i].Y -= 3
		}
		for i := range tb.Members {
			tb.Members[i].AreaMM2 = 1
		}
		out, _, err := tb.Build()
		if err != nil {
			t.Fatal(err)
		}
		return out
	}
	cases := []struct {
		name    string
		tr      *truss.Truss
		rollers int
		caption string
	}{
		{"parabolic", build(t, truss.Params{Type: "pratt", SpanM: 80, Panels: 10, DepthM: 11, EndDepthM: 7.5}), 1, "parabolic top chord"},
		{"listed", build(t, truss.Params{Type: "howe", SpanM: 72, Panels: 8, DepthsM: []float64{6.5, 8.2, 9.1, 9.4, 9.1, 8.0, 6.4}}), 1, "polygonal top chord, depth 6.40 m to 9.40 m"},
		{"k", build(t, truss.Params{Type: "k-truss", SpanM: 96, Panels: 8, DepthM: 14}), 1, "span 96.00 m"},
		{"sub-ties", build(t, truss.Params{Type: "pratt-sub-ties", SpanM: 96, Panels: 16, DepthM: 12}), 1, "16 panels"},
		{"deck warren", build(t, truss.Params{Type: "warren", SpanM: 40, Panels: 8, DepthM: 5, Deck: "deck"}), 1, "span 40.00 m"},
		{"three spans", build(t, truss.Params{Type: "howe", SpanM: 40, Panels: 6, DepthM: 6, Spans: 3}), 3, "continuous over 3 spans of 40.00 + 40.00 + 40.00 m, 6 panels per span"},
		{"table", shifted(), 2, "joint table of 24 joints"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			e := drawElevation(c.tr, Run{}, map[string]Member{}, units.SI)
			if len(e.Members) != len(c.tr.Members) || len(e.Supports) != len(c.tr.Supports) || len(e.Rollers) != 2*c.rollers {
				t.Errorf("%d members, %d supports, %d roller wheels", len(e.Members), len(e.Supports), len(e.Rollers))
			}
			if !strings.Contains(e.Span.Text, c.caption) {
				t.Errorf("caption %q, want %q in it", e.Span.Text, c.caption)
			}
			// Each member's path runs between its joints, scaled alike in x and y: the
			// drawn length over the true length is one scale for all members.
			scale := 0.0
			for i, m := range e.Members {
				var x1, y1, x2, y2 float64
				if _, err := fmt.Sscanf(m.D, "M %f %f L %f %f", &x1, &y1, &x2, &y2); err != nil {
					t.Fatal(err)
				}
				for _, v := range []float64{x1, x2} {
					if v < 0 || v > e.W {
						t.Errorf("%s: x %g outside the drawing", m.Label, v)
					}
				}
				for _, v := range []float64{y1, y2} {
					if v < 0 || v > e.H {
						t.Errorf("%s: y %g outside the drawing", m.Label, v)
					}
				}
				a, b := c.tr.Joints[c.tr.Members[i].A], c.tr.Joints[c.tr.Members[i].B]
				r := math.Hypot(x2-x1, y2-y1) / math.Hypot(b.X-a.X, b.Y-a.Y)
				if scale == 0 {
					scale = r
				}
				// drawn to 0.01 px (the path's %.2f)
				if d := (r - scale) * math.Hypot(b.X-a.X, b.Y-a.Y); d > 0.02 || d < -0.02 {
					t.Errorf("%s drawn at scale %g, others at %g", m.Label, r, scale)
				}
			}
		})
	}
}

func build(t *testing.T, p truss.Params) *truss.Truss {
	t.Helper()
	tr, err := truss.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	return tr
}
