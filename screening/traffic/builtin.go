package traffic

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/internal/excerpt"
)

// builtin is a standard load model selectable by name on the command line.
type builtin struct {
	name   string
	params []param
	help   string
	build  func(p map[string]float64) (*Train, error)
}

// param is a built-in model's parameter: its default and its admissible range, lo to hi,
// lo itself excluded when loOpen, and +Inf admitted when infOK (an unlimited length).
type param struct {
	name   string
	def    float64
	help   string
	lo, hi float64
	loOpen bool
	infOK  bool
	unit   string
}

// check says what is wrong with a value of the parameter, or nothing.
func (p param) check(v float64) error {
	if math.IsInf(v, 1) && p.infOK {
		return nil
	}
	if (v > p.lo || (v == p.lo && !p.loOpen)) && v <= p.hi {
		return nil
	}
	unit := ""
	if p.unit != "" {
		unit = " " + p.unit
	}
	msg := fmt.Sprintf("parameter %s must lie between %g and %g%s", p.name, p.lo, p.hi, unit)
	if p.loOpen {
		msg = fmt.Sprintf("parameter %s must be greater than %g and at most %g%s", p.name, p.lo, p.hi, unit)
	}
	if p.infOK {
		msg += ", or inf (unlimited)"
	}
	return fmt.Errorf("%s, got %g", msg, v)
}

// builtins lists the standard models. All values are from memory (EN 1991-2 section 6.3, the
// AREMA Manual chapter 15 Cooper E80 diagram) and must be checked against the edition in force.
var builtins = []builtin{
	{
		name:   "lm71",
		params: []param{alphaParam},
		help:   "EN 1991-2 Load Model 71: 4 x 250 kN at 1.6 m, 80 kN/m beyond 0.8 m from the outer axles where unfavourable",
		build:  withAlpha(LM71),
	},
	{
		name:   "sw0",
		params: []param{alphaParam},
		help:   "EN 1991-2 SW/0: two 133 kN/m parts 15.0 m long, 5.3 m apart",
		build:  withAlpha(SW0),
	},
	{
		name: "sw2",
		help: "EN 1991-2 SW/2: two 150 kN/m parts 25.0 m long, 7.0 m apart",
		build: func(map[string]float64) (*Train, error) {
			return SW2(), nil
		},
	},
	{
		name: "unloaded",
		help: "EN 1991-2 unloaded train: 10 kN/m of unlimited length",
		build: func(map[string]float64) (*Train, error) {
			return Unloaded(), nil
		},
	},
	{
		name:   "cooper",
		params: []param{eParam},
		help:   "AREMA Cooper E-n: two locomotives then 8 kip/ft (E80) cut at the unfavourable length",
		build: func(p map[string]float64) (*Train, error) {
			return Cooper(p["e"]), nil
		},
	},
	{
		name:   "cooper-alt",
		params: []param{eParam},
		help:   "AREMA alternate live load: four 100 kip axles (E80) at 5, 6, 5 ft",
		build: func(p map[string]float64) (*Train, error) {
			return CooperAlternate(p["e"]), nil
		},
	},
	{
		name: "uniform",
		params: []param{
			{name: "q", def: math.NaN(), help: "load, kN/m (required)", lo: 0, loOpen: true, hi: MaxQKNPerM, unit: "kN/m"},
			{name: "min", def: 0, help: "shortest loaded length unless touching a bearing, m", lo: 0, hi: MaxTrainLengthM, infOK: true, unit: "m"},
			{name: "max", def: math.Inf(1), help: "longest loaded length, m", lo: 0, loOpen: true, hi: MaxTrainLengthM, infOK: true, unit: "m"},
		},
		help: "uniform load of variable length",
		build: func(p map[string]float64) (*Train, error) {
			if math.IsNaN(p["q"]) {
				return nil, fmt.Errorf("uniform: q is required, e.g. uniform:q=20,min=12,max=48")
			}
			return NewUniform(p["q"], p["min"], p["max"]), nil
		},
	},
}

// alphaParam is EN 1991-2's classification factor, which it bounds to 0.75..1.46 (from
// memory).
var alphaParam = param{name: "alpha", def: 1, help: "classification factor, 0.75 to 1.46", lo: 0.75, hi: 1.46}

// eParam is the E number of AREMA's Cooper loading. E80 is the usual design loading (from
// memory); E200 puts 250 kip, 1112 kN, on an axle of the alternate load, whose four axles in
// 16 ft then carry 912 kN per metre, within MaxAxleLoadKN and MaxQKNPerM.
var eParam = param{name: "e", def: 80, help: "E number, up to 200: loads scale by e/80", lo: 0, loOpen: true, hi: 200}

// withAlpha builds an EN 1991-2 model whose loads scale by the classification factor alpha.
func withAlpha(model func(alpha float64) *Train) func(map[string]float64) (*Train, error) {
	return func(p map[string]float64) (*Train, error) {
		return model(p["alpha"]), nil
	}
}

// BuiltinNames lists the names of the built-in models with their parameters and defaults, in
// the command-line syntax.
func BuiltinNames() []string {
	var out []string
	for _, b := range builtins {
		out = append(out, b.usage())
	}
	return out
}

func (b builtin) usage() string {
	if len(b.params) == 0 {
		return b.name
	}
	var ps []string
	for _, p := range b.params {
		if math.IsNaN(p.def) {
			ps = append(ps, p.name+"=?")
		} else {
			ps = append(ps, p.name+"="+strconv.FormatFloat(p.def, 'g', -1, 64))
		}
	}
	return b.name + ":" + strings.Join(ps, ",")
}

// Builtin builds a standard model from its command-line form "name" or
// "name:key=value,key=value" (for example "lm71:alpha=1.33", "cooper:e=80",
// "uniform:q=20,min=12,max=48"). ok is false when name is no built-in model. Each parameter
// must lie in its range, which keeps the model within the limits of a train (limits.go).
func Builtin(spec string) (t *Train, ok bool, err error) {
	name, args, _ := strings.Cut(spec, ":")
	i := slices.IndexFunc(builtins, func(b builtin) bool { return b.name == strings.ToLower(name) })
	if i < 0 {
		return nil, false, nil
	}
	b := builtins[i]
	vals := map[string]float64{}
	for _, p := range b.params {
		vals[p.name] = p.def
	}
	given := map[string]bool{}
	quoted := excerpt.Cut(spec)
	if args != "" {
		for kv := range strings.SplitSeq(args, ",") {
			k, v, found := strings.Cut(kv, "=")
			k = strings.ToLower(strings.TrimSpace(k))
			i := slices.IndexFunc(b.params, func(p param) bool { return p.name == k })
			if i < 0 {
				return nil, true, fmt.Errorf("train %q: unknown parameter %q; %s takes %s", quoted, excerpt.Cut(kv), b.name, b.paramList())
			}
			if !found || strings.TrimSpace(v) == "" {
				return nil, true, fmt.Errorf("train %q: parameter %s needs a value, e.g. %s=1; %s takes %s", quoted, k, k, b.name, b.paramList())
			}
			if given[k] {
				return nil, true, fmt.Errorf("train %q: parameter %s given twice", quoted, k)
			}
			given[k] = true
			f, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
			if err != nil || math.IsNaN(f) {
				return nil, true, fmt.Errorf("train %q: parameter %s: not a number: %q", quoted, k, excerpt.Cut(v))
			}
			if err := b.params[i].check(f); err != nil {
				return nil, true, fmt.Errorf("train %q: %w", quoted, err)
			}
			vals[k] = f
		}
	}
	t, err = b.build(vals)
	if err == nil {
		err = t.Validate()
	}
	if err == nil {
		err = t.CheckLimits()
	}
	if err != nil {
		return nil, true, fmt.Errorf("train %q: %w", quoted, err)
	}
	return t, true, nil
}

func (b builtin) paramList() string {
	if len(b.params) == 0 {
		return "no parameters"
	}
	var s []string
	for _, p := range b.params {
		s = append(s, p.name+" ("+p.help+")")
	}
	return strings.Join(s, ", ")
}

// LM71 is EN 1991-2 Load Model 71 with classification factor alpha (from memory): four
// 250 kN axles at 1.6 m, and 80 kN/m from 0.8 m beyond the outer axles outward, applied only
// where unfavourable. The train's front is 0.8 m ahead of the first axle.
func LM71(alpha float64) *Train {
	v := Vehicle{Name: "LM71 axle group", LengthM: 6.4}
	for k := range 4 {
		v.Axles = append(v.Axles, Axle{AtM: 0.8 + 1.6*float64(k), LoadKN: 250})
	}
	t := &Train{
		Name:    "LM71",
		Note:    "EN 1991-2 Load Model 71, values from memory",
		Consist: []Group{{Vehicle: v, Min: 1, Max: 1}},
		Parts: []Part{
			{FromM: math.Inf(-1), ToM: 0, QKNPerM: 80, Mode: WhereUnfavourable},
			{FromM: 6.4, ToM: math.Inf(1), QKNPerM: 80, Mode: WhereUnfavourable},
		},
	}
	t = t.Scaled(alpha)
	if alpha != 1 {
		t.Name = fmt.Sprintf("LM71 alpha=%g", alpha)
	}
	return t
}

// SW0 is EN 1991-2 load model SW/0 with classification factor alpha (from memory): two
// 133 kN/m parts, each 15.0 m long, 5.3 m apart, applied whole.
func SW0(alpha float64) *Train {
	t := &Train{
		Name: "SW/0",
		Note: "EN 1991-2 SW/0, values from memory",
		Parts: []Part{
			{FromM: 0, ToM: 15, QKNPerM: 133},
			{FromM: 20.3, ToM: 35.3, QKNPerM: 133},
		},
	}
	t = t.Scaled(alpha)
	if alpha != 1 {
		t.Name = fmt.Sprintf("SW/0 alpha=%g", alpha)
	}
	return t
}

// SW2 is EN 1991-2 load model SW/2 (from memory): two 150 kN/m parts, each 25.0 m long,
// 7.0 m apart, applied whole.
func SW2() *Train {
	return &Train{
		Name: "SW/2",
		Note: "EN 1991-2 SW/2, values from memory",
		Parts: []Part{
			{FromM: 0, ToM: 25, QKNPerM: 150},
			{FromM: 32, ToM: 57, QKNPerM: 150},
		},
	}
}

// Unloaded is the EN 1991-2 "unloaded train" (from memory): 10 kN/m of unlimited length.
func Unloaded() *Train {
	t := NewUniform(10, math.Inf(1), math.Inf(1))
	t.Name = "unloaded train"
	t.Note = "EN 1991-2 unloaded train, value from memory"
	return t
}

// NewUniform is a uniform load of q kN/m over a loaded length between minM and maxM.
func NewUniform(q, minM, maxM float64) *Train {
	name := fmt.Sprintf("uniform %g kN/m", q)
	switch {
	case math.IsInf(minM, 1):
		name += ", unlimited length"
	case math.IsInf(maxM, 1):
		name += fmt.Sprintf(", at least %g m", minM)
	default:
		name += fmt.Sprintf(", %g to %g m", minM, maxM)
	}
	return &Train{Name: name, Uniform: &Uniform{QKNPerM: q, MinM: minM, MaxM: maxM}}
}

// cooperLoco is one Cooper E80 locomotive (from memory): axle loads in kip and spacings in ft.
var (
	cooperLoadsKip   = []float64{40, 80, 80, 80, 80, 52, 52, 52, 52}
	cooperSpacingsFt = []float64{8, 5, 5, 5, 9, 5, 6, 5}
)

// Cooper is the AREMA Cooper E-n loading (from memory): two locomotives, each with axle loads
// 40, 80, 80, 80, 80, 52, 52, 52, 52 kip at spacings 8, 5, 5, 5, 9, 5, 6, 5 ft, 8 ft between
// the locomotives, then 8 kip/ft from 5 ft behind the last axle, cut at whatever length is
// unfavourable. Loads scale by e/80.
func Cooper(e float64) *Train {
	loco := Vehicle{Name: "Cooper E80 locomotive", LengthM: 56 * MPerFt}
	at := 0.0
	for k, p := range cooperLoadsKip {
		if k > 0 {
			at += cooperSpacingsFt[k-1]
		}
		loco.Axles = append(loco.Axles, Axle{AtM: at * MPerFt, LoadKN: p * KNPerKip})
	}
	t := &Train{
		Name:    fmt.Sprintf("Cooper E%g", e),
		Note:    "AREMA Cooper E-series, values from memory",
		Consist: []Group{{Vehicle: loco, Min: 2, Max: 2}},
		Parts:   []Part{{FromM: (56 + 48 + 5) * MPerFt, ToM: math.Inf(1), QKNPerM: 8 * KNPerMPerKipF, Mode: CutUnfavourable}},
	}
	s := t.Scaled(e / 80)
	s.Name = t.Name
	return s
}

// CooperAlternate is AREMA's alternate live load for Cooper E-n (from memory): four 100 kip
// axles (E80) at 5, 6, 5 ft, scaled by e/80.
func CooperAlternate(e float64) *Train {
	v := Vehicle{Name: "Cooper alternate axle group", LengthM: 16 * MPerFt}
	for _, ft := range []float64{0, 5, 11, 16} {
		v.Axles = append(v.Axles, Axle{AtM: ft * MPerFt, LoadKN: 100 * KNPerKip})
	}
	t := &Train{
		Name:    fmt.Sprintf("Cooper E%g alternate", e),
		Note:    "AREMA alternate live load, values from memory",
		Consist: []Group{{Vehicle: v, Min: 1, Max: 1}},
	}
	s := t.Scaled(e / 80)
	s.Name = t.Name
	return s
}
