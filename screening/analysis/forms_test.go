package analysis_test

import (
	"errors"
	"math"
	"sort"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// polygonal are Pratt and Howe trusses with polygonal top chords (invented proportions).
var polygonal = []truss.Params{
	{Type: "pratt", SpanM: 80, Panels: 10, DepthM: 11, EndDepthM: 7.5},
	{Type: "pratt", SpanM: 80, Panels: 10, DepthM: 11, EndDepthM: 7.5, EndPosts: "vertical"},
	{Type: "pratt", SpanM: 72, Panels: 8, DepthsM: []float64{6.5, 8.2, 9.1, 9.4, 9.1, 8.0, 6.4}},
	{Type: "howe", SpanM: 60, Panels: 8, DepthM: 9, EndDepthM: 6},
	{Type: "warren-verticals", SpanM: 60, Panels: 8, DepthM: 9, EndDepthM: 6},
}

// cut is a member a vertical section crosses: its left joint P and its unit direction e,
// pointing away from the free body left of the section.
type cut struct {
	i        int
	px, py   float64
	ex, ey   float64
	onBottom bool
}

// TestPolygonalChordBySections solves every panel of a polygonal-chord truss by the method
// of sections, written out here (any structural analysis text): a vertical section through
// the middle of a panel cuts the bottom chord, the top chord (inclined) and at most one web
// member. Moments about the point where two of the cut members' lines meet give the third:
// N = M(C) / ((P - C) × e), with M(C) the simple-beam moment at C's abscissa (the moment
// of the forces left of the section; the local depth enters as the lever arm). The web
// member then follows from vertical equilibrium of the left part, V + Σ N·e_y = 0, in
// which the inclined top chord's vertical component carries part of the shear.
func TestPolygonalChordBySections(t *testing.T) {
	for _, p := range polygonal {
		tr, l := solve(t, p)
		L := p.SpanM
		xs := tr.DeckX()
		for k := 1; k < len(xs); k++ {
			s := (xs[k-1] + xs[k]) / 2
			cuts := sectionAt(tr, s)
			var bottom, top, web *cut
			for c := range cuts {
				switch {
				case cuts[c].onBottom:
					bottom = &cuts[c]
				case top == nil || cuts[c].py+cuts[c].ey > top.py+top.ey:
					if top != nil {
						web = top
					}
					top = &cuts[c]
				default:
					web = &cuts[c]
				}
			}
			if bottom == nil || top == nil || len(cuts) > 3 {
				t.Fatalf("%+v: section at %g cuts %d members", p, s, len(cuts))
			}
			if web != nil && web.py+web.ey > top.py+top.ey {
				web, top = top, web
			}
			for lc, x := range l.X {
				mAbout := func(c *cut, o1, o2 *cut) float64 {
					cx, cy := meet(o1, o2)
					return beamMoment(L, x, cx) / ((c.px-cx)*c.ey - (c.py-cy)*c.ex)
				}
				var nb, nt float64
				if web == nil { // end panel: the end post and the bottom chord only
					nt = -beamShear(L, x, s) / top.ey
					nb = -nt * top.ex
				} else {
					nb = mAbout(bottom, top, web)
					nt = mAbout(top, bottom, web)
				}
				check := func(c *cut, want float64) {
					if got := l.Members[c.i].Ordinates[lc]; math.Abs(got-want) > 1e-9 {
						t.Errorf("%s %+v %s, load at %g: stiffness %g, sections %g", p.Type, p.DepthsM, tr.Members[c.i].Label, x, got, want)
					}
				}
				check(bottom, nb)
				check(top, nt)
				if web != nil {
					check(web, -(beamShear(L, x, s)+nt*top.ey)/web.ey)
				}
			}
		}
	}
}

// sectionAt lists the members a vertical line at x crosses.
func sectionAt(tr *truss.Truss, x float64) []cut {
	var out []cut
	for i, m := range tr.Members {
		a, b := tr.Joints[m.A], tr.Joints[m.B]
		if a.X > b.X {
			a, b = b, a
		}
		if !(a.X < x && b.X > x) {
			continue
		}
		ln := math.Hypot(b.X-a.X, b.Y-a.Y)
		out = append(out, cut{i: i, px: a.X, py: a.Y, ex: (b.X - a.X) / ln, ey: (b.Y - a.Y) / ln, onBottom: a.Y == 0 && b.Y == 0})
	}
	return out
}

// meet is where the lines of two cut members cross.
func meet(a, b *cut) (float64, float64) {
	// a.p + s a.e = b.p + u b.e, solved by Cramer's rule.
	det := -a.ex*b.ey + a.ey*b.ex
	dx, dy := b.px-a.px, b.py-a.py
	s := (-dx*b.ey + dy*b.ex) / det
	return a.px + s*a.ex, a.py + s*a.ey
}

// newForms are the forms solved against the method of joints (invented proportions).
var newForms = []truss.Params{
	{Type: "k-truss", SpanM: 96, Panels: 8, DepthM: 14},
	{Type: "k-truss", SpanM: 96, Panels: 8, DepthM: 14, EndPosts: "vertical"},
	{Type: "k-truss", SpanM: 64, Panels: 8, DepthM: 10, Deck: "deck"},
	{Type: "k-truss", SpanM: 100, Panels: 10, DepthM: 14, EndDepthM: 10},
	{Type: "pratt-sub-struts", SpanM: 96, Panels: 16, DepthM: 12},
	{Type: "pratt-sub-struts", SpanM: 96, Panels: 16, DepthM: 12, EndPosts: "vertical"},
	{Type: "pratt-sub-ties", SpanM: 96, Panels: 16, DepthM: 12},
	{Type: "pratt-sub-ties", SpanM: 120, Panels: 16, DepthM: 16, EndDepthM: 11},
	{Type: "pratt-sub-struts", SpanM: 64, Panels: 8, DepthsM: []float64{9, 10.5, 9}},
	{Type: "warren", SpanM: 40, Panels: 8, DepthM: 5, Deck: "deck"},
}

// TestNewFormsByJoints checks K-trusses, subdivided Pratts and the deck Warren against the
// method of joints: the 2j equilibrium equations of the joints, with the three reactions
// as unknowns, solved by dense elimination (equilibrium, in analysis_test.go), independent of
// the stiffness code.
func TestNewFormsByJoints(t *testing.T) {
	for _, p := range newForms {
		tr, l := solve(t, p)
		if m, j := len(tr.Members), len(tr.Joints); m+3 != 2*j {
			t.Fatalf("%+v: m=%d j=%d, not determinate", p, m, j)
		}
		for k, dj := range tr.DeckJoints {
			n := equilibrium(t, tr, func(f []float64) { f[2*dj+1] = -1 })
			for i := range tr.Members {
				if got := l.Members[i].Ordinates[k]; math.Abs(got-n[i]) > 1e-9 {
					t.Errorf("%s %s, load at %s: stiffness %g, joints %g", p.Type, tr.Members[i].Label, tr.Joints[dj].Name, got, n[i])
				}
			}
		}
		// On a simple span under gravity load the top chord is compressed and the bottom
		// chord stretched, whatever the web (common practice).
		for i, m := range tr.Members {
			for k, o := range l.Members[i].Ordinates {
				if (m.Kind == truss.TopChord && o > tol) || (m.Kind == truss.BottomChord && o < -tol) {
					t.Errorf("%s %s: %g for a load at %g", p.Type, m.Label, o, l.X[k])
				}
			}
		}
	}
	// A subdivided Pratt's hanger carries only the floor beam it hangs from (joint L1, common
	// practice): ordinate 1 for a load at its own sub-panel point, 0 elsewhere.
	tr, l := solve(t, newForms[4])
	i := tr.Member("L3-M3")
	for k, x := range l.X {
		want := 0.0
		if x == tr.Joints[tr.Members[i].A].X {
			want = 1
		}
		if math.Abs(l.Members[i].Ordinates[k]-want) > tol {
			t.Errorf("hanger L3-M3: %g for a load at %g, want %g", l.Members[i].Ordinates[k], x, want)
		}
	}
}

// TestTwoSpanContinuous checks a Pratt continuous over two spans against the force method
// written here (any structural analysis text): with the pier's roller removed the truss is
// determinate (method of joints, dense elimination); the pier reaction X makes the pier's
// deflection zero, X = -Σ N0·n1·L/EA / Σ n1²·L/EA, where N0 are the forces of the released
// truss under the load and n1 those under a unit upward force at the pier. Member areas are
// unequal, so the answer depends on them, as it must for an indeterminate truss.
func TestTwoSpanContinuous(t *testing.T) {
	p := truss.Params{Type: "pratt", SpanM: 48, Panels: 6, DepthM: 7, Spans: 2}
	tr, err := truss.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	if got := tr.SpanM(); got != 96 {
		t.Fatalf("length %g, want 96", got)
	}
	ea := make([]float64, len(tr.Members))
	for i := range ea {
		ea[i] = 1 + 0.7*float64(i%4)
	}
	l, err := analysis.InfluenceLines(tr, analysis.Options{AxialStiffness: ea})
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Supports) != 3 {
		t.Fatalf("%d supports, want 3", len(tr.Supports))
	}
	released := *tr
	released.Supports = tr.Supports[:2]
	pier := tr.Supports[2].Joint
	n1 := equilibrium(t, &released, func(f []float64) { f[2*pier+1] = 1 })
	flex := func(i int) float64 { return tr.LengthM(i) / ea[i] }
	for k, dj := range tr.DeckJoints {
		n0 := equilibrium(t, &released, func(f []float64) { f[2*dj+1] = -1 })
		var num, den float64
		for i := range tr.Members {
			num += n0[i] * n1[i] * flex(i)
			den += n1[i] * n1[i] * flex(i)
		}
		x := -num / den
		if got := l.Reactions[2].Ry[k]; math.Abs(got-x) > 1e-9 {
			t.Errorf("pier reaction, load at %s: stiffness %g, force method %g", tr.Joints[dj].Name, got, x)
		}
		for i := range tr.Members {
			if got, want := l.Members[i].Ordinates[k], n0[i]+x*n1[i]; math.Abs(got-want) > 1e-9 {
				t.Errorf("%s, load at %s: stiffness %g, force method %g", tr.Members[i].Label, tr.Joints[dj].Name, got, want)
			}
		}
	}
	// Over the pier the moment is hogging for a load anywhere (common practice for a
	// continuous beam): the bottom chord panel whose moment centre is the pier's top joint U6
	// (method of sections: the section through L5-L6 cuts U5-U6 and L5-U6, meeting at U6) is
	// compressed for every load, the reverse of a simple span, and the top chord in that
	// panel (moment centre L5, 8 m from the pier) reverses with the loaded span.
	over := l.Members[tr.Member("L5-L6")].Ordinates
	for k, o := range over {
		if o > tol {
			t.Errorf("bottom chord L5-L6 at the pier: %g for a load at %g, want compression", o, l.X[k])
		}
	}
	if z := analysis.SignChanges(l.X, l.Members[tr.Member("U5-U6")].Ordinates); len(z) == 0 {
		t.Errorf("top chord U5-U6 near the pier does not reverse")
	}
	// The same truss with equal areas gives a different pier reaction: an indeterminate
	// truss's forces depend on the stiffness ratios (common practice).
	eq, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	k := 2
	if d := math.Abs(eq.Reactions[2].Ry[k] - l.Reactions[2].Ry[k]); d < 1e-6 {
		t.Errorf("pier reaction independent of the areas (%g)", d)
	}
	// For a feel of the numbers: a two-span beam of equal spans, load at a in span 1 (force
	// method, handbook): R = a(3L² - a²)/(2L³). The truss's shear deformation and varying
	// member areas move it, but not far (within 0.1 for equal areas).
	for k, x := range eq.X {
		if x > 48 {
			break
		}
		if r := x * (3*48*48 - x*x) / (2 * 48 * 48 * 48); math.Abs(eq.Reactions[2].Ry[k]-r) > 0.1 {
			t.Errorf("pier reaction %g for a load at %g, beam %g", eq.Reactions[2].Ry[k], x, r)
		}
	}
}

// TestThreeSpanStatics: a three-span continuous truss's reactions balance every unit load
// (equilibrium of the free body, common practice), and the influence lines run over all
// three spans.
func TestThreeSpanStatics(t *testing.T) {
	for _, typ := range []string{"pratt", "howe", "warren-verticals"} {
		tr, l := solve(t, truss.Params{Type: typ, SpanM: 40, Panels: 6, DepthM: 6, Spans: 3})
		if l.X[0] != 0 || math.Abs(l.X[len(l.X)-1]-120) > 1e-9 {
			t.Errorf("%s: lines over %g..%g, want 0..120", typ, l.X[0], l.X[len(l.X)-1])
		}
		for k, x := range l.X {
			var ry, mom float64
			for _, r := range l.Reactions {
				ry += r.Ry[k]
				mom += r.Ry[k] * tr.Joints[indexOf(tr, r.Joint)].X
			}
			if math.Abs(ry-1) > tol || math.Abs(mom-x) > tol*120 {
				t.Errorf("%s: load at %g: ΣRy=%g ΣM=%g", typ, x, ry, mom)
			}
		}
	}
}

// TestMechanismNamed removes one diagonal of a Pratt and expects the error to name the
// joints that move.
func TestMechanismNamed(t *testing.T) {
	tr, _ := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	c := *tr
	c.Members = remove(append([]truss.Member{}, tr.Members...), tr.Member("U2-L3"))
	_, err := analysis.InfluenceLines(&c, analysis.Options{})
	var me *analysis.MechanismError
	if !errors.As(err, &me) || !errors.Is(err, analysis.ErrMechanism) {
		t.Fatalf("got %v, want a MechanismError", err)
	}
	moving := append([]string{}, me.Joints...)
	sort.Strings(moving)
	// With the diagonal U2-L3 gone, panel 2–3 shears freely: every joint right of the
	// panel (and the top joint U2 swinging with them) can move (kinematics of the panel).
	for _, want := range []string{"L3", "U3", "L4"} {
		if i := sort.SearchStrings(moving, want); i == len(moving) || moving[i] != want {
			t.Errorf("moving joints %v do not name %s", moving, want)
		}
	}
}

// BenchmarkInfluenceLinesForms measures the influence lines of the new forms: a Pratt
// continuous over two spans of 12 panels (24 panels in all) and a subdivided Pratt of 16
// sub-panels (BENCHMARKS.md).
func BenchmarkInfluenceLinesForms(b *testing.B) {
	for _, c := range []struct {
		name string
		p    truss.Params
	}{
		{"TwoSpan24", truss.Params{Type: "pratt", SpanM: 72, Panels: 12, DepthM: 9, Spans: 2}},
		{"SubdividedPratt16", truss.Params{Type: "pratt-sub-ties", SpanM: 96, Panels: 16, DepthM: 12}},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				tr, err := truss.Build(c.p)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := analysis.InfluenceLines(tr, analysis.Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
