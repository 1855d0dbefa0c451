package truss

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Kind says what part of the truss a member is.
type Kind string

// The member kinds.
const (
	TopChord    Kind = "top-chord"
	BottomChord Kind = "bottom-chord"
	Vertical    Kind = "vertical"
	Diagonal    Kind = "diagonal"
	EndPost     Kind = "end-post"
)

// Deck positions.
const (
	Through = "through"
	DeckTop = "deck"
)

// End-post forms for Pratt and Howe trusses.
const (
	Inclined      = "inclined"
	VerticalPosts = "vertical"
)

// Params are the inventory's description of one truss.
type Params struct {
	Type     string  `json:"type"`      // a name from Types, e.g. "pratt"
	SpanM    float64 `json:"span_m"`    // bearing to bearing
	Panels   int     `json:"panels"`    // number of bottom-chord panels
	DepthM   float64 `json:"depth_m"`   // centre-line distance between the chords
	Deck     string  `json:"deck"`      // "through" (deck at the bottom chord) or "deck" (at the top); "" means through
	EndPosts string  `json:"end_posts"` // "inclined" or "vertical"; "" takes the type's default for the deck position
	// DepthsM gives a polygonal top chord: the depth at every top-chord joint, left to right
	// (forms.go). Empty: parallel chords, or the parabola of EndDepthM.
	DepthsM []float64 `json:"depths_m,omitempty"`
	// EndDepthM, when positive, makes the top chord a parabola: EndDepthM at the first and
	// last top-chord joints, DepthM at midspan (forms.go).
	EndDepthM float64 `json:"end_depth_m,omitempty"`
	// Spans is the number of equal spans of SpanM each over which the truss runs continuous
	// (1 to 3; 0 means 1), with a roller at every intermediate pier (forms.go).
	Spans int `json:"spans,omitempty"`
}

// Joint is a pin of the truss.
type Joint struct {
	Name string
	X, Y float64
}

// Member is a two-force bar between joints A and B (indices into Truss.Joints).
type Member struct {
	Label string
	Kind  Kind
	A, B  int
}

// Support is a restrained joint: Fixed[0] restrains x, Fixed[1] restrains y.
type Support struct {
	Joint int
	Fixed [2]bool
}

// Truss is a planar pin-jointed truss ready for analysis. A Truss may also be assembled by
// hand (for example with a redundant member); Build gives the parametric ones.
type Truss struct {
	Params   Params // as built, with defaults filled in
	Joints   []Joint
	Members  []Member
	Supports []Support
	// DeckJoints are the deck panel points, ordered by increasing x.
	DeckJoints []int
	// LengthsM are the spans of a truss built from a table (nil for a parametric one: see
	// SpanLengthsM).
	LengthsM []float64
}

// SpanM is the distance between the outer bearings: the length over which the influence
// lines run (all spans of a continuous truss).
func (t *Truss) SpanM() float64 {
	return t.Params.SpanM * float64(max(t.Params.Spans, 1))
}

// DeckX gives the abscissae of the deck panel points, in metres from the left bearing.
func (t *Truss) DeckX() []float64 {
	xs := make([]float64, len(t.DeckJoints))
	for i, j := range t.DeckJoints {
		xs[i] = t.Joints[j].X
	}
	return xs
}

// Labels lists the member labels in member order.
func (t *Truss) Labels() []string {
	ls := make([]string, len(t.Members))
	for i, m := range t.Members {
		ls[i] = m.Label
	}
	return ls
}

// Member returns the index of the member with the given label, or -1.
func (t *Truss) Member(label string) int {
	for i, m := range t.Members {
		if m.Label == label {
			return i
		}
	}
	return -1
}

// LengthM is the length of member i.
func (t *Truss) LengthM(i int) float64 {
	a, b := t.Joints[t.Members[i].A], t.Joints[t.Members[i].B]
	return math.Hypot(b.X-a.X, b.Y-a.Y)
}

// Type describes one parametric truss type.
type Type struct {
	Name        string
	Summary     string
	EvenPanels  bool     // the layout needs an even number of panels
	MinPanels   int      // at least this many panels
	EndPosts    []string // end-post forms it offers; empty: the form is fixed by the layout
	DeckAllowed []string // deck positions it offers
	// DefaultEndPosts maps a deck position to the end-post form used when none is given.
	DefaultEndPosts map[string]string
	// DeckNeeds maps a deck position to the end-post form it requires ("" for any).
	DeckNeeds map[string]string
	// PanelsMultiple, when above 1, is a number the panel count must be a multiple of.
	PanelsMultiple int
	// Polygonal says the type may have a polygonal top chord (DepthsM or EndDepthM) as a
	// through truss; Continuous that it may run over several spans.
	Polygonal, Continuous bool
	layout                func(b *builder, p Params)
}

// Types is the table of parametric truss types, keyed by name. Adding a type is adding an
// entry here and its layout function.
var Types = map[string]*Type{}

func register(t *Type) { Types[t.Name] = t }

// TypeNames lists the known type names in alphabetical order.
func TypeNames() []string {
	names := make([]string, 0, len(Types))
	for n := range Types {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}

// Proportion limits: wider than these the idealisation (and the inventory row) is suspect.
const (
	maxSpanM           = 400
	maxPanels          = 80
	minSpanDepthRatio  = 1.5
	maxSpanDepthRatio  = 40.0
	minPanelDepthRatio = 0.1
	maxPanelDepthRatio = 6.0
)

// ParamError names the parameter at fault, its value and what is allowed.
type ParamError struct {
	Param   string
	Value   any
	Allowed string
}

func (e *ParamError) Error() string {
	return fmt.Sprintf("%s %v: %s", e.Param, e.Value, e.Allowed)
}

// Build validates the parameters and lays out the truss.
func Build(p Params) (*Truss, error) {
	typ, p, err := Validate(p)
	if err != nil {
		return nil, err
	}
	b := &builder{p: p, index: map[string]int{}}
	typ.layout(b, p)
	if err := b.checkDepths(); err != nil {
		return nil, err
	}
	return b.finish(), nil
}

// Validate checks the parameters against the type's table entry and fills in defaults.
func Validate(p Params) (*Type, Params, error) {
	p.Type = strings.ToLower(strings.TrimSpace(p.Type))
	p.Deck = strings.ToLower(strings.TrimSpace(p.Deck))
	p.EndPosts = strings.ToLower(strings.TrimSpace(p.EndPosts))
	typ, ok := Types[p.Type]
	if !ok {
		return nil, p, &ParamError{"type", quote(p.Type), "unknown truss type; known types: " + strings.Join(TypeNames(), ", ")}
	}
	fillDepth(&p)
	switch {
	case math.IsNaN(p.SpanM) || math.IsInf(p.SpanM, 0) || p.SpanM <= 0:
		return nil, p, &ParamError{"span", p.SpanM, "must be a positive finite length in metres"}
	case p.SpanM > maxSpanM:
		return nil, p, &ParamError{"span", p.SpanM, fmt.Sprintf("must not exceed %d m", maxSpanM)}
	case math.IsNaN(p.DepthM) || math.IsInf(p.DepthM, 0) || p.DepthM <= 0:
		return nil, p, &ParamError{"depth", p.DepthM, "must be a positive finite length in metres"}
	case p.Panels < typ.MinPanels:
		return nil, p, &ParamError{"panels", p.Panels, fmt.Sprintf("a %s truss needs at least %d panels", typ.Name, typ.MinPanels)}
	case p.Panels > maxPanels:
		return nil, p, &ParamError{"panels", p.Panels, fmt.Sprintf("must not exceed %d", maxPanels)}
	case typ.EvenPanels && p.Panels%2 != 0:
		return nil, p, &ParamError{"panels", p.Panels, fmt.Sprintf("a %s truss needs an even number of panels", typ.Name)}
	case typ.PanelsMultiple > 1 && p.Panels%typ.PanelsMultiple != 0:
		return nil, p, &ParamError{"panels", p.Panels, fmt.Sprintf("a %s truss needs a multiple of %d panels (an even number of main panels, each of two sub-panels)", typ.Name, typ.PanelsMultiple)}
	}
	if err := validateForm(typ, &p); err != nil {
		return nil, p, err
	}
	if r := p.SpanM / p.DepthM; r < minSpanDepthRatio || r > maxSpanDepthRatio {
		return nil, p, &ParamError{"depth", p.DepthM, fmt.Sprintf("span/depth is %.3g; allowed %g to %g", r, minSpanDepthRatio, maxSpanDepthRatio)}
	}
	if r := p.SpanM / float64(p.Panels) / minDepth(p); r < minPanelDepthRatio || r > maxPanelDepthRatio {
		return nil, p, &ParamError{"panels", p.Panels, fmt.Sprintf("panel length/depth is %.3g; allowed %g to %g", r, minPanelDepthRatio, maxPanelDepthRatio)}
	}
	if p.Deck == "" {
		p.Deck = Through
	}
	if !contains(typ.DeckAllowed, p.Deck) {
		return nil, p, &ParamError{"deck", quote(p.Deck), fmt.Sprintf("a %s truss may be: %s", typ.Name, strings.Join(typ.DeckAllowed, ", "))}
	}
	if len(typ.EndPosts) == 0 {
		if p.EndPosts != "" {
			return nil, p, &ParamError{"end_posts", quote(p.EndPosts), fmt.Sprintf("a %s truss has no choice of end posts; leave it empty", typ.Name)}
		}
		return typ, p, nil
	}
	if p.EndPosts == "" {
		p.EndPosts = typ.DefaultEndPosts[p.Deck]
	}
	if !contains(typ.EndPosts, p.EndPosts) {
		return nil, p, &ParamError{"end_posts", quote(p.EndPosts), "allowed: " + strings.Join(typ.EndPosts, ", ")}
	}
	if need := typ.DeckNeeds[p.Deck]; need != "" && p.EndPosts != need {
		return nil, p, &ParamError{"end_posts", quote(p.EndPosts), fmt.Sprintf("a %s %s truss needs %s end posts (the only deck form supported)", p.Deck, typ.Name, need)}
	}
	return typ, p, nil
}

func quote(s string) string { return fmt.Sprintf("%q", s) }

func contains(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}
