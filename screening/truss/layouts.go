package truss

import (
	"sort"
	"strconv"
)

func init() {
	posts := []string{Inclined, VerticalPosts}
	defaults := map[string]string{Through: Inclined, DeckTop: VerticalPosts}
	needs := map[string]string{DeckTop: VerticalPosts}
	register(&Type{
		Name: "pratt", Summary: "verticals; diagonals slope down toward midspan (tension under load)",
		EvenPanels: true, MinPanels: 2, EndPosts: posts, DeckAllowed: []string{Through, DeckTop},
		DefaultEndPosts: defaults, DeckNeeds: needs, Polygonal: true, Continuous: true,
		layout: func(b *builder, p Params) { postTruss(b, p, false) },
	})
	register(&Type{
		Name: "howe", Summary: "verticals; diagonals slope up toward midspan (compression under load)",
		EvenPanels: true, MinPanels: 2, EndPosts: posts, DeckAllowed: []string{Through, DeckTop},
		DefaultEndPosts: defaults, DeckNeeds: needs, Polygonal: true, Continuous: true,
		layout: func(b *builder, p Params) { postTruss(b, p, true) },
	})
	register(&Type{
		Name: "warren", Summary: "no verticals; top joints at mid-panel, diagonals alternate (deck: turned over, bearing at the deck chord's ends)",
		MinPanels: 2, DeckAllowed: []string{Through, DeckTop}, Polygonal: true,
		layout: warren,
	})
	register(&Type{
		Name: "warren-verticals", Summary: "zig-zag diagonals with a vertical at every interior joint",
		EvenPanels: true, MinPanels: 2, DeckAllowed: []string{Through}, Polygonal: true, Continuous: true,
		layout: warrenVerticals,
	})
	register(&Type{
		Name: "pratt-sub-struts", Summary: "Pratt with halved panels: hangers and sub-struts from the main diagonals' midpoints",
		EvenPanels: true, PanelsMultiple: 4, MinPanels: 4, EndPosts: posts, DeckAllowed: []string{Through},
		DefaultEndPosts: defaults, Polygonal: true,
		layout: func(b *builder, p Params) { subdividedPratt(b, p, false) },
	})
	register(&Type{
		Name: "pratt-sub-ties", Summary: "Pratt with halved panels: hangers and sub-ties from the main diagonals' midpoints",
		EvenPanels: true, PanelsMultiple: 4, MinPanels: 4, EndPosts: posts, DeckAllowed: []string{Through},
		DefaultEndPosts: defaults, Polygonal: true,
		layout: func(b *builder, p Params) { subdividedPratt(b, p, true) },
	})
	register(&Type{
		Name: "k-truss", Summary: "verticals split at mid-height, two inclined members from each split toward midspan",
		EvenPanels: true, MinPanels: 2, EndPosts: posts, DeckAllowed: []string{Through, DeckTop},
		DefaultEndPosts: defaults, DeckNeeds: needs, Polygonal: true,
		layout: kTruss,
	})
}

// postTruss lays out a Pratt (howe=false) or a Howe (howe=true) truss, over one span or
// continuous over several (each span's diagonals mirror about its own midspan).
func postTruss(b *builder, p Params, howe bool) {
	per := p.Panels
	n := per * spanCount(p)
	dx := p.SpanM / float64(per)
	inclined := p.EndPosts == Inclined
	first, last := b.lowerAndUpper(n, dx, inclined, 1)
	b.chords(n, first, last, 1)
	for i := first; i <= last; i++ {
		kind := Vertical
		if i == 0 || i == n {
			kind = EndPost
		}
		b.member(L(i), U(i), kind)
	}
	if inclined {
		b.member(L(0), U(1), EndPost)
		b.member(U(n-1), L(n), EndPost)
	}
	for i := first; i < n-first; i++ {
		left := 2*(i%per) < per
		// A Pratt diagonal runs from the top joint on the outer side down toward midspan.
		if left != howe {
			b.member(U(i), L(i+1), Diagonal)
		} else {
			b.member(L(i), U(i+1), Diagonal)
		}
	}
	b.supports(L(0), L(n))
	b.piers(per, n)
	if p.Deck == DeckTop {
		b.deckRow("U")
	} else {
		b.deckRow("L")
	}
}

func warren(b *builder, p Params) {
	if p.Deck == DeckTop {
		deckWarren(b, p)
		return
	}
	n := p.Panels
	dx := p.SpanM / float64(n)
	for i := 0; i <= n; i++ {
		b.joint(L(i), float64(i)*dx, 0)
	}
	for i := 1; i <= n; i++ {
		b.top(U(i), (float64(i)-0.5)*dx)
	}
	for i := 0; i < n; i++ {
		b.member(L(i), L(i+1), BottomChord)
	}
	for i := 1; i < n; i++ {
		b.member(U(i), U(i+1), TopChord)
	}
	for i := 1; i <= n; i++ {
		b.member(L(i-1), U(i), Diagonal)
		b.member(U(i), L(i), Diagonal)
	}
	b.supports(L(0), L(n))
	b.deckRow("L")
}

func warrenVerticals(b *builder, p Params) {
	n := p.Panels * spanCount(p)
	dx := p.SpanM / float64(p.Panels)
	for i := 0; i <= n; i++ {
		b.joint(L(i), float64(i)*dx, 0)
	}
	for i := 1; i < n; i++ {
		b.top(U(i), float64(i)*dx)
	}
	for i := 0; i < n; i++ {
		b.member(L(i), L(i+1), BottomChord)
	}
	for i := 1; i < n-1; i++ {
		b.member(U(i), U(i+1), TopChord)
	}
	for i := 1; i < n; i++ {
		b.member(L(i), U(i), Vertical)
	}
	for i := 0; i < n; i++ {
		if i%2 == 0 {
			b.member(L(i), U(i+1), Diagonal)
		} else {
			b.member(U(i), L(i+1), Diagonal)
		}
	}
	b.supports(L(0), L(n))
	b.piers(p.Panels, n)
	b.deckRow("L")
}

// L names the bottom joint i.
func L(i int) string { return "L" + strconv.Itoa(i) }

// U names the top joint i.
func U(i int) string { return "U" + strconv.Itoa(i) }

type builder struct {
	p     Params
	t     Truss
	index map[string]int
	// nTop counts the top-chord joints added so far (top), firstTopX is the first one's x.
	nTop      int
	firstTopX float64
}

func (b *builder) joint(name string, x, y float64) {
	b.index[name] = len(b.t.Joints)
	b.t.Joints = append(b.t.Joints, Joint{Name: name, X: x, Y: y})
}

// member adds a bar between the named joints, labelled with the smaller-x joint first (the
// L joint first where x is equal).
func (b *builder) member(a, c string, kind Kind) {
	ia, ic := b.index[a], b.index[c]
	ja, jc := b.t.Joints[ia], b.t.Joints[ic]
	if jc.X < ja.X || (jc.X == ja.X && rowRank(jc.Name) < rowRank(ja.Name)) {
		ia, ic = ic, ia
		a, c = c, a
	}
	b.t.Members = append(b.t.Members, Member{Label: a + "-" + c, Kind: kind, A: ia, B: ic})
}

func (b *builder) supports(pin, roller string) {
	b.t.Supports = []Support{
		{Joint: b.index[pin], Fixed: [2]bool{true, true}},
		{Joint: b.index[roller], Fixed: [2]bool{false, true}},
	}
}

// deckRow makes every joint of the row ("L" or "U") a deck panel point.
func (b *builder) deckRow(row string) {
	for i, j := range b.t.Joints {
		if j.Name[:1] == row {
			b.t.DeckJoints = append(b.t.DeckJoints, i)
		}
	}
	sort.Slice(b.t.DeckJoints, func(i, k int) bool {
		return b.t.Joints[b.t.DeckJoints[i]].X < b.t.Joints[b.t.DeckJoints[k]].X
	})
}

func (b *builder) finish() *Truss {
	t := b.t
	t.Params = b.p
	return &t
}
