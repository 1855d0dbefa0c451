package truss

import (
	"fmt"
	"math"
	"strconv"
)

// The forms of older fleets (common practice): polygonal top chords, subdivided panels,
// K-trusses, deck Warrens and trusses continuous over intermediate piers.
//
// Polygonal top chord (Pratt, Howe, Warren, Warren with verticals, subdivided Pratt,
// K-truss; through trusses of one span): the depth at each top-chord joint is either listed
// (Params.DepthsM, one value per top-chord joint from left to right) or follows a parabola
// through the depth EndDepthM at the first and last top-chord joints and DepthM at midspan:
//
//	h(x) = DepthM - (DepthM - EndDepthM) * ((x - S/2) / (x1 - S/2))^2
//
// with S the span and x1 the abscissa of the first top-chord joint. The bottom chord stays
// straight; verticals run from each bottom joint up to the top chord.
//
// Subdivided Pratt ("pratt-sub-struts", "pratt-sub-ties"): every main panel of the Pratt
// is halved; a main diagonal crosses two sub-panels and meets, at the middle sub-panel point,
// a hanger from the bottom chord at a mid-height joint M. A sub-strut runs from M down to
// the bottom chord at the main panel point on the outer side; a sub-tie from M up to the top
// chord at the main panel point on the inner side. Floor beams stand at every sub-panel
// point (the deck row is every L joint). With inclined end posts the end panel's post carries
// the M joint and a sub-diagonal from it to L2.
//
// K-truss ("k-truss"): every vertical but the middle one is split at mid-height (joint M);
// in each panel two inclined members run from that M on the outer vertical to the top and
// bottom joints of the inner vertical.
//
// Deck Warren ("warren" with deck "deck"): the Warren turned over: the deck chord U0..Un at
// the panel points carries the floor beams and bears on the abutments at U0 (pin) and Un
// (roller); the lower chord's joints L1..Ln lie at mid-panel.
//
// Continuous trusses (Params.Spans 2 or 3; Pratt, Howe, Warren with verticals): the layout
// runs on over equal spans of SpanM each, with the chords continuous over the piers, a full
// vertical at each pier, and a roller under the bottom-chord joint at each pier. Labels run
// on (a two-span Pratt of 8 panels per span ends at L16). The truss is then externally
// indeterminate, of degree Spans - 1.

// Limits of the forms.
const maxSpans = 3

// M names the mid-height joint at panel point i.
func M(i int) string { return "M" + strconv.Itoa(i) }

// rowRank orders joints at the same abscissa in a member label: L, then M, then U.
func rowRank(name string) int {
	switch name[0] {
	case 'L':
		return 0
	case 'M':
		return 1
	}
	return 2
}

// spanCount is the number of spans, at least 1.
func spanCount(p Params) int { return max(p.Spans, 1) }

// SpanLengthsM gives the length of each span of the truss, left to right.
func (t *Truss) SpanLengthsM() []float64 {
	if t.LengthsM != nil {
		return t.LengthsM
	}
	out := make([]float64, spanCount(t.Params))
	for i := range out {
		out[i] = t.Params.SpanM
	}
	return out
}

// Polygonal reports whether the parameters ask for a polygonal top chord.
func (p Params) Polygonal() bool { return len(p.DepthsM) > 0 || p.EndDepthM > 0 }

// fillDepth makes DepthM the largest listed depth when a list is given and DepthM is not.
func fillDepth(p *Params) {
	if len(p.DepthsM) > 0 && p.DepthM == 0 {
		for _, d := range p.DepthsM {
			if d > p.DepthM {
				p.DepthM = d
			}
		}
	}
}

// minDepth is the smallest depth of the truss, for the panel proportion check.
func minDepth(p Params) float64 {
	h := p.DepthM
	for _, d := range p.DepthsM {
		h = min(h, d)
	}
	if p.EndDepthM > 0 {
		h = min(h, p.EndDepthM)
	}
	return h
}

// validateForm checks the polygonal chord and the spans against the type's entry.
func validateForm(typ *Type, p *Params) error {
	if len(p.DepthsM) > 0 && p.EndDepthM != 0 {
		return &ParamError{"end_depth", p.EndDepthM, "give either the list of depths or an end depth (parabola), not both"}
	}
	if p.Polygonal() {
		// Name the parameter the chord was given by.
		param, value := "depths", any(p.DepthsM)
		if len(p.DepthsM) == 0 {
			param, value = "end_depth", p.EndDepthM
		}
		switch {
		case !typ.Polygonal:
			return &ParamError{param, value, fmt.Sprintf("a %s truss has parallel chords; leave depths and end depth empty", typ.Name)}
		case p.Deck == DeckTop:
			return &ParamError{param, value, "a polygonal top chord needs a through truss (the deck of a deck truss is straight)"}
		case p.Spans > 1:
			return &ParamError{param, value, "a polygonal top chord is for a truss of one span"}
		}
	}
	if math.IsNaN(p.EndDepthM) || math.IsInf(p.EndDepthM, 0) || p.EndDepthM < 0 || p.EndDepthM > p.DepthM {
		return &ParamError{"end_depth", p.EndDepthM, fmt.Sprintf("must be a positive finite length in metres, at most the midspan depth %g", p.DepthM)}
	}
	hi := 0.0
	for i, d := range p.DepthsM {
		if math.IsNaN(d) || math.IsInf(d, 0) || d <= 0 {
			return &ParamError{"depths", p.DepthsM, fmt.Sprintf("depth %d is %v: every depth must be a positive finite length in metres", i+1, d)}
		}
		hi = max(hi, d)
	}
	if len(p.DepthsM) > 0 && math.Abs(hi-p.DepthM) > 1e-9*hi {
		return &ParamError{"depth", p.DepthM, fmt.Sprintf("with a list of depths, the depth must be the largest of them (%g) or left empty", hi)}
	}
	switch {
	case p.Spans < 0 || p.Spans > maxSpans:
		return &ParamError{"spans", p.Spans, fmt.Sprintf("must be 1 to %d (0 or empty: one span)", maxSpans)}
	case p.Spans > 1 && !typ.Continuous:
		return &ParamError{"spans", p.Spans, fmt.Sprintf("a %s truss is laid out over one span; continuous forms: pratt, howe, warren-verticals, or a joint table", typ.Name)}
	}
	return nil
}

// top adds a top-chord joint at x, with its depth from the parameters. Layouts add the
// top-chord joints from left to right.
func (b *builder) top(name string, x float64) {
	k := b.nTop
	b.nTop++
	if k == 0 {
		b.firstTopX = x
	}
	y := b.p.DepthM
	switch {
	case len(b.p.DepthsM) > 0:
		if k < len(b.p.DepthsM) {
			y = b.p.DepthsM[k]
		}
	case b.p.EndDepthM > 0:
		mid := b.p.SpanM / 2
		if b.firstTopX != mid {
			r := (x - mid) / (b.firstTopX - mid)
			y = b.p.DepthM - (b.p.DepthM-b.p.EndDepthM)*r*r
		}
	}
	b.joint(name, x, y)
}

// checkDepths checks that a list of depths has one value per top-chord joint.
func (b *builder) checkDepths() error {
	if n := len(b.p.DepthsM); n > 0 && n != b.nTop {
		return &ParamError{"depths", n, fmt.Sprintf("this %s truss (%d panels, %s end posts) has %d top-chord joints: give one depth for each, left to right",
			b.p.Type, b.p.Panels, orWord(b.p.EndPosts, "fixed"), b.nTop)}
	}
	return nil
}

func orWord(s, dflt string) string {
	if s == "" {
		return dflt
	}
	return s
}

// y gives the height of a named joint already added.
func (b *builder) y(name string) float64 { return b.t.Joints[b.index[name]].Y }

// lowerAndUpper adds the lower joints L0..Ln and an upper joint every step panel points,
// without the end ones (at 0 and n) where the end posts are inclined; it gives the indices
// of the first and last upper joints.
func (b *builder) lowerAndUpper(n int, dx float64, inclined bool, step int) (first, last int) {
	for i := 0; i <= n; i++ {
		b.joint(L(i), float64(i)*dx, 0)
	}
	first, last = 0, n
	if inclined {
		first, last = step, n-step
	}
	for i := first; i <= last; i += step {
		b.top(U(i), float64(i)*dx)
	}
	return first, last
}

// chords adds the lower chord L0..Ln and the upper chord between upper joints step apart.
func (b *builder) chords(n, first, last, step int) {
	for i := 0; i < n; i++ {
		b.member(L(i), L(i+1), BottomChord)
	}
	for i := first; i < last; i += step {
		b.member(U(i), U(i+step), TopChord)
	}
}

// piers puts a roller under the bottom-chord joint at the end of every span but the last.
func (b *builder) piers(perSpan, n int) {
	for k := perSpan; k < n; k += perSpan {
		b.t.Supports = append(b.t.Supports, Support{Joint: b.index[L(k)], Fixed: [2]bool{false, true}})
	}
}

// deckWarren lays out the Warren turned over, deck on the upper chord.
func deckWarren(b *builder, p Params) {
	n := p.Panels
	dx := p.SpanM / float64(n)
	for i := 0; i <= n; i++ {
		b.joint(U(i), float64(i)*dx, p.DepthM)
	}
	for i := 1; i <= n; i++ {
		b.joint(L(i), (float64(i)-0.5)*dx, 0)
	}
	for i := 0; i < n; i++ {
		b.member(U(i), U(i+1), TopChord)
	}
	for i := 1; i < n; i++ {
		b.member(L(i), L(i+1), BottomChord)
	}
	for i := 1; i <= n; i++ {
		kind := Diagonal
		if i == 1 {
			kind = EndPost
		}
		b.member(U(i-1), L(i), kind)
		kind = Diagonal
		if i == n {
			kind = EndPost
		}
		b.member(L(i), U(i), kind)
	}
	b.supports(U(0), U(n))
	b.deckRow("U")
}

// subdividedPratt lays out a Pratt with halved panels, with sub-struts (ties=false) or
// sub-ties (ties=true).
func subdividedPratt(b *builder, p Params, ties bool) {
	n := p.Panels
	dx := p.SpanM / float64(n)
	first, last := b.lowerAndUpper(n, dx, p.EndPosts == Inclined, 2)
	has := func(i int) bool { return i >= first && i <= last }
	for i := 1; i < n; i += 2 {
		// M lies halfway along the main diagonal (or end post), whose top end is the main
		// panel point on the outer side where there is one.
		outer, inner := i-1, i+1
		if 2*i > n {
			outer, inner = i+1, i-1
		}
		topJ := outer
		if !has(outer) {
			topJ = inner
		}
		b.joint(M(i), float64(i)*dx, b.y(U(topJ))/2)
	}
	b.chords(n, first, last, 2)
	for i := first; i <= last; i += 2 {
		kind := Vertical
		if i == 0 || i == n {
			kind = EndPost
		}
		b.member(L(i), U(i), kind)
	}
	for i := 1; i < n; i += 2 {
		b.member(L(i), M(i), Vertical) // the hanger under the floor beam
		outer, inner := i-1, i+1
		if 2*i > n {
			outer, inner = i+1, i-1
		}
		if !has(outer) { // inclined end post through M, and the end panel's sub-diagonal
			b.member(L(outer), M(i), EndPost)
			b.member(M(i), U(inner), EndPost)
			b.member(M(i), L(inner), Diagonal)
			continue
		}
		b.member(U(outer), M(i), Diagonal)
		b.member(M(i), L(inner), Diagonal)
		if ties {
			b.member(M(i), U(inner), Diagonal)
		} else {
			b.member(L(outer), M(i), Diagonal)
		}
	}
	b.supports(L(0), L(n))
	b.deckRow("L")
}

// kTruss lays out a K-truss.
func kTruss(b *builder, p Params) {
	n := p.Panels
	dx := p.SpanM / float64(n)
	inclined := p.EndPosts == Inclined
	first, last := b.lowerAndUpper(n, dx, inclined, 1)
	for i := first; i <= last; i++ {
		if 2*i != n {
			b.joint(M(i), float64(i)*dx, b.y(U(i))/2)
		}
	}
	b.chords(n, first, last, 1)
	for i := first; i <= last; i++ {
		kind := Vertical
		if i == 0 || i == n {
			kind = EndPost
		}
		if 2*i == n {
			b.member(L(i), U(i), kind)
			continue
		}
		b.member(L(i), M(i), kind)
		b.member(M(i), U(i), kind)
	}
	if inclined {
		b.member(L(0), U(1), EndPost)
		b.member(U(n-1), L(n), EndPost)
	}
	for i := 0; i < n; i++ {
		if inclined && (i == 0 || i == n-1) {
			continue
		}
		// The K's point is on the vertical nearer the bearing; its arms reach the inner one.
		outer, inner := i, i+1
		if 2*i >= n {
			outer, inner = i+1, i
		}
		b.member(M(outer), U(inner), Diagonal)
		b.member(M(outer), L(inner), Diagonal)
	}
	b.supports(L(0), L(n))
	if p.Deck == DeckTop {
		b.deckRow("U")
	} else {
		b.deckRow("L")
	}
}
