package units

import (
	"math"
	"testing"
)

func TestConvertAndFormat(t *testing.T) {
	cases := []struct {
		name   string
		sys    System
		q      Quantity
		si     float64
		want   float64 // converted value
		text   string  // Format
		unit   string
		column string
		source string
	}{
		// 1 ft = 0.3048 m exactly: 50.16 ft = 15.288768 m, the noisy value an import stores.
		{"span in ft", Imperial, Length, 50.16 * 0.3048, 50.16, "50.2", "ft", "ft", "exact definition: 1 ft = 0.3048 m"},
		{"span in m", SI, Length, 15.288768000000001, 15.288768000000001, "15.29", "m", "m", "no conversion; 0.01 m rounding"},
		{"100 ft", Imperial, Length, 30.48, 100, "100.0", "ft", "ft", "exact definition: 1 ft = 0.3048 m"},
		// 1 kip = 4.4482216 kN: 80 kip = 355.857728 kN.
		{"axle in kip", Imperial, Force, 355.857728, 80, "80.0", "kip", "kip", "exact definition: 1 kip = 4.4482216 kN"},
		{"force in kN", SI, Force, -1234.56, -1234.56, "-1234.6", "kN", "kn", "no conversion; 0.1 kN rounding"},
		// 1 kip-ft = 4.4482216 x 0.3048 = 1.35581794368 kN·m.
		{"moment in kip-ft", Imperial, Moment, 1355.81794368, 1000, "1000.0", "kip-ft", "kip_ft", "exact definitions: 1 kip-ft = 4.4482216 kN x 0.3048 m"},
		// 1 kip/ft = 4.4482216 / 0.3048 = 14.593903... kN/m.
		{"dead load in kip/ft", Imperial, PerLength, 8 * 4.4482216 / 0.3048, 8, "8.00", "kip/ft", "kip_per_ft", "exact definitions: 1 kip/ft = 4.4482216 kN / 0.3048 m"},
		{"dead load in kN/m", SI, PerLength, 30.126, 30.126, "30.13", "kN/m", "kn_per_m", "no conversion; 0.01 kN/m rounding"},
		{"no negative zero", SI, Force, -0.04, -0.04, "0.0", "kN", "kn", "common practice: -0.0 is printed 0.0"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := c.sys.Convert(c.q, c.si)
			if math.Abs(got-c.want) > 1e-9*math.Max(1, math.Abs(c.want)) { // source in c.source
				t.Errorf("Convert = %.12g, want %.12g (%s)", got, c.want, c.source)
			}
			if s := c.sys.Format(c.q, c.si); s != c.text {
				t.Errorf("Format = %q, want %q (%s)", s, c.text, c.source)
			}
			if c.sys.Name(c.q) != c.unit || c.sys.Column(c.q) != c.column {
				t.Errorf("unit %q/%q, want %q/%q", c.sys.Name(c.q), c.sys.Column(c.q), c.unit, c.column)
			}
		})
	}
}

func TestExact(t *testing.T) {
	cases := []struct {
		name string
		sys  System
		q    Quantity
		si   float64
		want string
	}{
		// exact definition: 50.16 ft x 0.3048 = 15.288768 m; written back without noise.
		{"imported ft, SI", SI, Length, 50.16 * 0.3048, "15.288768"},
		{"imported ft, imperial", Imperial, Length, 50.16 * 0.3048, "50.16"},
		{"whole", SI, Length, 42, "42"},
		// exact definitions: 2.5 kip/ft x 4.4482216 / 0.3048 kN/m.
		{"dead load back in kip/ft", Imperial, PerLength, 2.5 * 4.4482216 / 0.3048, "2.5"},
	}
	for _, c := range cases {
		if got := c.sys.Exact(c.q, c.si); got != c.want {
			t.Errorf("%s: Exact = %q, want %q", c.name, got, c.want)
		}
	}
}

func TestParse(t *testing.T) {
	for in, want := range map[string]System{"": SI, "si": SI, "SI": SI, "imperial": Imperial, " Imperial ": Imperial} {
		got, err := Parse(in)
		if err != nil || got != want {
			t.Errorf("Parse(%q) = %v, %v; want %v", in, got, err, want)
		}
	}
	if _, err := Parse("metric"); err == nil {
		t.Error("Parse(metric): want an error")
	}
}
