package traffic

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"

	"gopkg.in/yaml.v3"
)

// trainFile is the YAML train format documented in docs/trains.md.
type trainFile struct {
	Name        string        `yaml:"name"`
	Note        string        `yaml:"note"`
	Units       string        `yaml:"units"`
	Vehicles    []vehicleFile `yaml:"vehicles"`
	Consist     []groupFile   `yaml:"consist"`
	Distributed []partFile    `yaml:"distributed"`
}

type vehicleFile struct {
	ID     string     `yaml:"id"`
	Name   string     `yaml:"name"`
	Length *float64   `yaml:"length"`
	Axles  []axleFile `yaml:"axles"`
}

type axleFile struct {
	At   *float64 `yaml:"at"`
	Load *float64 `yaml:"load"`
}

type groupFile struct {
	Vehicle string `yaml:"vehicle"`
	Count   *int   `yaml:"count"`
	Min     *int   `yaml:"min"`
	Max     *int   `yaml:"max"`
}

type partFile struct {
	From *float64 `yaml:"from"`
	To   *float64 `yaml:"to"`
	Q    *float64 `yaml:"q"`
	Mode string   `yaml:"mode"`
}

// units converts a file's lengths, loads and distributed loads to m, kN and kN/m.
type units struct{ length, load, perLength float64 }

var fileUnits = map[string]units{
	"si":       {1, 1, 1},
	"imperial": {MPerFt, KNPerKip, KNPerMPerKipF},
}

// ParseTrainFile reads a train from the YAML format of docs/trains.md. filename only labels
// errors, which name the file, the field and the offending value. Imperial files are converted
// to kN and m here, once.
func ParseTrainFile(filename string, data []byte) (*Train, error) {
	var f trainFile
	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	if err := dec.Decode(&f); err != nil {
		if errors.Is(err, io.EOF) {
			return nil, fmt.Errorf("%s: empty train file", filename)
		}
		return nil, fmt.Errorf("%s: %w", filename, err)
	}
	t, err := f.train()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", filename, err)
	}
	return t, nil
}

func (f *trainFile) train() (*Train, error) {
	var errs []error
	bad := func(format string, a ...any) { errs = append(errs, fmt.Errorf(format, a...)) }
	if strings.TrimSpace(f.Name) == "" {
		bad("name: required")
	}
	unitName := f.Units
	if unitName == "" {
		unitName = "si"
	}
	u, ok := fileUnits[unitName]
	if !ok {
		bad("units: %q is not one of si, imperial", f.Units)
		u = fileUnits["si"]
	}
	t := &Train{Name: strings.TrimSpace(f.Name), Note: f.Note}
	vehicles := map[string]Vehicle{}
	for i, vf := range f.Vehicles {
		where := fmt.Sprintf("vehicles[%d]", i)
		if vf.ID == "" {
			bad("%s.id: required", where)
		} else if _, dup := vehicles[vf.ID]; dup {
			bad("%s.id: %q is used twice", where, vf.ID)
		}
		v := Vehicle{Name: vf.Name}
		if v.Name == "" {
			v.Name = vf.ID
		}
		if vf.Length == nil {
			bad("%s.length: required", where)
		} else if !(*vf.Length > 0) || math.IsInf(*vf.Length, 0) {
			bad("%s.length: must be positive, got %v", where, *vf.Length)
		} else {
			v.LengthM = *vf.Length * u.length
		}
		if len(vf.Axles) == 0 {
			bad("%s.axles: a vehicle needs at least one axle", where)
		}
		prev := 0.0
		for k, af := range vf.Axles {
			aw := fmt.Sprintf("%s.axles[%d]", where, k)
			switch {
			case af.At == nil:
				bad("%s.at: required", aw)
			case !(*af.At >= prev):
				bad("%s.at: axles are listed front to back from 0, got %v after %v", aw, *af.At, prev)
			case vf.Length != nil && *af.At > *vf.Length:
				bad("%s.at: lies beyond the vehicle's length %v, got %v", aw, *vf.Length, *af.At)
			default:
				prev = *af.At
			}
			switch {
			case af.Load == nil:
				bad("%s.load: required", aw)
			case !(*af.Load > 0) || math.IsInf(*af.Load, 0):
				bad("%s.load: must be positive, got %v", aw, *af.Load)
			}
			if af.At != nil && af.Load != nil {
				v.Axles = append(v.Axles, Axle{AtM: *af.At * u.length, LoadKN: *af.Load * u.load})
			}
		}
		if vf.ID != "" {
			vehicles[vf.ID] = v
		}
	}
	for i, gf := range f.Consist {
		where := fmt.Sprintf("consist[%d]", i)
		v, ok := vehicles[gf.Vehicle]
		if !ok {
			ids := make([]string, 0, len(vehicles))
			for id := range vehicles {
				ids = append(ids, id)
			}
			slices.Sort(ids)
			bad("%s.vehicle: %q is not defined under vehicles (defined: %s)", where, gf.Vehicle, strings.Join(ids, ", "))
		}
		g := Group{Vehicle: v}
		switch {
		case gf.Count != nil && (gf.Min != nil || gf.Max != nil):
			bad("%s: give either count or min and max, not both", where)
		case gf.Count != nil:
			g.Min, g.Max = *gf.Count, *gf.Count
		case gf.Min != nil && gf.Max != nil:
			g.Min, g.Max = *gf.Min, *gf.Max
		default:
			bad("%s: give count, or min and max", where)
		}
		if g.Min < 1 || g.Max < g.Min {
			bad("%s: counts need 1 <= min <= max, got min %d, max %d", where, g.Min, g.Max)
		}
		if g.Min != g.Max && i != len(f.Consist)-1 {
			bad("%s: only the last entry of a consist may vary in count (min %d, max %d)", where, g.Min, g.Max)
		}
		t.Consist = append(t.Consist, g)
	}
	for i, pf := range f.Distributed {
		where := fmt.Sprintf("distributed[%d]", i)
		p := Part{Mode: Whole}
		if pf.Mode != "" {
			m := slices.Index(partModeNames, pf.Mode)
			if m < 0 {
				bad("%s.mode: %q is not one of %s", where, pf.Mode, strings.Join(partModeNames, ", "))
			}
			p.Mode = PartMode(max(m, 0))
		}
		switch {
		case pf.From == nil || pf.To == nil:
			bad("%s: from and to are required (to may be .inf)", where)
		case !(*pf.From < *pf.To):
			bad("%s.to: must be greater than from (%v), got %v", where, *pf.From, *pf.To)
		default:
			p.FromM, p.ToM = *pf.From*u.length, *pf.To*u.length
		}
		switch {
		case pf.Q == nil:
			bad("%s.q: required", where)
		case !(*pf.Q > 0) || math.IsInf(*pf.Q, 0):
			bad("%s.q: must be positive, got %v", where, *pf.Q)
		default:
			p.QKNPerM = *pf.Q * u.perLength
		}
		t.Parts = append(t.Parts, p)
	}
	if len(errs) > 0 {
		return nil, errors.Join(errs...)
	}
	if err := t.Validate(); err != nil {
		return nil, err
	}
	return t, nil
}
