package traffic

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/trussfleet/trussfleet/internal/excerpt"
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

// FileError is a problem in a train file: the file, the line and column of the field at
// fault (1-based; 0 when the file has no such place), the field's path in the file
// ("vehicles[0].axles[1].load") and what is wrong.
type FileError struct {
	File         string
	Line, Column int
	Field        string
	Msg          string
}

func (e *FileError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, " line %d, column %d", e.Line, e.Column)
	}
	b.WriteString(": ")
	if e.Field != "" {
		b.WriteString(e.Field + ": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

// problem is a FileError before it is located: the field's path in the file and the message.
type problem struct{ field, msg string }

// ParseTrainFile reads a train from the YAML format of docs/trains.md. filename only labels
// errors, which are *FileError (joined when there are several) naming the file, the line and
// column, the field and the offending value. Imperial files are converted to kN and m here,
// once. A train beyond the limits of limits.go is refused, located at the field that
// exceeds them.
func ParseTrainFile(filename string, data []byte) (*Train, error) {
	if len(data) > MaxFileBytes {
		return nil, &FileError{File: filename, Msg: fmt.Sprintf("larger than %d bytes: not a train file", MaxFileBytes)}
	}
	if err := checkText(filename, data); err != nil {
		return nil, err
	}
	// The text first as a tree of nodes: its shape is checked against the format, with the
	// line and column of each key, before it is decoded.
	var root yaml.Node
	if err := yaml.Unmarshal(data, &root); err != nil {
		return nil, &FileError{File: filename, Line: syntaxLine(err), Msg: syntaxMsg(err)}
	}
	if len(root.Content) == 0 {
		return nil, &FileError{File: filename, Msg: "empty train file"}
	}
	if fes := checkShape(filename, &root); len(fes) > 0 {
		return nil, joinFileErrors(fes)
	}
	var f trainFile
	if err := root.Decode(&f); err != nil {
		// checkShape has let through something the decoder refuses: say it without the
		// decoder's type names.
		return nil, &FileError{File: filename, Msg: "cannot be read as a train file: " + syntaxMsg(err)}
	}
	t, probs := f.train()
	if len(probs) == 0 {
		// The file's own checks cover the train's invariants; this is their last word.
		if err := t.Validate(); err != nil {
			return nil, fmt.Errorf("%s: %w", filename, err)
		}
		probs = f.limits(t)
	}
	if len(probs) > 0 {
		fes := make([]*FileError, len(probs))
		for i, p := range probs {
			line, col := locate(&root, p.field)
			fes[i] = &FileError{File: filename, Line: line, Column: col, Field: p.field, Msg: p.msg}
		}
		return nil, joinFileErrors(fes)
	}
	return t, nil
}

// joinFileErrors sorts a file's errors by line and column and joins them.
func joinFileErrors(fes []*FileError) error {
	slices.SortStableFunc(fes, func(a, b *FileError) int { return cmp.Or(a.Line-b.Line, a.Column-b.Column) })
	errs := make([]error, len(fes))
	for i, fe := range fes {
		errs[i] = fe
	}
	return errors.Join(errs...)
}

// syntaxLine is the line a YAML syntax error names ("yaml: line 3: ..."), 0 when none.
func syntaxLine(err error) int {
	_, rest, ok := strings.Cut(err.Error(), "line ")
	if !ok {
		return 0
	}
	end := strings.IndexFunc(rest, func(r rune) bool { return r < '0' || r > '9' })
	if end < 0 {
		end = len(rest)
	}
	n, _ := strconv.Atoi(rest[:end])
	return n
}

// syntaxMsg is a YAML error's message without the decoder's prefix and line.
func syntaxMsg(err error) string {
	m := strings.TrimPrefix(err.Error(), "yaml: ")
	m = strings.TrimPrefix(m, "unmarshal errors:\n  ")
	if pre, rest, ok := strings.Cut(m, ": "); ok && strings.HasPrefix(pre, "line ") {
		m = rest
	}
	return "not YAML as docs/trains.md describes it: " + m
}

// checkText refuses a file that is not text, at the line and column of the first NUL byte
// or invalid UTF-8 sequence.
func checkText(filename string, data []byte) error {
	line, col := 1, 1
	for i := 0; i < len(data); {
		r, size := utf8.DecodeRune(data[i:])
		switch {
		case r == 0:
			return &FileError{File: filename, Line: line, Column: col, Msg: "a NUL byte: a train file is text; is this a binary or UTF-16 file?"}
		case r == utf8.RuneError && size == 1:
			return &FileError{File: filename, Line: line, Column: col, Msg: "not valid UTF-8 text: a train file is UTF-8 text"}
		case r == '\n':
			line, col = line+1, 1
		default:
			col++
		}
		i += size
	}
	return nil
}

// locate gives the line and column of the field at path ("vehicles[0].axles[1].load") in a
// decoded file, or of the nearest enclosing field present when it is missing.
func locate(root *yaml.Node, path string) (line, col int) {
	n := root
	if n.Kind == yaml.DocumentNode && len(n.Content) > 0 {
		n = n.Content[0]
	}
	line, col = n.Line, n.Column
	for _, step := range strings.Split(path, ".") {
		key, index, _ := strings.Cut(step, "[")
		var next *yaml.Node
		if n.Kind == yaml.MappingNode {
			for i := 0; i+1 < len(n.Content); i += 2 {
				if n.Content[i].Value == key {
					next = n.Content[i+1]
					line, col = n.Content[i].Line, n.Content[i].Column
					break
				}
			}
		}
		if next == nil {
			return line, col
		}
		n = next
		if index != "" {
			k, err := strconv.Atoi(strings.TrimSuffix(index, "]"))
			if err != nil || n.Kind != yaml.SequenceNode || k < 0 || k >= len(n.Content) {
				return line, col
			}
			n = n.Content[k]
		}
		line, col = n.Line, n.Column
	}
	return line, col
}

// train builds the train, with every problem of the file's fields, each naming its field.
func (f *trainFile) train() (*Train, []problem) {
	var probs []problem
	bad := func(field, format string, a ...any) {
		probs = append(probs, problem{field, fmt.Sprintf(format, a...)})
	}
	if strings.TrimSpace(f.Name) == "" {
		bad("name", "required")
	}
	unitName := f.Units
	if unitName == "" {
		unitName = "si"
	}
	u, ok := fileUnits[unitName]
	if !ok {
		bad("units", "%q is not one of si, imperial", excerpt.Cut(f.Units))
		u = fileUnits["si"]
	}
	t := &Train{Name: strings.TrimSpace(f.Name), Note: f.Note}
	vehicles := map[string]Vehicle{}
	for i, vf := range f.Vehicles {
		where := fmt.Sprintf("vehicles[%d]", i)
		switch n := utf8.RuneCountInString(vf.ID); {
		case vf.ID == "":
			bad(where+".id", "required")
		case n > MaxIDChars:
			bad(where+".id", "%d characters; at most %d", n, MaxIDChars)
		default:
			if _, dup := vehicles[vf.ID]; dup {
				bad(where+".id", "%q is used twice", vf.ID)
			}
		}
		v := Vehicle{Name: vf.Name}
		if v.Name == "" {
			v.Name = vf.ID
		}
		if vf.Length == nil {
			bad(where+".length", "required")
		} else if !(*vf.Length > 0) || math.IsInf(*vf.Length, 0) {
			bad(where+".length", "must be positive, got %v", *vf.Length)
		} else {
			v.LengthM = *vf.Length * u.length
		}
		if len(vf.Axles) == 0 {
			bad(where+".axles", "a vehicle needs at least one axle")
		}
		prev := 0.0
		for k, af := range vf.Axles {
			aw := fmt.Sprintf("%s.axles[%d]", where, k)
			switch {
			case af.At == nil:
				bad(aw+".at", "required")
			case !(*af.At >= prev):
				bad(aw+".at", "axles are listed front to back from 0, got %v after %v", *af.At, prev)
			case vf.Length != nil && *af.At > *vf.Length:
				bad(aw+".at", "lies beyond the vehicle's length %v, got %v", *vf.Length, *af.At)
			default:
				prev = *af.At
			}
			switch {
			case af.Load == nil:
				bad(aw+".load", "required")
			case !(*af.Load > 0) || math.IsInf(*af.Load, 0):
				bad(aw+".load", "must be positive, got %v", *af.Load)
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
			bad(where+".vehicle", "%q is not defined under vehicles (defined: %s)", excerpt.Cut(gf.Vehicle), excerpt.List(ids, 20))
		}
		g := Group{Vehicle: v}
		switch {
		case gf.Count != nil && (gf.Min != nil || gf.Max != nil):
			bad(where, "give either count or min and max, not both")
		case gf.Count != nil:
			g.Min, g.Max = *gf.Count, *gf.Count
		case gf.Min != nil && gf.Max != nil:
			g.Min, g.Max = *gf.Min, *gf.Max
		default:
			bad(where, "give count, or min and max")
		}
		if g.Min < 1 || g.Max < g.Min {
			bad(where, "counts need 1 <= min <= max, got min %d, max %d", g.Min, g.Max)
		}
		if g.Min != g.Max && i != len(f.Consist)-1 {
			bad(where, "only the last entry of a consist may vary in count (min %d, max %d)", g.Min, g.Max)
		}
		t.Consist = append(t.Consist, g)
	}
	for i, pf := range f.Distributed {
		where := fmt.Sprintf("distributed[%d]", i)
		p := Part{Mode: Whole}
		if pf.Mode != "" {
			m := slices.Index(partModeNames, pf.Mode)
			if m < 0 {
				bad(where+".mode", "%q is not one of %s", excerpt.Cut(pf.Mode), strings.Join(partModeNames, ", "))
			}
			p.Mode = PartMode(max(m, 0))
		}
		switch {
		case pf.From == nil || pf.To == nil:
			bad(where, "from and to are required (to may be .inf)")
		case !(*pf.From < *pf.To):
			bad(where+".to", "must be greater than from (%v), got %v", *pf.From, *pf.To)
		default:
			p.FromM, p.ToM = *pf.From*u.length, *pf.To*u.length
		}
		switch {
		case pf.Q == nil:
			bad(where+".q", "required")
		case !(*pf.Q > 0) || math.IsInf(*pf.Q, 0):
			bad(where+".q", "must be positive, got %v", *pf.Q)
		default:
			p.QKNPerM = *pf.Q * u.perLength
		}
		t.Parts = append(t.Parts, p)
	}
	return t, probs
}

// limits checks the train built from the file against the limits of limits.go, and names
// the file's field for each: a vehicle's values under vehicles (once, however many entries
// of the consist use it), counts under consist, parts under distributed. Values are in kN
// and m, converted from an imperial file.
func (f *trainFile) limits(t *Train) []problem {
	var probs []problem
	seen := map[string]bool{}
	var les []*LimitError
	for _, err := range unjoin(t.CheckLimits()) {
		var le *LimitError
		if errors.As(err, &le) {
			les = append(les, le)
		}
	}
	for _, le := range les {
		field := le.Where()
		switch {
		case le.Group >= 0 && (le.Axle >= 0 || le.Key == "length" || le.Key == "name"):
			j := slices.IndexFunc(f.Vehicles, func(v vehicleFile) bool { return v.ID == f.Consist[le.Group].Vehicle })
			field = fmt.Sprintf("vehicles[%d]", j)
			switch {
			case le.Axle >= 0:
				field += fmt.Sprintf(".axles[%d].%s", le.Axle, le.Key)
			case le.Key == "name" && f.Vehicles[j].Name == "":
				field += ".id" // the name defaults to the id
			default:
				field += "." + le.Key
			}
		case le.Group >= 0 && le.Key == "count":
			field = fmt.Sprintf("consist[%d].count", le.Group)
			if f.Consist[le.Group].Count == nil {
				field = fmt.Sprintf("consist[%d].max", le.Group)
			}
		case le.Part >= 0:
			field = fmt.Sprintf("distributed[%d].%s", le.Part, le.Key)
		case le.Key == "parts":
			field = "distributed"
		}
		if !seen[field+le.Msg] {
			seen[field+le.Msg] = true
			probs = append(probs, problem{field, le.Msg})
		}
	}
	return probs
}

// unjoin lists the errors of an errors.Join, or err alone.
func unjoin(err error) []error {
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		return j.Unwrap()
	}
	if err == nil {
		return nil
	}
	return []error{err}
}
