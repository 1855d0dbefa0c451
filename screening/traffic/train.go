package traffic

import (
	"errors"
	"fmt"
	"math"

	conv "github.com/trussfleet/trussfleet/internal/units"
)

// Unit conversions, those of internal/units (exact by definition of the international foot
// and pound), where the outputs take them too.
const (
	KNPerKip      = conv.KNPerKip
	MPerFt        = conv.MPerFt
	KNPerMPerKipF = conv.KNPerMPerKipPerFt // kip/ft to kN/m
)

// Axle is one axle of a vehicle: its distance behind the vehicle's front and its load.
type Axle struct {
	AtM    float64
	LoadKN float64
}

// Vehicle is a rail vehicle: its axles and its length over buffers, which is the distance from
// its front to the front of the vehicle behind it.
type Vehicle struct {
	Name    string
	LengthM float64
	Axles   []Axle
}

// Group is one entry of a consist: a vehicle repeated Min to Max times (Min == Max for a fixed
// count). Only the last group of a consist may vary.
type Group struct {
	Vehicle Vehicle
	Min     int
	Max     int
}

// PartMode says how a distributed part is applied.
type PartMode int

const (
	// Whole applies the part over its full extent, wherever it stands.
	Whole PartMode = iota
	// WhereUnfavourable applies the part only over those stretches of its extent where it
	// increases the effect sought (EN 1991-2 Load Model 71); the loaded stretches may be
	// discontinuous.
	WhereUnfavourable
	// CutUnfavourable applies the part from its start over whatever length, between zero and its
	// full extent, is unfavourable (the trailing uniform of AREMA Cooper E-series).
	CutUnfavourable
)

var partModeNames = []string{"whole", "unfavourable", "cut"}

func (m PartMode) String() string {
	if m >= 0 && int(m) < len(partModeNames) {
		return partModeNames[m]
	}
	return fmt.Sprintf("PartMode(%d)", int(m))
}

// Part is a distributed load moving with the train, from FromM to ToM measured backwards from
// the train's front (FromM < ToM). FromM may be -Inf (the part extends indefinitely ahead) and
// ToM +Inf (indefinitely behind).
type Part struct {
	FromM   float64
	ToM     float64
	QKNPerM float64
	Mode    PartMode
}

// Uniform is a uniform load of variable length: QKNPerM over a loaded interval of the bridge
// no longer than MaxM and, unless the interval touches a bearing, no shorter than MinM. MaxM
// and MinM may be +Inf (a load of unlimited length loads an interval from a bearing).
type Uniform struct {
	QKNPerM float64
	MinM    float64
	MaxM    float64
}

// Train is a load that crosses the bridge in either direction, front first. Exactly one of
// Consist/Parts (a train of vehicles and distributed parts) or Uniform is set.
type Train struct {
	// Name identifies the train in results and in the store.
	Name string
	// Note says where the values come from (for built-in models: recalled, from memory).
	Note    string
	Consist []Group
	Parts   []Part
	Uniform *Uniform
}

// Variable reports whether the last group of the consist varies in count.
func (t *Train) Variable() bool {
	n := len(t.Consist)
	return n > 0 && t.Consist[n-1].Min != t.Consist[n-1].Max
}

// FixedLengthM is the length over buffers of all groups but the last, which is where the last
// group's first vehicle begins.
func (t *Train) FixedLengthM() float64 {
	l := 0.0
	for _, g := range t.Consist[:max(len(t.Consist)-1, 0)] {
		l += float64(g.Min) * g.Vehicle.LengthM
	}
	return l
}

// LengthM is the consist's length over buffers with count vehicles in its last group.
func (t *Train) LengthM(count int) float64 {
	if len(t.Consist) == 0 {
		return 0
	}
	return t.FixedLengthM() + float64(count)*t.Consist[len(t.Consist)-1].Vehicle.LengthM
}

// Axles lists every axle of the consist with count vehicles in its last group, as distances
// behind the train's front, front to back.
func (t *Train) Axles(count int) []Axle {
	var out []Axle
	front := 0.0
	for i, g := range t.Consist {
		c := g.Min
		if i == len(t.Consist)-1 {
			c = count
		}
		for range c {
			for _, a := range g.Vehicle.Axles {
				out = append(out, Axle{AtM: front + a.AtM, LoadKN: a.LoadKN})
			}
			front += g.Vehicle.LengthM
		}
	}
	return out
}

// Scaled returns a copy of the train with every load multiplied by f (a classification factor
// alpha, or n/80 for Cooper E-n). The receiver is not modified.
func (t *Train) Scaled(f float64) *Train {
	c := *t
	c.Consist = make([]Group, len(t.Consist))
	for i, g := range t.Consist {
		g.Vehicle.Axles = append([]Axle(nil), g.Vehicle.Axles...)
		for k := range g.Vehicle.Axles {
			g.Vehicle.Axles[k].LoadKN *= f
		}
		c.Consist[i] = g
	}
	c.Parts = append([]Part(nil), t.Parts...)
	for i := range c.Parts {
		c.Parts[i].QKNPerM *= f
	}
	if t.Uniform != nil {
		u := *t.Uniform
		u.QKNPerM *= f
		c.Uniform = &u
	}
	return &c
}

// Validate checks the train's invariants and names the field at fault.
func (t *Train) Validate() error {
	var errs []error
	bad := func(format string, a ...any) { errs = append(errs, fmt.Errorf(format, a...)) }
	if t.Name == "" {
		bad("name: must not be empty")
	}
	if t.Uniform != nil {
		u := t.Uniform
		if len(t.Consist) > 0 || len(t.Parts) > 0 {
			bad("a uniform load of variable length cannot also have vehicles or distributed parts")
		}
		if !(u.QKNPerM > 0) || math.IsInf(u.QKNPerM, 0) {
			bad("uniform q: must be positive and finite, got %v", u.QKNPerM)
		}
		if !(u.MinM >= 0) {
			bad("uniform min: must be 0 or more, got %v", u.MinM)
		}
		if !(u.MaxM > 0) || u.MaxM < u.MinM {
			bad("uniform max: must be positive and at least min (%v), got %v", u.MinM, u.MaxM)
		}
		return errors.Join(errs...)
	}
	if len(t.Consist) == 0 && len(t.Parts) == 0 {
		bad("consist: a train needs vehicles or distributed parts")
	}
	for i, g := range t.Consist {
		v := g.Vehicle
		where := fmt.Sprintf("consist[%d] (%s)", i, v.Name)
		if !(v.LengthM > 0) || math.IsInf(v.LengthM, 0) {
			bad("%s length: must be positive and finite, got %v", where, v.LengthM)
		}
		if len(v.Axles) == 0 {
			bad("%s axles: a vehicle needs at least one axle", where)
		}
		prev := math.Inf(-1)
		for k, a := range v.Axles {
			if !(a.AtM >= 0) || a.AtM > v.LengthM {
				bad("%s axles[%d] at: must lie within the vehicle (0 to %v m), got %v", where, k, v.LengthM, a.AtM)
			}
			if a.AtM < prev {
				bad("%s axles[%d] at: axles must be listed front to back, got %v after %v", where, k, a.AtM, prev)
			}
			prev = a.AtM
			if !(a.LoadKN > 0) || math.IsInf(a.LoadKN, 0) {
				bad("%s axles[%d] load: must be positive and finite, got %v", where, k, a.LoadKN)
			}
		}
		if g.Min < 1 || g.Max < g.Min {
			bad("%s count: need 1 <= min <= max, got min %d, max %d", where, g.Min, g.Max)
		}
		if g.Min != g.Max && i != len(t.Consist)-1 {
			bad("%s count: only the last group of a consist may vary in count", where)
		}
	}
	cuts := 0
	for i, p := range t.Parts {
		if !(p.FromM < p.ToM) || math.IsInf(p.FromM, 1) || math.IsInf(p.ToM, -1) {
			bad("parts[%d]: need from < to, got from %v, to %v", i, p.FromM, p.ToM)
		}
		if !(p.QKNPerM > 0) || math.IsInf(p.QKNPerM, 0) {
			bad("parts[%d] q: must be positive and finite, got %v", i, p.QKNPerM)
		}
		switch p.Mode {
		case Whole, WhereUnfavourable:
		case CutUnfavourable:
			cuts++
			if math.IsInf(p.FromM, 0) {
				bad("parts[%d]: a part cut at the unfavourable length needs a finite start, got %v", i, p.FromM)
			}
		default:
			bad("parts[%d] mode: unknown mode %d", i, int(p.Mode))
		}
	}
	if cuts > 1 {
		bad("parts: at most one part may be cut at the unfavourable length, got %d", cuts)
	}
	return errors.Join(errs...)
}
