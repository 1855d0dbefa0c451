package truss

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// TableType is the truss type of a bridge whose truss is given by a joint/member table
// instead of parameters.
const TableType = "table"

// Table is any planar pin-jointed truss given joint by joint (docs/inventory.md, "Joint
// tables"): joints with coordinates, members between joints (with an area where the truss
// is indeterminate), supports, and the deck joints in order along the track. Units: m and
// mm².
type Table struct {
	Joints   []TableJoint   `json:"joints"`
	Members  []TableMember  `json:"members"`
	Supports []TableSupport `json:"supports"`
	// Deck names the deck joints (the panel points the floor beams bring the track load to)
	// in order along the track, left to right.
	Deck []string `json:"deck"`
}

// TableJoint is a joint of a table.
type TableJoint struct {
	Name string  `json:"name"`
	X    float64 `json:"x_m"`
	Y    float64 `json:"y_m"`
}

// TableMember is a member of a table. AreaMM2 is 0 where not given.
type TableMember struct {
	Label   string  `json:"label"`
	Kind    Kind    `json:"kind"`
	From    string  `json:"from"`
	To      string  `json:"to"`
	AreaMM2 float64 `json:"area_mm2,omitempty"`
}

// Support kinds of a table.
const (
	Pin    = "pin"    // restrains both directions
	Roller = "roller" // restrains the vertical only
)

// TableSupport is a supported joint.
type TableSupport struct {
	Joint string `json:"joint"`
	Kind  string `json:"kind"`
}

// Kinds lists the member kinds, for messages.
var Kinds = []Kind{TopChord, BottomChord, Vertical, Diagonal, EndPost}

// TableError is a problem of a table, with the record it lies in: Record is "joint",
// "member", "support" or "deck" and Index the record's position among those of its kind;
// Record "" is a problem of the whole table.
type TableError struct {
	Record string
	Index  int
	Field  string
	Msg    string
}

func (e *TableError) Error() string {
	if e.Record == "" {
		return e.Msg
	}
	return fmt.Sprintf("%s %d, %s: %s", e.Record, e.Index+1, e.Field, e.Msg)
}

// Build checks the table's structure (unique names and labels, members between known and
// distinct joints, supports and deck joints that exist, deck joints in order along the
// track) and lays out the truss. It returns the members' areas (mm², 0 where not given) in
// member order. Stability and the need for areas are judged by the analysis (Check there).
func (tb *Table) Build() (*Truss, []float64, error) {
	t := &Truss{Params: Params{Type: TableType}}
	index := map[string]int{}
	for i, j := range tb.Joints {
		switch {
		case j.Name == "":
			return nil, nil, &TableError{"joint", i, "name", "a joint needs a name"}
		case math.IsNaN(j.X) || math.IsInf(j.X, 0) || math.IsNaN(j.Y) || math.IsInf(j.Y, 0):
			return nil, nil, &TableError{"joint", i, "x", "coordinates must be finite"}
		}
		if _, dup := index[j.Name]; dup {
			return nil, nil, &TableError{"joint", i, "name", fmt.Sprintf("joint %s is named twice", j.Name)}
		}
		index[j.Name] = len(t.Joints)
		t.Joints = append(t.Joints, Joint{Name: j.Name, X: j.X, Y: j.Y})
	}
	labels := map[string]bool{}
	areas := make([]float64, 0, len(tb.Members))
	ends := map[[2]int]string{}
	for i, m := range tb.Members {
		a, okA := index[m.From]
		b, okB := index[m.To]
		switch {
		case !okA:
			return nil, nil, &TableError{"member", i, "from", fmt.Sprintf("no joint %q", m.From)}
		case !okB:
			return nil, nil, &TableError{"member", i, "to", fmt.Sprintf("no joint %q", m.To)}
		case a == b:
			return nil, nil, &TableError{"member", i, "to", "a member joins two different joints"}
		case !containsKind(m.Kind):
			return nil, nil, &TableError{"member", i, "kind", "allowed: " + kindList()}
		case !(m.AreaMM2 >= 0) || math.IsInf(m.AreaMM2, 0):
			return nil, nil, &TableError{"member", i, "area", "an area must be positive (or empty)"}
		}
		ja, jb := t.Joints[a], t.Joints[b]
		if ja.X == jb.X && ja.Y == jb.Y {
			return nil, nil, &TableError{"member", i, "to", fmt.Sprintf("joints %s and %s are at the same place", m.From, m.To)}
		}
		label := m.Label
		if label == "" {
			label = m.From + "-" + m.To
		}
		if labels[label] {
			return nil, nil, &TableError{"member", i, "name", fmt.Sprintf("member label %s is used twice", label)}
		}
		labels[label] = true
		key := [2]int{min(a, b), max(a, b)}
		if other, dup := ends[key]; dup {
			return nil, nil, &TableError{"member", i, "to", fmt.Sprintf("member %s joins the same joints as %s", label, other)}
		}
		ends[key] = label
		t.Members = append(t.Members, Member{Label: label, Kind: m.Kind, A: a, B: b})
		areas = append(areas, m.AreaMM2)
	}
	seen := map[int]bool{}
	for i, s := range tb.Supports {
		j, ok := index[s.Joint]
		switch {
		case !ok:
			return nil, nil, &TableError{"support", i, "name", fmt.Sprintf("no joint %q", s.Joint)}
		case seen[j]:
			return nil, nil, &TableError{"support", i, "name", fmt.Sprintf("joint %s is supported twice", s.Joint)}
		case s.Kind != Pin && s.Kind != Roller:
			return nil, nil, &TableError{"support", i, "support", fmt.Sprintf("must be %q or %q", Pin, Roller)}
		}
		seen[j] = true
		t.Supports = append(t.Supports, Support{Joint: j, Fixed: [2]bool{s.Kind == Pin, true}})
	}
	if len(tb.Deck) < 2 {
		return nil, nil, &TableError{Msg: "a table needs at least two deck joints, in order along the track"}
	}
	onDeck := map[int]bool{}
	for i, name := range tb.Deck {
		j, ok := index[name]
		switch {
		case !ok:
			return nil, nil, &TableError{"deck", i, "name", fmt.Sprintf("no joint %q", name)}
		case onDeck[j]:
			return nil, nil, &TableError{"deck", i, "name", fmt.Sprintf("joint %s is on the deck twice", name)}
		case i > 0 && !(t.Joints[j].X > t.Joints[t.DeckJoints[i-1]].X):
			return nil, nil, &TableError{"deck", i, "name", fmt.Sprintf("deck joints must run in order along the track: %s (x = %g m) does not lie beyond %s (x = %g m)",
				name, t.Joints[j].X, t.Joints[t.DeckJoints[i-1]].Name, t.Joints[t.DeckJoints[i-1]].X)}
		}
		onDeck[j] = true
		t.DeckJoints = append(t.DeckJoints, j)
	}
	t.Params.Panels = len(t.DeckJoints) - 1
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, j := range t.Joints {
		lo, hi = min(lo, j.Y), max(hi, j.Y)
	}
	t.Params.DepthM = hi - lo
	// A deck on the upper half of the truss makes it a deck truss (for descriptions only).
	t.Params.Deck = Through
	if y := t.Joints[t.DeckJoints[0]].Y; y > (lo+hi)/2 {
		t.Params.Deck = DeckTop
	}
	t.Params.SpanM = t.Joints[t.DeckJoints[len(t.DeckJoints)-1]].X - t.Joints[t.DeckJoints[0]].X
	t.LengthsM = tableSpans(t)
	return t, areas, nil
}

// tableSpans are the distances between successive supports along the span (the spans of a
// continuous truss), or the deck's length when fewer than two supports lie apart.
func tableSpans(t *Truss) []float64 {
	var xs []float64
	for _, s := range t.Supports {
		xs = append(xs, t.Joints[s.Joint].X)
	}
	sort.Float64s(xs)
	var out []float64
	for i := 1; i < len(xs); i++ {
		if d := xs[i] - xs[i-1]; d > 1e-9 {
			out = append(out, d)
		}
	}
	if len(out) == 0 {
		return []float64{t.Params.SpanM}
	}
	return out
}

func containsKind(k Kind) bool {
	for _, v := range Kinds {
		if v == k {
			return true
		}
	}
	return false
}

func kindList() string {
	s := make([]string, len(Kinds))
	for i, k := range Kinds {
		s[i] = string(k)
	}
	return strings.Join(s, ", ")
}

// TableOf writes a truss out as a table (no areas), as an owner would type it: the
// parametric forms become tables to edit.
func TableOf(t *Truss) *Table {
	tb := &Table{}
	for _, j := range t.Joints {
		tb.Joints = append(tb.Joints, TableJoint{Name: j.Name, X: j.X, Y: j.Y})
	}
	for _, m := range t.Members {
		tb.Members = append(tb.Members, TableMember{Label: m.Label, Kind: m.Kind, From: t.Joints[m.A].Name, To: t.Joints[m.B].Name})
	}
	for _, s := range t.Supports {
		kind := Roller
		if s.Fixed[0] {
			kind = Pin
		}
		tb.Supports = append(tb.Supports, TableSupport{Joint: t.Joints[s.Joint].Name, Kind: kind})
	}
	for _, j := range t.DeckJoints {
		tb.Deck = append(tb.Deck, t.Joints[j].Name)
	}
	return tb
}
