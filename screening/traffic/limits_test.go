package traffic

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// limitsBase is a train file whose fields stand at known lines and columns.
const limitsBase = `name: T
note: test train
vehicles:
  - id: w
    name: wagon
    length: 14
    axles:
      - {at: 1.5, load: 200}
      - {at: 12.5, load: 200}
consist:
  - {vehicle: w, min: 1, max: 3}
`

// fileErrors unpacks the located errors of ParseTrainFile.
func fileErrors(t *testing.T, err error) []*FileError {
	t.Helper()
	var out []*FileError
	for _, e := range unjoin(err) {
		var fe *FileError
		if errors.As(e, &fe) {
			out = append(out, fe)
		}
	}
	if len(out) == 0 {
		t.Fatalf("error %v holds no *FileError", err)
	}
	return out
}

// vehicleYAML writes a vehicle entry of a train file: its id, length, axle positions and
// the load of every axle.
func vehicleYAML(id string, length float64, axlesAt []float64, load float64) string {
	var ax []string
	for _, a := range axlesAt {
		ax = append(ax, fmt.Sprintf("{at: %g, load: %g}", a, load))
	}
	return fmt.Sprintf("  - id: %s\n    length: %g\n    axles: [%s]\n", id, length, strings.Join(ax, ", "))
}

func TestTrainFileLimits(t *testing.T) {
	long := func(n int) string { return strings.Repeat("x", n) }
	cases := []struct {
		name      string
		old, new  string // replacement in limitsBase; old "" replaces the whole file
		field     string
		line, col int
		msg       string
	}{
		// Lines and columns are counted in limitsBase (or the file given) by hand.
		{"axle load beyond 2000 kN", "load: 200}\n      - {at: 12.5", "load: 2500}\n      - {at: 12.5",
			"vehicles[0].axles[0].load", 8, 25, "at most 2000 kN"},
		{"vehicle shorter than 2 m", "length: 14\n    axles:\n      - {at: 1.5, load: 200}\n      - {at: 12.5, load: 200}",
			"length: 0.01\n    axles:\n      - {at: 0, load: 200}", "vehicles[0].length", 6, 13, "at least 2 m"},
		{"axles closer than 0.5 m", "at: 12.5", "at: 1.8",
			"vehicles[0].axles[1].at", 9, 14, "at least 0.5 m apart"},
		{"axles at the same place", "at: 12.5", "at: 1.5",
			"vehicles[0].axles[1].at", 9, 14, "at least 0.5 m apart"},
		{"axles across a coupling closer than 0.5 m", "at: 1.5, load: 200}\n      - {at: 12.5", "at: 0.1, load: 200}\n      - {at: 13.9",
			"consist[0]", 11, 5, "between the last axle of one wagon and the first of the next"},
		{"more than 400 vehicles in a group", "min: 1, max: 3", "count: 401",
			"consist[0].count", 11, 25, "at most 400"},
		{"more than 400 vehicles in all", "  - {vehicle: w, min: 1, max: 3}\n", "  - {vehicle: w, count: 250}\n  - {vehicle: w, min: 1, max: 151}\n",
			"consist", 11, 3, "401 vehicles"},
		{"more than 2000 axles", "", "name: T\nvehicles:\n" + vehicleYAML("d", 3, []float64{0, 0.5, 1, 1.5, 2, 2.5}, 100) + "consist:\n  - {vehicle: d, count: 350}\n",
			"consist", 7, 3, "2100 axles"},
		{"longer than 5000 m", "min: 1, max: 3", "count: 360",
			"consist", 11, 3, "5040 m long"},
		{"a vehicle heavier than 1000 kN per metre", "", "name: T\nvehicles:\n" + vehicleYAML("h", 2, []float64{0, 0.6, 1.2, 1.8}, 600) + "consist:\n  - {vehicle: h, count: 1}\n",
			"vehicles[0].length", 4, 13, "1200 kN/m"},
		{"distributed load beyond 1000 kN/m", "consist:", "distributed:\n  - {from: 0, to: 5, q: 1500}\nconsist:",
			"distributed[0].q", 11, 25, "at most 1000 kN/m"},
		{"distributed part beyond 5000 m", "consist:", "distributed:\n  - {from: 6000, to: .inf, q: 10}\nconsist:",
			"distributed[0].from", 11, 12, "at most 5000 m"},
		{"more than 4 parts", "consist:", "distributed:\n" + strings.Repeat("  - {from: 0, to: 5, q: 10}\n", 5) + "consist:",
			"distributed", 11, 3, "5 distributed parts"},
		{"too many counts with parts", "consist:\n  - {vehicle: w, min: 1, max: 3}", "consist:\n  - {vehicle: w, min: 1, max: 11}\ndistributed:\n  - {from: 0, to: 5, q: 10}",
			"consist[0].max", 11, 31, "varies over 11 counts"},
		{"name longer than 200 characters", "name: T", "name: " + long(201),
			"name", 1, 7, "201 characters; at most 200"},
		{"note longer than 2000 characters", "note: test train", "note: " + long(2001),
			"note", 2, 7, "2001 characters; at most 2000"},
		{"vehicle id longer than 64 characters", "id: w", "id: " + long(65),
			"vehicles[0].id", 4, 9, "65 characters; at most 64"},
		{"vehicle name longer than 200 characters", "name: wagon", "name: " + long(201),
			"vehicles[0].name", 5, 11, "201 characters; at most 200"},
		// 1 ft = 0.3048 m (DOMAIN.md): a 5 ft vehicle is 1.524 m long
		{"imperial vehicle shorter than 2 m", "name: T", "name: T\nunits: imperial", "vehicles[0].length", 7, 13, "at least 2 m"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := c.new
			if c.old != "" {
				src = strings.Replace(limitsBase, c.old, c.new, 1)
				if src == limitsBase {
					t.Fatalf("replacement %q did not apply", c.old)
				}
			}
			if strings.HasPrefix(c.name, "imperial") {
				src = strings.Replace(src, "length: 14", "length: 5", 1)
				src = strings.Replace(src, "at: 12.5", "at: 4.5", 1)
			}
			_, err := ParseTrainFile("limits.yaml", []byte(src))
			if err == nil {
				t.Fatal("accepted")
			}
			e := fileErrors(t, err)[0]
			if e.File != "limits.yaml" || e.Field != c.field || e.Line != c.line || e.Column != c.col || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("got %q (field %s, line %d, column %d); want field %s, line %d, column %d, message with %q",
					e.Error(), e.Field, e.Line, e.Column, c.field, c.line, c.col, c.msg)
			}
			if !strings.Contains(err.Error(), fmt.Sprintf("limits.yaml line %d, column %d: %s: ", c.line, c.col, c.field)) {
				t.Errorf("message %q does not name the file, line, column and field", err)
			}
			if len(err.Error()) > 400 {
				t.Errorf("message of %d bytes: the input is quoted whole", len(err.Error()))
			}
		})
	}
	if _, err := ParseTrainFile("limits.yaml", []byte(limitsBase)); err != nil {
		t.Fatalf("the base file must be valid: %v", err)
	}
}

// TestTrainFileText: a file that is not a train file's text is refused at the place that
// shows it (line and column; the whole file for its size).
func TestTrainFileText(t *testing.T) {
	cases := []struct {
		name      string
		src       string
		line, col int
		msg       string
	}{
		{"NUL byte", "name: T\nnote: a\x00b\n", 2, 8, "NUL byte"},
		{"NUL byte after multi-byte characters", "name: Tø\x00\n", 1, 9, "NUL byte"},
		{"invalid UTF-8", "name: T\n\nnote: \xff\n", 3, 7, "not valid UTF-8"},
		{"UTF-16 text", "\xff\xfen\x00a\x00", 1, 1, "not valid UTF-8"},
		{"larger than 1 MiB", "name: T\nnote: " + strings.Repeat("n", 1<<20) + "\n", 0, 0, "larger than 1048576 bytes"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ParseTrainFile("text.yaml", []byte(c.src))
			e := fileErrors(t, err)[0]
			if e.Line != c.line || e.Column != c.col || !strings.Contains(e.Msg, c.msg) || !strings.HasPrefix(e.Error(), "text.yaml") {
				t.Errorf("got %q (line %d, column %d); want line %d, column %d, message with %q", e.Error(), e.Line, e.Column, c.line, c.col, c.msg)
			}
		})
	}
}

func TestBuiltinLimits(t *testing.T) {
	cases := []struct {
		spec string
		want string // "" when the spec is admissible
	}{
		{"uniform:q=1e308", "parameter q must be greater than 0 and at most 1000 kN/m, got 1e+308"},
		{"uniform:q=1000", ""},
		{"uniform:q=-1", "parameter q"},
		{"uniform:q=10,max=1e9", "parameter max must be greater than 0 and at most 5000 m, or inf"},
		{"uniform:q=10,min=1e300,max=inf", "parameter min"},
		{"uniform:q=10,min=inf,max=inf", ""},
		{"uniform:q=inf", "parameter q"},
		{"cooper:e=201", "parameter e must be greater than 0 and at most 200"},
		{"cooper:e=200", ""},
		{"cooper-alt:e=1e300", "parameter e"},
		{"cooper-alt:e=200", ""},
		{"lm71:alpha=1.46", ""},
		{"sw0:alpha=0.75", ""},
		{"lm71:alpha=1e308", "parameter alpha must lie between 0.75 and 1.46"},
	}
	for _, c := range cases {
		t.Run(c.spec, func(t *testing.T) {
			tr, err := ParseSpec(c.spec, nil)
			switch {
			case c.want == "" && err != nil:
				t.Errorf("refused: %v", err)
			case c.want == "" && tr.CheckLimits() != nil:
				t.Errorf("built beyond the limits: %v", tr.CheckLimits())
			case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
				t.Errorf("error %v, want one saying %q", err, c.want)
			}
		})
	}
	t.Run("a train file larger than 1 MiB is read no further", func(t *testing.T) {
		big := filepath.Join(t.TempDir(), "big.yaml")
		if err := os.WriteFile(big, []byte("name: T\nnote: "+strings.Repeat("n", 4<<20)+"\n"), 0o600); err != nil {
			t.Fatal(err)
		}
		_, err := ParseSpec(big, nil)
		if err == nil || !strings.Contains(err.Error(), "big.yaml: larger than 1048576 bytes") {
			t.Errorf("error %.200v", err)
		}
	})
	t.Run("a long spec is quoted as an excerpt", func(t *testing.T) {
		_, err := ParseSpec("uniform:q="+strings.Repeat("9", 10000), nil)
		if err == nil || len(err.Error()) > 400 || !strings.Contains(err.Error(), "…") {
			t.Errorf("error of %d bytes: %.200v", len(fmt.Sprint(err)), err)
		}
	})
}

// TestBuiltinsWithinLimits: every standard model at its default parameters and at the ends
// of their ranges is an admissible train.
func TestBuiltinsWithinLimits(t *testing.T) {
	for _, b := range builtins {
		specs := []string{b.name}
		for _, p := range b.params {
			for _, v := range []float64{p.lo, p.hi} {
				if v == p.lo && p.loOpen {
					v = p.lo + 1e-3
				}
				spec := fmt.Sprintf("%s:%s=%g", b.name, p.name, v)
				if p.name != "q" && b.name == "uniform" {
					spec += ",q=10"
					if p.name == "min" {
						spec += ",max=inf"
					}
				}
				specs = append(specs, spec)
			}
		}
		for _, spec := range specs {
			if b.name == "uniform" && !strings.Contains(spec, "q=") {
				continue // q is required
			}
			tr, ok, err := Builtin(spec)
			if !ok || err != nil {
				t.Errorf("%s: %v", spec, err)
				continue
			}
			if err := tr.CheckLimits(); err != nil {
				t.Errorf("%s: %v", spec, err)
			}
		}
	}
}

func TestLimitErrorNames(t *testing.T) {
	cases := []struct {
		name string
		err  LimitError
		want string
	}{
		{"axle", LimitError{Group: 1, Axle: 2, Part: -1, Key: "load"}, "consist[1].vehicle.axles[2].load"},
		{"vehicle", LimitError{Group: 0, Axle: -1, Part: -1, Key: "length"}, "consist[0].vehicle.length"},
		{"group", LimitError{Group: 0, Axle: -1, Part: -1, Key: "count"}, "consist[0].count"},
		{"coupling", LimitError{Group: 2, Axle: -1, Part: -1}, "consist[2]"},
		{"part", LimitError{Group: -1, Axle: -1, Part: 0, Key: "q"}, "parts[0].q"},
		{"uniform", LimitError{Group: -1, Axle: -1, Part: -1, Key: "q"}, "uniform.q"},
		{"whole consist", LimitError{Group: -1, Axle: -1, Part: -1}, "consist"},
		{"name", LimitError{Group: -1, Axle: -1, Part: -1, Key: "name"}, "name"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.err.Where(); got != c.want {
				t.Errorf("Where() = %q, want %q", got, c.want)
			}
		})
	}
}

func TestDynamicBounds(t *testing.T) {
	cases := []struct{ spec, want string }{
		{"arema:s=1e-300", "at least 1 m"},
		{"arema:s=51", "at most 50"},
		{"phi2:l=1e308", "at most 2000"},
		{"phi3:l=inf", "at most 2000"},
		{"fixed:" + strings.Repeat("1", 5000), "fixed needs a fraction"},
	}
	for _, c := range cases {
		t.Run(c.spec[:min(len(c.spec), 20)], func(t *testing.T) {
			_, err := ParseDynamic(c.spec)
			if err == nil || !strings.Contains(err.Error(), c.want) || len(err.Error()) > 400 {
				t.Errorf("error %.300v, want one saying %q", err, c.want)
			}
		})
	}
	// AREMA's rocking effect at the closest trusses admitted: 100/S percent, S = 1 m = 3.28 ft
	// (from memory), so the factor stays finite and below 2 at any span.
	d, err := ParseDynamic("arema:s=1")
	if err != nil {
		t.Fatal(err)
	}
	if f := d.Factor(400); !(f > 1 && f < 2) {
		t.Errorf("factor %v", f)
	}
}
