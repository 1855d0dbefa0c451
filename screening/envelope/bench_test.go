package envelope

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// The benchmarks sweep a 12-panel Pratt truss (60 m span, 7.5 m deep; 45 members, lines by
// the method of sections) exactly and by stepping every 0.05 m, and report the stepping's
// largest error against the exact extremes as a metric.

const benchStep = 0.05

// benchPhase shifts the stepping grid off the panel points: the example trains' axle offsets
// are multiples of 0.05 m, so steps starting on a panel point would hit every critical
// position by luck; real spacings (imperial, measured) do not line up.
const benchPhase = 0.0137

func benchTruss() (*Lines, []float64, [][]float64) {
	x, _, ord := prattLines(60, 7.5, 12)
	l, err := NewLines(x, ord)
	if err != nil {
		panic(err)
	}
	return l, x, ord
}

func benchTrains(b *testing.B) map[string]*traffic.Train {
	freight, err := traffic.ParseSpec("northmoor-freight-proposed", configs.Trains())
	if err != nil {
		b.Fatal(err)
	}
	return map[string]*traffic.Train{
		"lm71":    traffic.LM71(1),
		"freight": freight,
		"uniform": traffic.NewUniform(80, 12, 48),
	}
}

func BenchmarkEnvelope(b *testing.B) {
	l, _, _ := benchTruss()
	benchEnvelopes(b, l, "")
}

// BenchmarkEnvelopeMirrored sweeps the same trains over a computed 12-panel Pratt truss
// (60 m, 7.5 m deep), which is its own mirror image: one direction's sweeps serve both.
func BenchmarkEnvelopeMirrored(b *testing.B) {
	l := builtLines(b, truss.Params{Type: "pratt", SpanM: 60, Panels: 12, DepthM: 7.5})
	benchEnvelopes(b, l, "")
	benchEnvelopes(b, l, "both-")
}

// benchEnvelopes times each example train over l; with the prefix "both-", sweeping both
// directions as for a truss that is not symmetric.
func benchEnvelopes(b *testing.B, l *Lines, prefix string) {
	trains := benchTrains(b)
	for _, name := range []string{"lm71", "freight", "uniform"} {
		ld, err := Prepare(trains[name])
		if err != nil {
			b.Fatal(err)
		}
		b.Run(prefix+name, func(b *testing.B) {
			var c Calculator
			plain := plainSweeps{bothSweeps: prefix == "both-"}
			var out []Extremes
			b.ReportAllocs()
			for b.Loop() {
				out, _ = c.envelope(l, ld, Options{}, out, plain)
			}
		})
	}
}

func BenchmarkStepping(b *testing.B) {
	l, x, ord := benchTruss()
	trains := benchTrains(b)
	var c Calculator
	for _, v := range []struct {
		name, train string
		allCounts   bool
	}{{"lm71", "lm71", false}, {"freight-all-counts", "freight", true}, {"freight-reduced-counts", "freight", false}, {"uniform", "uniform", false}} {
		tr := trains[v.train]
		ld, _ := Prepare(tr)
		exact, err := c.Envelope(l, ld, Options{}, nil)
		if err != nil {
			b.Fatal(err)
		}
		exact = slices.Clone(exact)
		b.Run(v.name, func(b *testing.B) {
			var mx, mn []float64
			for b.Loop() {
				mx, mn = stepEnvelope(l, x, ord, tr, ld, v.allCounts)
			}
			worst, worstKN := 0.0, 0.0
			for i := range exact {
				for _, d := range [][2]float64{{exact[i].Max.Value, mx[i]}, {exact[i].Min.Value, mn[i]}} {
					if d[0] != 0 {
						worst = max(worst, math.Abs(d[0]-d[1])/math.Abs(d[0]))
					}
					worstKN = max(worstKN, math.Abs(d[0]-d[1]))
				}
			}
			b.ReportMetric(100*worst, "max-err-%")
			b.ReportMetric(worstKN, "max-err-kN")
		})
	}
}

// stepEnvelope is the stepping method: the train moved in 0.05 m steps in both directions
// (every count of a variable consist, or only those the exact sweep needs), panel-point loads
// by the lever rule at each step, every member's force from them; a uniform load of variable
// length over every interval with ends on a 0.05 m grid.
func stepEnvelope(l *Lines, x []float64, ord [][]float64, tr *traffic.Train, ld *Load, allCounts bool) (mx, mn []float64) {
	m := len(ord)
	mx, mn = make([]float64, m), make([]float64, m)
	x0, xl := x[0], x[len(x)-1]
	if tr.Uniform != nil {
		u := tr.Uniform
		gr := l.refinedGrid(0)
		g := int(math.Round((xl - x0) / benchStep))
		e := make([]float64, g+1)
		for i := range m {
			for k := range e {
				e[k] = areaTo(gr, i, m, min(x0+benchPhase+float64(k)*benchStep, xl))
			}
			for a := 0; a <= g; a++ {
				for bb := a + 1; bb <= g; bb++ {
					n := float64(bb-a) * benchStep
					if n > u.MaxM+1e-9 || (n < u.MinM-1e-9 && a > 0 && bb < g) {
						continue
					}
					v := u.QKNPerM * (e[bb] - e[a])
					mx[i], mn[i] = max(mx[i], v), min(mn[i], v)
				}
			}
		}
		return mx, mn
	}
	var counts []int
	if allCounts {
		for n := ld.nMin; n <= ld.nMax; n++ {
			counts = append(counts, n)
		}
	} else {
		for _, k := range ld.counts(xl-x0, false) {
			counts = append(counts, k.sweep)
		}
	}
	// clipped-line integrals for parts applied where unfavourable
	gr := l.refinedGrid(0)
	cumPos, cumNeg := make([][]float64, m), make([][]float64, m)
	for i := range m {
		cumPos[i], cumNeg[i] = make([]float64, len(gr.x)), make([]float64, len(gr.x))
		for j := 1; j < len(gr.x); j++ {
			a, b, dx := gr.eta[(j-1)*m+i], gr.eta[j*m+i], gr.x[j]-gr.x[j-1]
			cumPos[i][j] = cumPos[i][j-1] + (max(a, 0)+max(b, 0))/2*dx
			cumNeg[i][j] = cumNeg[i][j-1] + (min(a, 0)+min(b, 0))/2*dx
		}
	}
	clipped := func(cum []float64, i int, a, b float64, pos bool) float64 {
		at := func(p float64) float64 {
			p = min(max(p, x0), xl)
			k := segment(gr.x, p)
			e0, e1 := gr.eta[k*m+i], gr.eta[(k+1)*m+i]
			if pos {
				e0, e1 = max(e0, 0), max(e1, 0)
			} else {
				e0, e1 = min(e0, 0), min(e1, 0)
			}
			t := p - gr.x[k]
			return cum[k] + e0*t + (e1-e0)/(gr.x[k+1]-gr.x[k])*t*t/2
		}
		return at(b) - at(a)
	}
	F := make([]float64, len(x))
	for _, n := range counts {
		axles := tr.Axles(n)
		length := tr.LengthM(n)
		for _, dir := range []float64{1, -1} {
			for k := 0; ; k++ {
				h := x0 - 10 + benchPhase + float64(k)*benchStep
				if h > xl+length+10 {
					break
				}
				clear(F)
				for _, a := range axles {
					p := h - a.AtM
					if dir < 0 {
						p = x0 + xl - p // mirror: the train runs right to left
					}
					if p < x0 || p > xl {
						continue
					}
					k := segment(x, p)
					f := (p - x[k]) / (x[k+1] - x[k])
					F[k] += a.LoadKN * (1 - f)
					F[k+1] += a.LoadKN * f
				}
				for i, o := range ord {
					v := 0.0
					for j, fj := range F {
						v += o[j] * fj
					}
					vmax, vmin := v, v
					for _, p := range tr.Parts {
						// Load Model 71: the parts ahead and behind the axle group
						lo, hi := h-p.ToM, h-p.FromM
						if dir < 0 {
							lo, hi = x0+xl-hi, x0+xl-lo
						}
						vmax += p.QKNPerM * clipped(cumPos[i], i, lo, hi, true)
						vmin += p.QKNPerM * clipped(cumNeg[i], i, lo, hi, false)
					}
					mx[i], mn[i] = max(mx[i], vmax), min(mn[i], vmin)
				}
			}
		}
	}
	return mx, mn
}

// largestTrains are trains at the limits of screening/traffic (limits.go), read through the
// train file parser so that they are known to be admissible. Their vehicle is 2.5 m long
// with five 100 kN axles 0.5 m apart, and 0.5 m across each coupling:
//   - axles: 400 such vehicles, 2,000 axles in all;
//   - axles-variable: 1 to 400 of them (no distributed parts: swept at as many counts as
//     the span holds vehicles);
//   - parts-variable: 391 to 400 of them (the most counts a train with parts may vary over)
//     with the most parts, three applied where unfavourable and one cut at the
//     unfavourable length, which need the refined grid: the costliest train found.
func largestTrains(b *testing.B) map[string]*traffic.Train {
	const file = `name: %s
vehicles:
  - id: dense
    length: 2.5
    axles: [{at: 0, load: 100}, {at: 0.5, load: 100}, {at: 1, load: 100}, {at: 1.5, load: 100}, {at: 2, load: 100}]
consist:
  - {vehicle: dense, %s}
%s`
	const parts = `distributed:
  - {from: 1000, to: 1005, q: 80, mode: unfavourable}
  - {from: 1010, to: 1015, q: 80, mode: unfavourable}
  - {from: 1020, to: 1025, q: 80, mode: unfavourable}
  - {from: 1200, to: .inf, q: 80, mode: cut}
`
	out := map[string]*traffic.Train{}
	for _, c := range []struct{ name, count, parts string }{
		{"axles", "count: 400", ""},
		{"axles-variable", "min: 1, max: 400", ""},
		{"parts-variable", "min: 391, max: 400", parts},
	} {
		tr, err := traffic.ParseTrainFile(c.name+".yaml", []byte(fmt.Sprintf(file, c.name, c.count, c.parts)))
		if err != nil {
			b.Fatal(err)
		}
		out[c.name] = tr
	}
	return out
}

// BenchmarkEnvelopeLargestTrain sweeps the largest admissible trains over a 120 m Pratt
// truss of 16 panels and over the longest the geometry admits, 400 m of 80 panels (20 m
// deep): the cost of screening one bridge under the worst a train file may say.
//
//	go test ./screening/envelope -run XXX -bench LargestTrain -benchtime 3x
func BenchmarkEnvelopeLargestTrain(b *testing.B) {
	trains := largestTrains(b)
	for _, s := range []struct {
		name string
		p    truss.Params
	}{
		{"120m", truss.Params{Type: "pratt", SpanM: 120, Panels: 16, DepthM: 12}},
		{"400m", truss.Params{Type: "pratt", SpanM: 400, Panels: 80, DepthM: 20}},
	} {
		l := builtLines(b, s.p)
		for _, name := range []string{"axles", "axles-variable", "parts-variable"} {
			ld, err := Prepare(trains[name])
			if err != nil {
				b.Fatal(err)
			}
			b.Run(s.name+"/"+name, func(b *testing.B) {
				var c Calculator
				var out []Extremes
				for b.Loop() {
					out, _ = c.Envelope(l, ld, Options{}, out)
				}
			})
		}
	}
}
