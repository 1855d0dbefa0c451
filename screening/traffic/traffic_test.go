package traffic

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const tol = 1e-9

func near(a, b, rel float64) bool { return math.Abs(a-b) <= rel*math.Max(1, math.Abs(b)) }

func totalAxleLoad(t *Train, count int) float64 {
	s := 0.0
	for _, a := range t.Axles(count) {
		s += a.LoadKN
	}
	return s
}

func TestBuiltinModels(t *testing.T) {
	cases := []struct {
		spec      string
		axles     int
		axleLoad  float64 // kN, all axles
		partQ     float64 // kN/m of the first part
		firstAtM  float64
		lastAtM   float64
		source    string
		wantParts int
	}{
		// values from memory: EN 1991-2 6.3.2, 4 x 250 kN at 1.6 m, 80 kN/m
		{"lm71", 4, 1000, 80, 0.8, 5.6, "EN 1991-2 LM71", 2},
		// values from memory: classification factor multiplies every load
		{"lm71:alpha=1.33", 4, 1330, 80 * 1.33, 0.8, 5.6, "EN 1991-2 LM71 alpha", 2},
		// values from memory: EN 1991-2 SW/0 133 kN/m
		{"sw0", 0, 0, 133, 0, 0, "EN 1991-2 SW/0", 2},
		// values from memory: EN 1991-2 SW/2 150 kN/m
		{"sw2", 0, 0, 150, 0, 0, "EN 1991-2 SW/2", 2},
		// values from memory: AREMA Cooper E80, 2 x (40 + 4x80 + 4x52) kip, last axle at 104 ft, 8 kip/ft
		{"cooper", 18, 1136 * KNPerKip, 8 * KNPerKip / MPerFt, 0, 104 * MPerFt, "AREMA Cooper E80", 1},
		// E-n scales by n/80
		{"cooper:e=60", 18, 1136 * KNPerKip * 0.75, 6 * KNPerKip / MPerFt, 0, 104 * MPerFt, "AREMA Cooper E60", 1},
		// values from memory: AREMA alternate E80, 4 x 100 kip at 5, 6, 5 ft
		{"cooper-alt", 4, 400 * KNPerKip, 0, 0, 16 * MPerFt, "AREMA alternate", 0},
	}
	for _, c := range cases {
		t.Run(c.spec, func(t *testing.T) {
			tr, ok, err := Builtin(c.spec)
			if !ok || err != nil {
				t.Fatalf("Builtin(%q) = ok %v, err %v", c.spec, ok, err)
			}
			if err := tr.Validate(); err != nil {
				t.Fatal(err)
			}
			ax := tr.Axles(1)
			if len(tr.Consist) > 0 {
				ax = tr.Axles(tr.Consist[len(tr.Consist)-1].Min)
			}
			if len(ax) != c.axles {
				t.Fatalf("%d axles, want %d (%s)", len(ax), c.axles, c.source)
			}
			if c.axles > 0 {
				if got := totalAxleLoad(tr, tr.Consist[len(tr.Consist)-1].Min); !near(got, c.axleLoad, tol) {
					t.Errorf("axle loads %v kN, want %v (%s)", got, c.axleLoad, c.source)
				}
				if !near(ax[0].AtM, c.firstAtM, tol) || !near(ax[len(ax)-1].AtM, c.lastAtM, tol) {
					t.Errorf("axles from %v to %v m, want %v to %v (%s)", ax[0].AtM, ax[len(ax)-1].AtM, c.firstAtM, c.lastAtM, c.source)
				}
			}
			if len(tr.Parts) != c.wantParts {
				t.Fatalf("%d parts, want %d", len(tr.Parts), c.wantParts)
			}
			if c.wantParts > 0 && !near(tr.Parts[0].QKNPerM, c.partQ, tol) {
				t.Errorf("part q %v, want %v (%s)", tr.Parts[0].QKNPerM, c.partQ, c.source)
			}
		})
	}
}

func TestBuiltinGeometry(t *testing.T) {
	// values from memory: EN 1991-2 SW/0 parts 15.0 m long, 5.3 m apart; SW/2 25.0 m, 7.0 m apart.
	sw0, sw2 := SW0(1), SW2()
	if p := sw0.Parts; p[0].ToM-p[0].FromM != 15 || !near(p[1].FromM-p[0].ToM, 5.3, tol) || !near(p[1].ToM-p[1].FromM, 15, tol) {
		t.Errorf("SW/0 parts %+v", p)
	}
	if p := sw2.Parts; p[0].ToM-p[0].FromM != 25 || p[1].FromM-p[0].ToM != 7 || p[1].ToM-p[1].FromM != 25 {
		t.Errorf("SW/2 parts %+v", p)
	}
	// values from memory: LM71 distributed part starts 0.8 m beyond the outer axles.
	lm := LM71(1)
	ax := lm.Axles(1)
	if lm.Parts[0].ToM != ax[0].AtM-0.8 || !near(lm.Parts[1].FromM, ax[3].AtM+0.8, tol) || lm.Parts[0].Mode != WhereUnfavourable {
		t.Errorf("LM71 parts %+v axles %+v", lm.Parts, ax)
	}
	// values from memory: Cooper trailing load starts 5 ft behind the last axle, cut where unfavourable.
	co := Cooper(80)
	cax := co.Axles(2)
	if !near(co.Parts[0].FromM-cax[len(cax)-1].AtM, 5*MPerFt, tol) || co.Parts[0].Mode != CutUnfavourable {
		t.Errorf("Cooper part %+v", co.Parts[0])
	}
	// Cooper: 8 ft between the last axle of the first locomotive and the first of the second.
	if !near(cax[9].AtM-cax[8].AtM, 8*MPerFt, tol) {
		t.Errorf("Cooper locomotive gap %v m", cax[9].AtM-cax[8].AtM)
	}
	// values from memory: unloaded train 10 kN/m.
	if u := Unloaded().Uniform; u.QKNPerM != 10 || !math.IsInf(u.MaxM, 1) {
		t.Errorf("unloaded %+v", u)
	}
}

func TestBuiltinErrors(t *testing.T) {
	cases := []struct{ spec, want string }{
		{"lm71:beta=2", "alpha"},
		{"lm71:alpha=2", "between 0.75 and 1.46"},
		{"uniform:q=20,min=12,max=48,foo=1", "q (load"},
		{"uniform:min=3", "q is required"},
		{"uniform:q=20,min=50,max=48", "at least min"},
		{"cooper:e=x", "not a number"},
		{"sw2:alpha=1", "no parameters"},
	}
	for _, c := range cases {
		t.Run(c.spec, func(t *testing.T) {
			_, ok, err := Builtin(c.spec)
			if !ok || err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("Builtin(%q) = ok %v, err %v; want error containing %q", c.spec, ok, err, c.want)
			}
		})
	}
	_, err := ParseSpec("lm72", nil)
	if err == nil || !strings.Contains(err.Error(), "lm71:alpha=1") || !strings.Contains(err.Error(), "uniform:q=?") {
		t.Fatalf("unknown name: %v", err)
	}
}

func TestParseSpecUniform(t *testing.T) {
	tr, err := ParseSpec("uniform:q=20,min=12,max=48", nil)
	if err != nil {
		t.Fatal(err)
	}
	if u := tr.Uniform; u == nil || u.QKNPerM != 20 || u.MinM != 12 || u.MaxM != 48 {
		t.Fatalf("uniform %+v", tr.Uniform)
	}
}

func TestExampleTrains(t *testing.T) {
	dir := filepath.Join("..", "..", "configs", "trains")
	cases := []struct {
		spec    string
		name    string
		axleKN  float64 // heaviest axle
		minN    int
		maxN    int
		wagonKN float64
	}{
		{"northmoor-freight-today", "Northmoor freight today", 205, 1, 60, 196},
		{"northmoor-freight-proposed", "Northmoor freight proposed", 245, 1, 60, 245},
		// imperial file: 34 kip = 151.24 kN (1 kip = 4.4482216 kN, DOMAIN.md)
		{"eastfell-multiple-unit.yaml", "Eastfell multiple unit", 34 * KNPerKip, 3, 9, 34 * KNPerKip},
	}
	for _, c := range cases {
		t.Run(c.spec, func(t *testing.T) {
			tr, err := ParseSpec(c.spec, os.DirFS(dir))
			if err != nil {
				t.Fatal(err)
			}
			if tr.Name != c.name {
				t.Errorf("name %q, want %q", tr.Name, c.name)
			}
			last := tr.Consist[len(tr.Consist)-1]
			if last.Min != c.minN || last.Max != c.maxN || !tr.Variable() {
				t.Errorf("last group %d..%d, want %d..%d", last.Min, last.Max, c.minN, c.maxN)
			}
			if !near(last.Vehicle.Axles[0].LoadKN, c.wagonKN, tol) {
				t.Errorf("wagon axle %v kN, want %v", last.Vehicle.Axles[0].LoadKN, c.wagonKN)
			}
			heaviest := 0.0
			for _, a := range tr.Axles(last.Max) {
				heaviest = math.Max(heaviest, a.LoadKN)
			}
			if !near(heaviest, c.axleKN, tol) {
				t.Errorf("heaviest axle %v kN, want %v", heaviest, c.axleKN)
			}
		})
	}
	mu, _ := ParseSpec("eastfell-multiple-unit", os.DirFS(dir))
	// 75 ft = 22.86 m; axles at 7 ft = 2.1336 m (1 ft = 0.3048 m)
	if v := mu.Consist[0].Vehicle; !near(v.LengthM, 22.86, tol) || !near(v.Axles[0].AtM, 2.1336, tol) {
		t.Errorf("imperial conversion: length %v m, first axle %v m", v.LengthM, v.Axles[0].AtM)
	}
	if got := mu.LengthM(9); !near(got, 9*22.86, tol) {
		t.Errorf("9 cars %v m", got)
	}
	_, err := ParseSpec("nonesuch", os.DirFS(dir))
	if err == nil || !strings.Contains(err.Error(), "northmoor-freight-today") {
		t.Errorf("unknown train should list the files: %v", err)
	}
}

// baseTrainFile is a valid train file the error tests change one thing in: a 14 m wagon on
// two axles, 1 to 3 of them.
const baseTrainFile = `name: T
vehicles:
  - id: w
    length: 14
    axles:
      - {at: 1.5, load: 200}
      - {at: 12.5, load: 200}
consist:
  - {vehicle: w, min: 1, max: 3}
`

func TestParseTrainFileErrors(t *testing.T) {
	base := baseTrainFile
	cases := []struct {
		name, old, new string
		want           []string
	}{
		{"negative load", "load: 200}\n      - {at: 12.5", "load: -5}\n      - {at: 12.5", []string{"bad.yaml", "vehicles[0].axles[0].load", "-5"}},
		{"axle out of order", "at: 12.5", "at: 1.0", []string{"vehicles[0].axles[1].at", "1 after 1.5"}},
		{"axle beyond length", "at: 12.5", "at: 15", []string{"vehicles[0].axles[1].at", "15"}},
		{"unknown vehicle", "vehicle: w,", "vehicle: x,", []string{"consist[0].vehicle", `"x"`, "defined: w"}},
		{"unknown field", "length: 14", "lenght: 14", []string{"bad.yaml", "lenght"}},
		{"bad units", "name: T", "name: T\nunits: furlongs", []string{"units", "furlongs"}},
		{"no name", "name: T", "name: ''", []string{"name: required"}},
		{"variable not last", "consist:\n", "consist:\n  - {vehicle: w, min: 1, max: 2}\n", []string{"consist[0]", "only the last"}},
		{"count and range", "min: 1, max: 3", "count: 2, min: 1, max: 3", []string{"consist[0]", "either count"}},
		{"not a number", "length: 14", "length: long", []string{"bad.yaml", "long"}},
		{"bad mode", "consist:", "distributed:\n  - {from: 0, to: 5, q: 10, mode: sideways}\nconsist:", []string{"distributed[0].mode", "sideways"}},
		{"bad part extent", "consist:", "distributed:\n  - {from: 5, to: 1, q: 10}\nconsist:", []string{"distributed[0].to", "1"}},
	}
	if _, err := ParseTrainFile("good.yaml", []byte(base)); err != nil {
		t.Fatalf("base file: %v", err)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := strings.Replace(base, c.old, c.new, 1)
			if src == base {
				t.Fatalf("replacement %q did not apply", c.old)
			}
			_, err := ParseTrainFile("bad.yaml", []byte(src))
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q lacks %q", err, w)
				}
			}
		})
	}
}

func TestParseTrainFileParts(t *testing.T) {
	src := `name: With parts
units: imperial
vehicles:
  - {id: a, length: 20, axles: [{at: 5, load: 50}]}
consist:
  - {vehicle: a, count: 1}
distributed:
  - {from: 25, to: .inf, q: 4, mode: cut}
`
	tr, err := ParseTrainFile("p.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	p := tr.Parts[0]
	// 25 ft = 7.62 m; 4 kip/ft = 58.3756 kN/m (DOMAIN.md conversions)
	if !near(p.FromM, 7.62, tol) || !math.IsInf(p.ToM, 1) || !near(p.QKNPerM, 4*4.4482216/0.3048, tol) || p.Mode != CutUnfavourable {
		t.Errorf("part %+v", p)
	}
}

func TestDynamicFactors(t *testing.T) {
	cases := []struct {
		spec   string
		spanM  float64
		want   float64
		source string
	}{
		{"none", 30, 1, "no allowance"},
		{"fixed:0.2", 30, 1.2, "fixed fraction"},
		// from memory: EN 1991-2 6.4.5.2, Phi2 = 1.44/(sqrt(L)-0.2)+0.82, 1.00..1.67
		{"phi2", 4, 1.44/1.8 + 0.82, "Phi2 at L=4 m: 1.62"},
		{"phi2", 25, 1.12, "Phi2 at L=25 m: 1.44/4.8+0.82"},
		{"phi2", 1, 1.67, "Phi2 upper bound"},
		{"phi2", 200, 1.00, "Phi2 lower bound (formula 0.92)"},
		{"phi2:l=25", 80, 1.12, "Phi2 with a given determinant length"},
		// from memory: Phi3 = 2.16/(sqrt(L)-0.2)+0.73, 1.00..2.00
		{"phi3", 4, 1.93, "Phi3 at L=4 m: 2.16/1.8+0.73"},
		{"phi3", 25, 1.18, "Phi3 at L=25 m: 2.16/4.8+0.73"},
		{"phi3", 2, 2.00, "Phi3 upper bound"},
		{"phi3", 150, 1.00, "Phi3 lower bound"},
		// from memory: AREMA steel spans, 40 - 3L²/1600 (L < 80 ft), 16 + 600/(L-30) (L >= 80 ft)
		{"arema", 60 * MPerFt, 1.3325, "AREMA 60 ft: 40 - 6.75 = 33.25 %"},
		{"arema", 130 * MPerFt, 1.22, "AREMA 130 ft: 16 + 6 = 22 %"},
		{"arema", 80 * MPerFt, 1.28, "AREMA 80 ft: both branches give 28 %"},
		{"arema", (80 - 1e-9) * MPerFt, 1.28, "AREMA just below 80 ft: 28 %"},
		{"arema:s=3.048", 130 * MPerFt, 1.32, "AREMA rocking 100/S, S = 10 ft: +10 %"},
	}
	for _, c := range cases {
		t.Run(c.spec+"/"+c.source, func(t *testing.T) {
			d, err := ParseDynamic(c.spec)
			if err != nil {
				t.Fatal(err)
			}
			if got := d.Factor(c.spanM); !near(got, c.want, 1e-6) {
				t.Errorf("Factor(%v) = %v, want %v (%s)", c.spanM, got, c.want, c.source)
			}
			if back, err := ParseDynamic(d.String()); err != nil || back != d {
				t.Errorf("round trip %q: %+v, %v", d.String(), back, err)
			}
		})
	}
	for _, bad := range []string{"phi4", "fixed:x", "fixed:-1", "phi2:s=3", "arema:l=-2", "none:1"} {
		if _, err := ParseDynamic(bad); err == nil {
			t.Errorf("ParseDynamic(%q) accepted", bad)
		}
	}
}

func TestExampleFilesAreInConfigs(t *testing.T) {
	entries, err := os.ReadDir(filepath.Join("..", "..", "configs", "trains"))
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		data, err := os.ReadFile(filepath.Join("..", "..", "configs", "trains", e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		if _, err := ParseTrainFile(e.Name(), data); err != nil {
			t.Errorf("%v", err)
		}
	}
}
