package analysis_test

import (
	"errors"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/screening/truss/trusstest"
	"gonum.org/v1/gonum/mat"
	"pgregory.net/rapid"
)

const tol = 1e-9

var examples = []truss.Params{
	{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
	{Type: "pratt", SpanM: 60, Panels: 6, DepthM: 8, EndPosts: "vertical"},
	{Type: "pratt", SpanM: 54, Panels: 6, DepthM: 7, Deck: "deck"},
	{Type: "howe", SpanM: 48, Panels: 8, DepthM: 6},
	{Type: "howe", SpanM: 40, Panels: 10, DepthM: 5, Deck: "deck"},
	{Type: "warren", SpanM: 40, Panels: 5, DepthM: 5},
	{Type: "warren", SpanM: 75.5, Panels: 10, DepthM: 8.2},
	{Type: "warren-verticals", SpanM: 42, Panels: 6, DepthM: 6},
}

func solve(t testing.TB, p truss.Params) (*truss.Truss, *analysis.Lines) {
	t.Helper()
	tr, err := truss.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	l, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		t.Fatalf("%+v: %v", p, err)
	}
	return tr, l
}

// TestStatics: for every unit load the reactions balance it and the moments about the left
// bearing balance (equilibrium of the free body, common practice).
func TestStatics(t *testing.T) {
	for _, p := range examples {
		tr, l := solve(t, p)
		for k, x := range l.X {
			var rx, ry, mom float64
			for _, r := range l.Reactions {
				j := tr.Joints[indexOf(tr, r.Joint)]
				rx += r.Rx[k]
				ry += r.Ry[k]
				mom += r.Ry[k]*j.X - r.Rx[k]*j.Y
			}
			if math.Abs(rx) > tol || math.Abs(ry-1) > tol || math.Abs(mom-x) > tol*p.SpanM {
				t.Errorf("%s: unit load at x=%g: ΣRx=%g ΣRy=%g ΣM=%g (want 0, 1, %g)", p.Type, x, rx, ry, mom, x)
			}
			// Simple beam reactions, handbook beam diagram for a point load: R_left = (L-x)/L.
			if r := l.Reactions[0].Ry[k]; math.Abs(r-(p.SpanM-x)/p.SpanM) > tol {
				t.Errorf("%s: left reaction %g for load at %g", p.Type, r, x)
			}
		}
	}
}

func indexOf(tr *truss.Truss, name string) int {
	for i, j := range tr.Joints {
		if j.Name == name {
			return i
		}
	}
	return -1
}

// beamMoment is the simple-span bending moment at xc due to a unit point load at x
// (handbook beam diagram, simple beam with a concentrated load).
func beamMoment(L, x, xc float64) float64 {
	if x <= xc {
		return x * (L - xc) / L
	}
	return xc * (L - x) / L
}

// beamShear is the resultant of the forces left of a section at xs (upward positive) for a
// unit load at x not standing at xs (simple beam, handbook beam diagram).
func beamShear(L, x, xs float64) float64 {
	v := (L - x) / L
	if x < xs {
		v--
	}
	return v
}

// TestMethodOfSections computes chord forces as the panel-point moment over the depth, and
// web forces from the panel shear, independently of the stiffness solution (method of
// sections, any structural analysis text). A chord's moment centre is the far end of a web
// member lying within the chord's panel; a web member is the only web member a vertical
// section through its middle cuts.
func TestMethodOfSections(t *testing.T) {
	for _, p := range examples {
		tr, l := solve(t, p)
		L := p.SpanM
		for i, m := range tr.Members {
			a, b := tr.Joints[m.A], tr.Joints[m.B]
			for k, x := range l.X {
				got := l.Members[i].Ordinates[k]
				var want float64
				switch m.Kind {
				case truss.BottomChord, truss.TopChord:
					xc, ok := momentCentre(tr, m)
					if !ok {
						t.Fatalf("%s %s: no moment centre", p.Type, m.Label)
					}
					want = beamMoment(L, x, xc) / p.DepthM
					if m.Kind == truss.TopChord {
						want = -want
					}
				case truss.Diagonal, truss.EndPost:
					if a.X == b.X {
						continue // a vertical end post: checked by joint equilibrium below
					}
					xs := (a.X + b.X) / 2
					// The member pulls the left part toward its right end: N·e_y + V = 0.
					ey := (b.Y - a.Y) / math.Hypot(b.X-a.X, b.Y-a.Y)
					want = -beamShear(L, x, xs) / ey
				default:
					continue
				}
				if math.Abs(got-want) > 1e-9 {
					t.Errorf("%s %s, load at %g: stiffness %g, sections %g", p.Type, m.Label, x, got, want)
				}
			}
		}
	}
}

func momentCentre(tr *truss.Truss, chord truss.Member) (float64, bool) {
	lo := min(tr.Joints[chord.A].X, tr.Joints[chord.B].X)
	hi := max(tr.Joints[chord.A].X, tr.Joints[chord.B].X)
	for _, w := range tr.Members {
		if w.Kind != truss.Diagonal && w.Kind != truss.EndPost {
			continue
		}
		a, b := tr.Joints[w.A], tr.Joints[w.B]
		if a.X == b.X || min(a.X, b.X) < lo-1e-9 || max(a.X, b.X) > hi+1e-9 {
			continue
		}
		// The far end: the web member's end on the other chord.
		far := a
		if (chord.Kind == truss.BottomChord) == (b.Y > a.Y) {
			far = b
		}
		return far.X, true
	}
	return 0, false
}

// TestFullUniformLoad: a uniform load w over the whole span reaches the panel points as w·d
// (half that at the bearings); chord forces then equal M/h with M = w·x·(L−x)/2 at a moment
// centre on a panel point (handbook beam diagram, simple beam with uniform load: the
// panel-point moments of a panel-loaded beam equal those of the uniform load). Between panel
// points the panel-loaded moment is linear (no load there), which the Warren's mid-panel
// moment centres use.
func TestFullUniformLoad(t *testing.T) {
	const w = 80.0 // kN/m
	for _, p := range examples {
		tr, l := solve(t, p)
		pos, neg := 0.0, 0.0
		for i, m := range tr.Members {
			if m.Kind != truss.BottomChord && m.Kind != truss.TopChord {
				continue
			}
			xc, _ := momentCentre(tr, m)
			mUDL := func(x float64) float64 { return w * x * (p.SpanM - x) / 2 }
			d := p.SpanM / float64(p.Panels)
			x0 := math.Floor(xc/d+1e-9) * d
			want := (mUDL(x0) + (mUDL(x0+d)-mUDL(x0))*(xc-x0)/d) / p.DepthM
			if m.Kind == truss.TopChord {
				want = -want
			}
			// The force from a distributed load is w times the net influence-line area.
			pos, neg = analysis.Areas(l.X, l.Members[i].Ordinates)
			if got := w * (pos + neg); math.Abs(got-want) > 1e-8*math.Abs(want)+1e-9 {
				t.Errorf("%s %s: w·area %g, w·x(L−x)/2h %g", p.Type, m.Label, got, want)
			}
		}
	}
}

// TestPatterns checks what an engineer expects of a simple-span truss (common practice).
func TestPatterns(t *testing.T) {
	for _, p := range examples {
		tr, l := solve(t, p)
		for i, m := range tr.Members {
			o := l.Members[i].Ordinates
			for k := range o {
				if m.Kind == truss.TopChord && o[k] > tol {
					t.Errorf("%s %s in tension (%g) for a load at %g", p.Type, m.Label, o[k], l.X[k])
				}
				if m.Kind == truss.BottomChord && o[k] < -tol {
					t.Errorf("%s %s in compression (%g) for a load at %g", p.Type, m.Label, o[k], l.X[k])
				}
			}
		}
	}
	// Pratt diagonals of the interior panels change sign inside the panel they cross.
	tr, l := solve(t, truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	for i, m := range tr.Members {
		if m.Kind != truss.Diagonal {
			continue
		}
		a, b := tr.Joints[m.A].X, tr.Joints[m.B].X
		z := analysis.SignChanges(l.X, l.Members[i].Ordinates)
		if len(z) != 1 || z[0] <= a || z[0] >= b {
			t.Errorf("pratt %s: sign changes at %v, want one inside (%g, %g)", m.Label, z, a, b)
		}
	}
	// Hip verticals of a Pratt with inclined end posts carry only the load at their own
	// panel point, in tension.
	for _, lab := range []string{"L1-U1", "L7-U7"} {
		i := tr.Member(lab)
		for k, x := range l.X {
			want := 0.0
			if x == tr.Joints[tr.Members[i].A].X {
				want = 1
			}
			if math.Abs(l.Members[i].Ordinates[k]-want) > tol {
				t.Errorf("hip vertical %s: %g for a load at %g, want %g", lab, l.Members[i].Ordinates[k], x, want)
			}
		}
	}
}

// TestIndeterminatePanel adds the second diagonal to one panel of a Pratt truss and checks
// the stiffness solution against the force method (virtual work with the added diagonal as
// the redundant, any structural analysis text): X = −Σ N0·n1·L/EA / Σ n1²·L/EA, the primary
// forces N0 and n1 found from the joint equilibrium matrix assembled here.
func TestIndeterminatePanel(t *testing.T) {
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 36, Panels: 6, DepthM: 6})
	if err != nil {
		t.Fatal(err)
	}
	primary := *tr
	red := truss.Member{Label: "L2-U3", Kind: truss.Diagonal, A: indexOf(tr, "L2"), B: indexOf(tr, "U3")}
	tr.Members = append(append([]truss.Member{}, tr.Members...), red)
	ea := make([]float64, len(tr.Members))
	for i := range ea {
		ea[i] = 1 + 0.5*float64(i%3) // unequal stiffness: the answer depends on it
	}
	l, err := analysis.InfluenceLines(tr, analysis.Options{AxialStiffness: ea})
	if err != nil {
		t.Fatal(err)
	}
	flex := func(i int) float64 { return tr.LengthM(i) / ea[i] }
	r := len(tr.Members) - 1
	n1 := equilibrium(t, &primary, func(f []float64) {
		// A unit tension in the redundant pulls its two joints toward each other.
		a, b := tr.Joints[red.A], tr.Joints[red.B]
		ln := math.Hypot(b.X-a.X, b.Y-a.Y)
		cx, cy := (b.X-a.X)/ln, (b.Y-a.Y)/ln
		f[2*red.A], f[2*red.A+1] = cx, cy
		f[2*red.B], f[2*red.B+1] = -cx, -cy
	})
	for k, dj := range tr.DeckJoints {
		n0 := equilibrium(t, &primary, func(f []float64) { f[2*dj+1] = -1 })
		var num, den float64
		for i := range primary.Members {
			num += n0[i] * n1[i] * flex(i)
			den += n1[i] * n1[i] * flex(i)
		}
		den += flex(r)
		x := -num / den
		for i := range primary.Members {
			want := n0[i] + x*n1[i]
			if got := l.Members[i].Ordinates[k]; math.Abs(got-want) > 1e-9 {
				t.Errorf("load at %s, %s: stiffness %g, force method %g", tr.Joints[dj].Name, tr.Members[i].Label, got, want)
			}
		}
		if got := l.Members[r].Ordinates[k]; math.Abs(got-x) > 1e-9 {
			t.Errorf("load at %s, redundant: stiffness %g, force method %g", tr.Joints[dj].Name, got, x)
		}
	}
}

// equilibrium solves the joint equilibrium equations of a determinate truss for external
// joint loads (set by load into f, indexed 2·joint + axis) with a dense solve.
func equilibrium(t *testing.T, tr *truss.Truss, load func(f []float64)) []float64 {
	nj, m := len(tr.Joints), len(tr.Members)
	cols := m + 3 // member forces, then Rx and Ry at the pin, Ry at the roller
	a := mat.NewDense(2*nj, cols, nil)
	for i, mb := range tr.Members {
		p, q := tr.Joints[mb.A], tr.Joints[mb.B]
		ln := math.Hypot(q.X-p.X, q.Y-p.Y)
		cx, cy := (q.X-p.X)/ln, (q.Y-p.Y)/ln
		a.Set(2*mb.A, i, cx)
		a.Set(2*mb.A+1, i, cy)
		a.Set(2*mb.B, i, -cx)
		a.Set(2*mb.B+1, i, -cy)
	}
	pin, roller := tr.Supports[0].Joint, tr.Supports[1].Joint
	a.Set(2*pin, m, 1)
	a.Set(2*pin+1, m+1, 1)
	a.Set(2*roller+1, m+2, 1)
	f := make([]float64, 2*nj)
	load(f)
	b := mat.NewVecDense(2*nj, nil)
	for i, v := range f {
		b.SetVec(i, -v)
	}
	var x mat.VecDense
	if err := x.SolveVec(a, b); err != nil {
		t.Fatal(err)
	}
	return x.RawVector().Data[:m]
}

func TestMechanism(t *testing.T) {
	tr, _ := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	cases := map[string]func(*truss.Truss){
		"a diagonal removed": func(t *truss.Truss) { t.Members = remove(t.Members, t.Member("U2-L3")) },
		"no roller":          func(t *truss.Truss) { t.Supports = t.Supports[:1] },
		"roller on a pin's line of action": func(t *truss.Truss) {
			t.Supports = []truss.Support{{Joint: t.Supports[0].Joint, Fixed: [2]bool{false, true}}, t.Supports[1]}
		},
	}
	for name, breakIt := range cases {
		t.Run(name, func(t *testing.T) {
			c := *tr
			c.Members = append([]truss.Member{}, tr.Members...)
			breakIt(&c)
			l, err := analysis.InfluenceLines(&c, analysis.Options{})
			if !errors.Is(err, analysis.ErrMechanism) {
				t.Fatalf("got %v (lines %v), want ErrMechanism", err, l != nil)
			}
		})
	}
}

func remove(ms []truss.Member, i int) []truss.Member {
	return append(ms[:i:i], ms[i+1:]...)
}

// TestRandomTrusses: every valid parameter set of every type solves (stable), and scaling all
// EA leaves the forces unchanged (a property of any linear truss: forces depend only on the
// ratios of the stiffnesses).
func TestRandomTrusses(t *testing.T) {
	proptest.Check(t, func(rt *rapid.T) {
		p := trusstest.RandomParams(rt)
		tr, err := truss.Build(p)
		if err != nil {
			rt.Fatal(err)
		}
		l1, err := analysis.InfluenceLines(tr, analysis.Options{})
		if err != nil {
			rt.Fatalf("%+v: %v", p, err)
		}
		s := rapid.Float64Range(1e-3, 1e6).Draw(rt, "scale")
		ea := make([]float64, len(tr.Members))
		for i := range ea {
			ea[i] = s
		}
		l2, err := analysis.InfluenceLines(tr, analysis.Options{AxialStiffness: ea})
		if err != nil {
			rt.Fatal(err)
		}
		for i := range l1.Members {
			for k := range l1.X {
				a, b := l1.Members[i].Ordinates[k], l2.Members[i].Ordinates[k]
				if math.IsNaN(a) || math.Abs(a-b) > 1e-8*(1+math.Abs(a)) {
					rt.Fatalf("%+v %s: %g vs %g after scaling EA by %g", p, l1.Members[i].Label, a, b, s)
				}
			}
		}
	})
}

func TestInterpolateAndAreas(t *testing.T) {
	xs := []float64{0, 6, 12, 18}
	ys := []float64{0, -0.5, 1, 0}
	// Linear interpolation between panel points, zero outside (lever rule, common practice).
	for _, c := range []struct{ x, want float64 }{{-1, 0}, {0, 0}, {3, -0.25}, {6, -0.5}, {10, 0.5}, {18, 0}, {19, 0}} {
		if got := analysis.Interpolate(xs, ys, c.x); math.Abs(got-c.want) > tol {
			t.Errorf("at %g: %g, want %g", c.x, got, c.want)
		}
	}
	// Triangle areas: negative part 0.5·6·0.5 + 0.5·2·0.5 (crossing at x = 8), positive
	// 0.5·4·1 + 0.5·6·1 (geometry of triangles).
	pos, neg := analysis.Areas(xs, ys)
	if math.Abs(neg+2) > tol || math.Abs(pos-5) > tol {
		t.Errorf("areas %g, %g; want 5, -2", pos, neg)
	}
	if z := analysis.SignChanges(xs, ys); len(z) != 1 || math.Abs(z[0]-8) > tol {
		t.Errorf("sign change at %v, want [8]", z)
	}
}

// TestDeadLoadAndAreas: the moment line at a = 10 m of a simple span L = 30 m, sampled every
// 5 m, is a triangle with peak a(L-a)/L (beamMoment, statics).
func TestDeadLoadAndAreas(t *testing.T) {
	near := func(a, b, rel float64) bool { return math.Abs(a-b) <= rel*math.Max(1, math.Abs(b)) }
	var x, mid []float64
	for k := 0; k <= 6; k++ {
		xk := 30 * float64(k) / 6
		x, mid = append(x, xk), append(mid, beamMoment(30, xk, 10))
	}
	// triangle: area a(L-a)/2 = 10 x 20/2 = 100 (statics); dead load q times it
	if pos, neg := analysis.Areas(x, mid); !near(pos, 100, 1e-12) || neg != 0 {
		t.Errorf("areas %v, %v; want 100, 0", pos, neg)
	}
	if got := analysis.DeadLoad(x, mid, 35); !near(got, 3500, 1e-12) {
		t.Errorf("dead load %v, want 3500", got)
	}
	// a line crossing zero: -1 at 0, +1 at 2 -> areas +0.5 and -0.5 (geometry)
	pos, neg := analysis.Areas([]float64{0, 2}, []float64{-1, 1})
	if !near(pos, 0.5, 1e-12) || !near(neg, -0.5, 1e-12) {
		t.Errorf("areas %v, %v; want 0.5, -0.5", pos, neg)
	}
}

func BenchmarkInfluenceLines16(b *testing.B) {
	p := truss.Params{Type: "pratt", SpanM: 96, Panels: 16, DepthM: 10}
	b.ReportAllocs()
	for b.Loop() {
		tr, err := truss.Build(p)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := analysis.InfluenceLines(tr, analysis.Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
