package envelope

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

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
		o := make([]float64, n)
		for k := range o {
			if (k == 0 || k == n-1) && !jumps {
				continue
			}
			o[k] = rapid.Float64Range(-2, 2).Draw(t, "eta")
		}
		ord = append(ord, o)
	}
	return x, ord
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

// bruteTrain is the reference extreme: every direction and count, the front stepped finely
// over the whole crossing and also put (and put just beside) wherever an item stands over a
// vertex, with a cut part tried at every length that ends on a vertex or zero crossing and at
// stepped lengths.
func bruteTrain(x, eta []float64, tr *traffic.Train, sense float64) float64 {
	x0, xl := x[0], x[len(x)-1]
	best := 0.0
	lo, hi := 1, 1
	if n := len(tr.Consist); n > 0 {
		lo, hi = tr.Consist[n-1].Min, tr.Consist[n-1].Max
	}
	verts := slices.Clone(x)
	for k := 0; k+1 < len(x); k++ {
		if eta[k]*eta[k+1] < 0 {
			verts = append(verts, x[k]+(x[k+1]-x[k])*eta[k]/(eta[k]-eta[k+1]))
		}
	}
	for count := lo; count <= hi; count++ {
		var ds []float64
		reach := 0.0
		if len(tr.Consist) > 0 {
			for _, a := range tr.Axles(count) {
				ds = append(ds, a.AtM)
			}
			reach = tr.LengthM(count)
		}
		var cut *traffic.Part
		for i, p := range tr.Parts {
			for _, d := range []float64{p.FromM, p.ToM} {
				if !math.IsInf(d, 0) {
					ds = append(ds, d)
					reach = max(reach, d)
				}
			}
			if p.Mode == traffic.CutUnfavourable {
				cut = &tr.Parts[i]
			}
		}
		for _, dir := range []Direction{LeftToRight, RightToLeft} {
			var heads []float64
			for _, d := range ds {
				for _, v := range x {
					h := v + d
					if dir == RightToLeft {
						h = v - d
					}
					heads = append(heads, h, h-1e-7, h+1e-7)
				}
			}
			start, end := x0-2, xl+reach+2
			if dir == RightToLeft {
				start, end = x0-reach-2, xl+2
			}
			for k := 0; k <= 300; k++ {
				heads = append(heads, start+(end-start)*float64(k)/300)
			}
			for _, h := range heads {
				trails := []float64{0}
				if cut != nil {
					z := h - cut.FromM
					if dir == RightToLeft {
						z = h + cut.FromM
					}
					for _, y := range verts {
						trails = append(trails, math.Abs(z-y))
					}
					for k := 1; k <= 20; k++ {
						trails = append(trails, (xl-x0+math.Abs(z))*float64(k)/20)
					}
				}
				for _, tl := range trails {
					v := sense * responseRef(x, eta, tr, placedRef{dir, h, count, tl}, sense)
					best = max(best, v)
				}
			}
		}
	}
	return sense * best
}

// bruteUniform is the reference for a uniform load of variable length: every feasible
// interval with ends on a fine grid, on the vertices or on the zero crossings.
func bruteUniform(x, eta []float64, u traffic.Uniform, sense float64) float64 {
	x0, xl := x[0], x[len(x)-1]
	pts := slices.Clone(x)
	for k := 0; k <= 120; k++ {
		pts = append(pts, x0+(xl-x0)*float64(k)/120)
	}
	for k := 0; k+1 < len(x); k++ {
		if eta[k]*eta[k+1] < 0 {
			pts = append(pts, x[k]+(x[k+1]-x[k])*eta[k]/(eta[k]-eta[k+1]))
		}
	}
	// intervals of exactly the bounding lengths from every point
	n := len(pts)
	for _, L := range []float64{u.MinM, u.MaxM} {
		for _, p := range pts[:n] {
			if !math.IsInf(L, 0) {
				pts = append(pts, p+L, p-L)
			}
		}
	}
	best := 0.0
	for _, a := range pts {
		for _, b := range pts {
			a, b := max(a, x0), min(b, xl)
			l := b - a
			if l <= 0 || l > u.MaxM+1e-9 || (l < u.MinM-1e-9 && a > x0 && b < xl) {
				continue
			}
			best = max(best, sense*u.QKNPerM*integralRef(x, eta, a, b, identity))
		}
	}
	return sense * best
}

func TestExactNeverBeatenAndReproduced(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		x, ord := genLines(t)
		tr := genTrain(t)
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		res, err := Compute(x, ord, tr, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for i, eta := range ord {
			// the scale of a force: every load at the line's largest ordinate
			scale := 1.0
			for _, e := range eta {
				scale = max(scale, math.Abs(e))
			}
			scale *= loadScale(tr, x[len(x)-1]-x[0])
			for _, c := range []struct {
				sense float64
				e     Extreme
			}{{1, res[i].Max}, {-1, res[i].Min}} {
				var brute float64
				if tr.Uniform != nil {
					brute = bruteUniform(x, eta, *tr.Uniform, c.sense)
				} else {
					brute = bruteTrain(x, eta, tr, c.sense)
				}
				tol := 1e-9 * scale
				if c.sense*(brute-c.e.Value) > tol {
					t.Fatalf("member %d sense %v: brute force %v beats exact %v (%+v)", i, c.sense, brute, c.e.Value, c.e.Placement)
				}
				if c.sense*c.e.Value < 0 {
					t.Fatalf("member %d sense %v: extreme %v has the wrong sign", i, c.sense, c.e.Value)
				}
				if !c.e.Loaded {
					if c.e.Value != 0 {
						t.Fatalf("member %d: unloaded extreme %v", i, c.e.Value)
					}
					continue
				}
				var got float64
				p := c.e.Placement
				if tr.Uniform != nil {
					if l := p.LoadedToM - p.LoadedFromM; l > tr.Uniform.MaxM+1e-9 || (l < tr.Uniform.MinM-1e-9 && p.LoadedFromM > x[0] && p.LoadedToM < x[len(x)-1]) {
						t.Fatalf("member %d: infeasible interval [%v, %v]", i, p.LoadedFromM, p.LoadedToM)
					}
					got = tr.Uniform.QKNPerM * integralRef(x, eta, p.LoadedFromM, p.LoadedToM, identity)
				} else {
					got = responseRef(x, eta, tr, placedRef{p.Direction, p.HeadM, p.Count, p.TrailingM}, c.sense)
				}
				// a limit placement stands 1e-9 span off a jump: its value may differ by the slope times that
				if math.Abs(got-c.e.Value) > 1e-7*scale {
					t.Fatalf("member %d sense %v: placement %+v gives %v, reported %v", i, c.sense, p, got, c.e.Value)
				}
			}
		}
	})
}

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

// TestLongConsistReduction: a consist whose counts all exceed those the sweep needs (short
// span, long wagons) must give the brute force's extremes over every count, with placements
// that reproduce them on the train actually counted.
func TestLongConsistReduction(t *testing.T) {
	x := []float64{0, 3, 6, 9, 12}
	ord := [][]float64{{0, -0.4, 0.7, 0.3, 0}, {0, 0.5, 1, 0.5, 0}, {1, 0.2, -0.3, 0.1, -0.6}}
	loco := traffic.Vehicle{Name: "loco", LengthM: 9, Axles: []traffic.Axle{{AtM: 1.5, LoadKN: 20}, {AtM: 7.5, LoadKN: 20}}}
	wagon := traffic.Vehicle{Name: "wagon", LengthM: 7, Axles: []traffic.Axle{{AtM: 1, LoadKN: 90}, {AtM: 2.6, LoadKN: 180}, {AtM: 6.1, LoadKN: 300}}}
	for _, counts := range [][2]int{{6, 9}, {1, 12}, {4, 4}} {
		tr := &traffic.Train{Name: "long", Consist: []traffic.Group{{Vehicle: loco, Min: 1, Max: 1}, {Vehicle: wagon, Min: counts[0], Max: counts[1]}}}
		res, err := Compute(x, ord, tr, Options{})
		if err != nil {
			t.Fatal(err)
		}
		for i, eta := range ord {
			for _, c := range []struct {
				sense float64
				e     Extreme
			}{{1, res[i].Max}, {-1, res[i].Min}} {
				brute := bruteTrain(x, eta, tr, c.sense)
				if math.Abs(brute-c.e.Value) > 1e-6 {
					t.Errorf("counts %v member %d sense %v: exact %v, brute force %v", counts, i, c.sense, c.e.Value, brute)
				}
				p := c.e.Placement
				if !p.Loaded {
					continue
				}
				if p.Count < counts[0] || p.Count > counts[1] {
					t.Errorf("counts %v: reported count %d", counts, p.Count)
				}
				if got := responseRef(x, eta, tr, placedRef{p.Direction, p.HeadM, p.Count, 0}, c.sense); math.Abs(got-c.e.Value) > 1e-5 {
					t.Errorf("counts %v member %d: placement %+v gives %v, reported %v", counts, i, p, got, c.e.Value)
				}
			}
		}
	}
}
