package envelope

import (
	"fmt"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"pgregory.net/rapid"
)

// The tests' helpers: influence lines and trains to sweep (closed forms, parametric trusses,
// random draws), and the small steps the tests share. The brute-force references the sweeps
// are checked against are in reference_test.go.

func near(a, b, rel float64) bool { return math.Abs(a-b) <= rel*math.Max(1, math.Abs(b)) }

// simpleSpanMoment is the influence line of the bending moment at a of a simple span L,
// sampled at n+1 equally spaced points (which must include a): a triangle with peak
// a(L-a)/L (common practice, statics).
func simpleSpanMoment(L, a float64, n int) (x, eta []float64) {
	for k := 0; k <= n; k++ {
		xi := L * float64(k) / float64(n)
		x = append(x, xi)
		if xi <= a {
			eta = append(eta, xi*(L-a)/L)
		} else {
			eta = append(eta, a*(L-xi)/L)
		}
	}
	return x, eta
}

// prattLines builds influence lines of a Pratt through truss by the method of sections
// (common practice): n panels of a span L, depth h, loads at the bottom chord panel points.
// A bottom chord in panel i carries M(x_{i-1})/h (moment about the top joint above its left
// end, left half; right half mirrored), a top chord -M(x_i)/h, a diagonal in panel i the panel
// shear V/sin(theta), which is -x/L left of the panel and (L-x)/L right of it, straight across
// the panel; a vertical the shear of the neighbouring panel nearer midspan, in compression.
func prattLines(L, h float64, n int) (x []float64, labels []string, ord [][]float64) {
	p := L / float64(n)
	for k := 0; k <= n; k++ {
		x = append(x, p*float64(k))
	}
	moment := func(a float64) []float64 {
		o := make([]float64, n+1)
		for k, xi := range x {
			if xi <= a {
				o[k] = xi * (L - a) / L
			} else {
				o[k] = a * (L - xi) / L
			}
		}
		return o
	}
	shear := func(i int) []float64 { // panel i spans x[i-1]..x[i]
		o := make([]float64, n+1)
		for k, xi := range x {
			if k <= i-1 {
				o[k] = -xi / L
			} else {
				o[k] = (L - xi) / L
			}
		}
		return o
	}
	scale := func(o []float64, f float64) []float64 {
		for k := range o {
			o[k] *= f
		}
		return o
	}
	sin := h / math.Hypot(h, p)
	add := func(label string, o []float64) {
		labels = append(labels, label)
		ord = append(ord, o)
	}
	for i := 1; i <= n; i++ {
		// about the top joint at the panel's end nearer midspan's far side: left half x_{i-1},
		// right half x_i; the end panels' chord follows the end post.
		a := x[i-1]
		if float64(i) > float64(n)/2 {
			a = x[i]
		}
		if i == 1 || i == n {
			a = x[1]
			if i == n {
				a = x[n-1]
			}
		}
		add("bottom", scale(moment(a), 1/h))
	}
	for i := 2; i <= n-1; i++ {
		a := x[i]
		if float64(i) > float64(n)/2 {
			a = x[i-1]
		}
		add("top", scale(moment(a), -1/h))
	}
	add("endpost", scale(shear(1), -1/sin))
	add("endpost", scale(shear(n), 1/sin))
	for i := 2; i <= n-1; i++ {
		f := 1 / sin
		if float64(i) > float64(n)/2 {
			f = -f
		}
		add("diagonal", scale(shear(i), f))
	}
	for i := 1; i <= n-1; i++ {
		// vertical at x_i: the shear of the panel on its midspan side, compression
		o := shear(i + 1)
		if float64(i) >= float64(n)/2 {
			o = scale(shear(i), -1)
		}
		if i == 1 || i == n-1 {
			// hangers at the first and last interior joints carry the joint load only
			o = make([]float64, n+1)
			o[i] = 1
		} else {
			o = scale(o, -1)
		}
		add("vertical", o)
	}
	return x, labels, ord
}

func axleTrain(name string, spacings []float64, loads []float64) *traffic.Train {
	v := traffic.Vehicle{Name: name}
	at := 0.0
	for k, p := range loads {
		if k > 0 {
			at += spacings[k-1]
		}
		v.Axles = append(v.Axles, traffic.Axle{AtM: at, LoadKN: p})
	}
	v.LengthM = at + 1
	return &traffic.Train{Name: name, Consist: []traffic.Group{{Vehicle: v, Min: 1, Max: 1}}}
}

// genLines draws 1 to 3 random influence lines on 2 to 7 shared points; sometimes with
// non-zero ordinates at the bearings (a deck truss's end posts), where the line jumps.
func genLines(t *rapid.T) (x []float64, ord [][]float64) {
	n := rapid.IntRange(2, 7).Draw(t, "points")
	x0 := rapid.Float64Range(-5, 5).Draw(t, "x0")
	x = append(x, x0)
	for k := 1; k < n; k++ {
		x = append(x, x[k-1]+rapid.Float64Range(0.5, 8).Draw(t, "dx"))
	}
	jumps := rapid.Bool().Draw(t, "jumps")
	for range rapid.IntRange(1, 3).Draw(t, "members") {
		ord = append(ord, genOrdinates(t, n, jumps))
	}
	return x, ord
}

// genOrdinates draws one line's n ordinates between -2 and 2; those at the bearings stay zero
// unless jumps.
func genOrdinates(t *rapid.T, n int, jumps bool) []float64 {
	o := make([]float64, n)
	for k := range o {
		if (k == 0 || k == n-1) && !jumps {
			continue
		}
		o[k] = rapid.Float64Range(-2, 2).Draw(t, "eta")
	}
	return o
}

func genVehicle(t *rapid.T, name string) traffic.Vehicle {
	v := traffic.Vehicle{Name: name, LengthM: rapid.Float64Range(1.5, 12).Draw(t, name+" length")}
	at := 0.0
	for range rapid.IntRange(1, 3).Draw(t, name+" axles") {
		at = rapid.Float64Range(at, v.LengthM).Draw(t, name+" at")
		v.Axles = append(v.Axles, traffic.Axle{AtM: at, LoadKN: rapid.Float64Range(10, 300).Draw(t, name+" load")})
	}
	return v
}

// genTrain draws a train: a consist with a variable last group, optionally with one kind of
// distributed part (whole, where unfavourable, cut at the unfavourable length), or a uniform
// load of variable length.
func genTrain(t *rapid.T) *traffic.Train {
	kind := rapid.SampledFrom([]string{"axles", "axles", "whole", "unfavourable", "cut", "uniform", "parts only"}).Draw(t, "kind")
	if kind == "uniform" {
		lo := rapid.Float64Range(0, 25).Draw(t, "min")
		hi := lo + rapid.Float64Range(0.1, 30).Draw(t, "extra")
		if rapid.Bool().Draw(t, "unlimited") {
			hi = math.Inf(1)
		}
		return traffic.NewUniform(rapid.Float64Range(1, 100).Draw(t, "q"), lo, hi)
	}
	tr := &traffic.Train{Name: kind}
	if kind != "parts only" {
		for k := range rapid.IntRange(0, 2).Draw(t, "fixed vehicles") {
			tr.Consist = append(tr.Consist, traffic.Group{Vehicle: genVehicle(t, fmt.Sprint("v", k)), Min: 1, Max: 1})
		}
		lo := rapid.IntRange(1, 4).Draw(t, "count min")
		hi := lo + rapid.IntRange(0, 8).Draw(t, "count extra")
		if kind != "axles" {
			hi = min(hi, lo+2) // the reference sweeps every count: keep it quick
		}
		tr.Consist = append(tr.Consist, traffic.Group{Vehicle: genVehicle(t, "last"), Min: lo, Max: hi})
	}
	q := rapid.Float64Range(5, 150).Draw(t, "q")
	from := rapid.Float64Range(-5, 20).Draw(t, "from")
	to := from + rapid.Float64Range(0.5, 30).Draw(t, "part length")
	switch kind {
	case "whole", "parts only":
		tr.Parts = append(tr.Parts, traffic.Part{FromM: from, ToM: to, QKNPerM: q, Mode: traffic.Whole})
		if rapid.Bool().Draw(t, "second part") {
			tr.Parts = append(tr.Parts, traffic.Part{FromM: to + 2, ToM: math.Inf(1), QKNPerM: q / 2, Mode: traffic.Whole})
		}
	case "unfavourable":
		tr.Parts = append(tr.Parts,
			traffic.Part{FromM: math.Inf(-1), ToM: from, QKNPerM: q, Mode: traffic.WhereUnfavourable},
			traffic.Part{FromM: to, ToM: math.Inf(1), QKNPerM: q, Mode: traffic.WhereUnfavourable})
	case "cut":
		tr.Parts = append(tr.Parts, traffic.Part{FromM: from + 5, ToM: math.Inf(1), QKNPerM: q, Mode: traffic.CutUnfavourable})
	}
	return tr
}

// genSymmetric draws the influence lines of a truss that is its own mirror image: panel
// points symmetric about mid-span, and with each drawn line also its mirror image (as a
// symmetric truss's mirror members have), perturbed by rounding-sized noise as computed lines
// are; some lines are symmetric themselves (a member at mid-span).
func genSymmetric(t *rapid.T) (x []float64, ord [][]float64) {
	half := rapid.IntRange(1, 4).Draw(t, "half panels")
	odd := rapid.Bool().Draw(t, "odd panels")
	var dx []float64
	for range half {
		dx = append(dx, rapid.Float64Range(0.5, 8).Draw(t, "dx"))
	}
	steps := append([]float64{}, dx...)
	if odd {
		steps = append(steps, rapid.Float64Range(0.5, 8).Draw(t, "middle dx"))
	}
	for k := len(dx) - 1; k >= 0; k-- {
		steps = append(steps, dx[k])
	}
	x = []float64{rapid.Float64Range(-5, 5).Draw(t, "x0")}
	for _, d := range steps {
		x = append(x, x[len(x)-1]+d)
	}
	n := len(x)
	jumps := rapid.Bool().Draw(t, "jumps")
	noise := func() float64 { return rapid.Float64Range(-1e-14, 1e-14).Draw(t, "noise") }
	for range rapid.IntRange(1, 3).Draw(t, "pairs") {
		o := genOrdinates(t, n, jumps)
		mo := make([]float64, n)
		for k := range o {
			mo[k] = o[n-1-k] * (1 + noise())
		}
		if rapid.Bool().Draw(t, "self-symmetric") {
			so := make([]float64, n)
			for k := range o {
				so[k] = (o[k] + o[n-1-k]) / 2
			}
			ord = append(ord, so)
			continue
		}
		ord = append(ord, o, mo)
	}
	return x, ord
}

// forceScale is the size of a force the train can cause in a member with the line eta over
// the points x: every load at the line's largest ordinate (taken as at least 1).
func forceScale(x, eta []float64, tr *traffic.Train) float64 {
	scale := 1.0
	for _, e := range eta {
		scale = max(scale, math.Abs(e))
	}
	return scale * loadScale(tr, x[len(x)-1]-x[0])
}

// loadScale is the train's whole load on a span: its axles with the most vehicles, and its
// distributed parts over the span.
func loadScale(tr *traffic.Train, span float64) float64 {
	if tr.Uniform != nil {
		return tr.Uniform.QKNPerM * span
	}
	s := 0.0
	if n := len(tr.Consist); n > 0 {
		for _, a := range tr.Axles(tr.Consist[n-1].Max) {
			s += a.LoadKN
		}
	}
	for _, p := range tr.Parts {
		s += p.QKNPerM * span
	}
	return s
}

// builtLines are the computed influence lines of a parametric truss.
func builtLines(t testing.TB, p truss.Params) *Lines {
	tr, err := truss.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	ls, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var ord [][]float64
	for _, m := range ls.Members {
		ord = append(ord, m.Ordinates)
	}
	l, err := NewLines(ls.X, ord)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

// prepared are the lines and the train's load for a sweep; a rejected input fails the test.
func prepared(t interface {
	Helper()
	Fatal(...any)
}, x []float64, ord [][]float64, tr *traffic.Train) (*Lines, *Load) {
	t.Helper()
	l, err := NewLines(x, ord)
	if err != nil {
		t.Fatal(err)
	}
	ld, err := Prepare(tr)
	if err != nil {
		t.Fatal(err)
	}
	return l, ld
}

// sensed is one of a member's extremes with its sense: +1 tension, -1 compression.
type sensed struct {
	sense float64
	e     Extreme
}

// senses are a member's largest tension and largest compression, each with its sense.
func senses(e Extremes) []sensed {
	return []sensed{{1, e.Max}, {-1, e.Min}}
}

// shortcutAgrees checks that Envelope (every shortcut) gives, member by member, the extremes
// of the sweeps with the shortcuts in plain turned off, within 1e-9 of the force scale, and
// that each reported placement reproduces its value by the independent reference response.
func shortcutAgrees(t interface {
	Helper()
	Fatal(...any)
	Fatalf(string, ...any)
}, x []float64, ord [][]float64, tr *traffic.Train, plain plainSweeps) {
	t.Helper()
	l, ld := prepared(t, x, ord, tr)
	var short, long Calculator
	got, err := short.Envelope(l, ld, Options{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	want, err := long.envelope(l, ld, Options{}, nil, plain)
	if err != nil {
		t.Fatal(err)
	}
	for i, eta := range ord {
		scale := forceScale(x, eta, tr)
		g, w := senses(got[i]), senses(want[i])
		for k := range g {
			if math.Abs(g[k].e.Value-w[k].e.Value) > 1e-9*scale {
				t.Fatalf("member %d sense %v: with the shortcut %v, without %v (%+v)", i, g[k].sense, g[k].e.Value, w[k].e.Value, g[k].e.Placement)
			}
			p := g[k].e.Placement
			if !p.Loaded || tr.Uniform != nil {
				continue
			}
			if got, ok := placementGives(x, eta, tr, p, g[k].sense, g[k].e.Value, 1e-7*scale); !ok {
				t.Fatalf("member %d sense %v: placement %+v gives %v, reported %v", i, g[k].sense, p, got, g[k].e.Value)
			}
		}
	}
}
