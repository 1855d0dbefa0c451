package network

import (
	"math"
	"testing"
)

// TestCategoryTable checks the axle loads and masses per metre (values from memory: EN 15528,
// the table of DOMAIN.md "Line categories").
func TestCategoryTable(t *testing.T) {
	want := []struct {
		name string
		p, w float64
	}{ // from memory: EN 15528
		{"A", 16, 5.0}, {"B1", 18, 5.0}, {"B2", 18, 6.4}, {"C2", 20, 6.4}, {"C3", 20, 7.2}, {"C4", 20, 8.0},
		{"D2", 22.5, 6.4}, {"D3", 22.5, 7.2}, {"D4", 22.5, 8.0}, {"E4", 25, 8.0}, {"E5", 25, 8.8},
	}
	if len(Categories) != len(want) {
		t.Fatalf("%d categories, want %d", len(Categories), len(want))
	}
	for i, w := range want {
		c := Categories[i]
		if c.Name != w.name || c.AxleLoadT != w.p || c.MassPerMT != w.w {
			t.Errorf("category %d: %+v, want %+v", i, c, w)
		}
	}
	// 1 t weighs 9.80665 kN (standard gravity, by definition): D4's 22.5 t axle is 220.65 kN.
	if d4, _ := ByName("D4"); math.Abs(d4.AxleLoadKN()-220.649625) > 1e-9 || math.Abs(d4.QKNPerM()-78.4532) > 1e-9 {
		t.Errorf("D4: %v kN, %v kN/m", d4.AxleLoadKN(), d4.QKNPerM())
	}
}

// TestPartialOrder: a category dominates another when both its axle load and its mass per
// metre are at least as large (from memory: EN 15528's ordering of categories).
func TestPartialOrder(t *testing.T) {
	cat := func(n string) Category {
		c, ok := ByName(n)
		if !ok {
			t.Fatalf("no category %s", n)
		}
		return c
	}
	cases := []struct {
		a, b       string
		dominates  bool // a dominates b
		comparable bool
	}{
		{"C4", "D2", false, false}, // 20 t, 8.0 t/m against 22.5 t, 6.4 t/m: from memory, EN 15528
		{"D2", "C4", false, false},
		{"D4", "C4", true, true},
		{"E5", "A", true, true},
		{"B1", "B2", false, true}, // same axle load, lighter per metre
		{"C3", "D2", false, false},
		{"E4", "D4", true, true},
		{"D4", "D4", true, true},
	}
	for _, c := range cases {
		if got := cat(c.a).Dominates(cat(c.b)); got != c.dominates {
			t.Errorf("%s dominates %s: %v, want %v", c.a, c.b, got, c.dominates)
		}
		if got := Comparable(cat(c.a), cat(c.b)); got != c.comparable {
			t.Errorf("%s, %s comparable: %v, want %v", c.a, c.b, got, c.comparable)
		}
	}
	// Brute force: every pair is comparable exactly when one is at least the other in both.
	for _, a := range Categories {
		for _, b := range Categories {
			want := (a.AxleLoadT >= b.AxleLoadT && a.MassPerMT >= b.MassPerMT) || (b.AxleLoadT >= a.AxleLoadT && b.MassPerMT >= a.MassPerMT)
			if Comparable(a, b) != want {
				t.Errorf("%s, %s comparable %v", a.Name, b.Name, !want)
			}
		}
	}
}

// TestHighestAndClosure: the highest categories carried are the maximal elements of the
// carried set; a category that passes but dominates one that fails is not carried (common
// practice: a line open to a category is open to every lighter one).
func TestHighestAndClosure(t *testing.T) {
	set := func(names ...string) []bool {
		s := make([]bool, len(Categories))
		for _, n := range names {
			s[Index(n)] = true
		}
		return s
	}
	lower := []string{"A", "B1", "B2", "C2", "C3", "C4", "D2"}
	got := Highest(Closure(set(lower...)))
	if len(got) != 2 || got[0] != "C4" || got[1] != "D2" {
		t.Errorf("highest of A..C4, D2: %v, want [C4 D2] (incomparable, both maximal)", got)
	}
	// D3 passes but C3, which it dominates, does not: D3 is not carried.
	c := Closure(set("A", "B1", "B2", "C2", "D2", "D3"))
	if c[Index("D3")] || !c[Index("D2")] {
		t.Errorf("closure: D3 %v, D2 %v; want false, true", c[Index("D3")], c[Index("D2")])
	}
	if h := Highest(c); len(h) != 1 || h[0] != "D2" {
		t.Errorf("highest: %v, want [D2]", h)
	}
	if h := Highest(make([]bool, len(Categories))); len(h) != 0 {
		t.Errorf("highest of nothing: %v", h)
	}
}

// TestReferenceWagons: each category's wagon is as long as its mass per metre requires,
// L = 4 P / w (the geometry this package states), and its axles weigh P; categories of equal
// P / w share a geometry (B2 and D4: 2.8125 m per t/m; C2, D3 and E4: 3.125).
func TestReferenceWagons(t *testing.T) {
	for _, c := range Categories {
		tr := c.Train()
		if err := tr.Validate(); err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		if err := tr.CheckLimits(); err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		v := tr.Consist[0].Vehicle
		total := 0.0
		for _, a := range v.Axles {
			total += a.LoadKN
		}
		// Mass per metre of the consist: the wagon's weight over its length (definition).
		if math.Abs(total/v.LengthM-c.QKNPerM()) > 1e-9 {
			t.Errorf("%s: %v kN/m, want %v", c.Name, total/v.LengthM, c.QKNPerM())
		}
		if d := v.Axles[1].AtM - v.Axles[0].AtM; math.Abs(d-BogieAxlesM) > 1e-12 {
			t.Errorf("%s: bogie axles %v m apart", c.Name, d)
		}
	}
	g := Geometries()
	if len(g) != 8 {
		t.Fatalf("%d geometries, want 8 (11 categories, B2 = D4 and C2 = D3 = E4 in P / w)", len(g))
	}
	for k, geo := range g {
		for _, c := range geo.Categories {
			if math.Abs(Categories[c].WagonLengthM()-geo.LengthM) > 1e-9 {
				t.Errorf("geometry %d (%v m) holds %s", k, geo.LengthM, Categories[c].Name)
			}
		}
		if k > 0 && !(geo.LengthM > g[k-1].LengthM) {
			t.Errorf("geometries not shortest first: %v after %v", geo.LengthM, g[k-1].LengthM)
		}
	}
	// Shortest: C4, 4 x 20 / 8.0 = 10 m; longest: B1, 4 x 18 / 5.0 = 14.4 m (arithmetic).
	if math.Abs(g[0].LengthM-10) > 1e-12 || math.Abs(g[len(g)-1].LengthM-14.4) > 1e-12 {
		t.Errorf("shortest %v m, longest %v m; want 10, 14.4", g[0].LengthM, g[len(g)-1].LengthM)
	}
}

// TestAxleLoadGoverns: a member whose effect does not depend on the wagon length (one bogie
// group) is limited by the axle load; one whose effect falls as 1/L (a full train on a long
// line) by the mass per metre (homogeneity of the effect in P and w; package comment).
func TestAxleLoadGoverns(t *testing.T) {
	if !AxleLoadGoverns(3, 3, 10, 14.4) {
		t.Error("constant effect: want axle load")
	}
	if AxleLoadGoverns(14.4, 10, 10, 14.4) {
		t.Error("effect as 1/L: want mass per metre")
	}
	// e_P = 1/2 exactly at S proportional to L^-1/2: the axle load (ties go to it).
	if !AxleLoadGoverns(1/math.Sqrt(10), 1/math.Sqrt(14.4), 10, 14.4) {
		t.Error("S ~ L^-1/2: want axle load")
	}
}

// TestERating: 80 x RF (AREMA practice, from memory: the rating is stated as a Cooper E number).
func TestERating(t *testing.T) {
	if ERating(1.25) != 100 || ERating(0.5) != 40 {
		t.Errorf("E ratings %v, %v", ERating(1.25), ERating(0.5))
	}
}

// TestCorridorWeakestLinks works a line of five invented bridges by hand (the partial order
// of EN 15528 categories, values from memory; the rest is set arithmetic worked here):
//
//	km 12.4  N-3  carries up to E5           (every category)
//	km  3.1  N-1  carries up to D4           (all but E4, E5)
//	km  7.9  N-2  carries C4 and D2          (and all they dominate; not D3, D4, E4, E5)
//	km  9.0  N-4  carries up to D3           (not C4, D4, E4, E5)
//	(no km)  N-5  not rated                  (keeps the line from everything)
//
// In chainage order: N-1, N-2, N-4, N-3, then N-5. Without N-5 the line would carry the
// categories all of N-1, N-2, N-4 carry: A, B1, B2, C2, C3, D2 (C4 is missing at N-4, D3 at
// N-2), highest C3 and D2. With N-5 unrated the line carries nothing.
//
// D3: weakest links N-2 and N-5; upgrading both to D3 (they then carry D3, D2, C3, C2, B2,
// B1, A) opens A, B1, B2, C2, C3, D2, D3 (C4 still fails at N-4 and N-5 is only raised to D3).
// C4: weakest N-4 and N-5; upgrading them to C4 opens A, B1, B2, C2, C3, C4 (D2 not: N-5
// raised to C4 does not carry D2).
// E5: weakest N-1, N-2, N-4, N-5; upgrading all to E5 opens every category.
func TestCorridorWeakestLinks(t *testing.T) {
	km := func(v float64) *float64 { return &v }
	stops := []Stop{
		{BridgeID: "N-3", ChainageKm: km(12.4), Highest: []string{"E5"}, Rated: true},
		{BridgeID: "N-1", ChainageKm: km(3.1), Highest: []string{"D4"}, Rated: true},
		{BridgeID: "N-5"},
		{BridgeID: "N-2", ChainageKm: km(7.9), Highest: []string{"C4", "D2"}, Rated: true},
		{BridgeID: "N-4", ChainageKm: km(9.0), Highest: []string{"D3"}, Rated: true},
	}
	c := NewCorridor("Invented Line", stops)
	var order []string
	for _, s := range c.Stops {
		order = append(order, s.BridgeID)
	}
	if got, want := join(order), "N-1 N-2 N-4 N-3 N-5"; got != want {
		t.Errorf("chainage order %s, want %s", got, want)
	}
	if len(c.Highest) != 0 {
		t.Errorf("line carries %v, want nothing (N-5 unrated)", c.Highest)
	}
	links := map[string]Links{}
	for _, l := range c.Categories {
		links[l.Category] = l
	}
	for _, w := range []struct{ cat, weakest, opens string }{
		{"D3", "N-2 N-5", "A B1 B2 C2 C3 D2 D3"},                     // worked above
		{"C4", "N-4 N-5", "A B1 B2 C2 C3 C4"},                        // worked above
		{"E5", "N-1 N-2 N-4 N-5", "A B1 B2 C2 C3 C4 D2 D3 D4 E4 E5"}, // worked above
		{"A", "N-5", "A"}, // only N-5 lacks A; raised to A it carries A alone
	} {
		l := links[w.cat]
		if l.Open || join(l.Weakest) != w.weakest || join(l.Opens) != w.opens {
			t.Errorf("%s: open %v, weakest %q, opens %q; want false, %q, %q", w.cat, l.Open, join(l.Weakest), join(l.Opens), w.weakest, w.opens)
		}
	}
	// Once N-5 is rated D4 the line carries A, B1, B2, C2, C3, D2 (worked above): highest C3
	// and D2, both open, and C4's weakest link is N-4 alone.
	stops[2] = Stop{BridgeID: "N-5", Highest: []string{"D4"}, Rated: true}
	c = NewCorridor("Invented Line", stops)
	if join(c.Highest) != "C3 D2" {
		t.Errorf("line carries %v, want [C3 D2]", c.Highest)
	}
	for _, l := range c.Categories {
		if l.Category == "C4" && (l.Open || join(l.Weakest) != "N-4" || join(l.Opens) != "C4") {
			t.Errorf("C4: %+v; want weakest N-4, opens C4", l)
		}
		if l.Category == "D2" && (!l.Open || len(l.Weakest) != 0) {
			t.Errorf("D2: %+v; want open", l)
		}
	}
}

func join(s []string) string {
	out := ""
	for i, v := range s {
		if i > 0 {
			out += " "
		}
		out += v
	}
	return out
}
