package truss

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestLabelsAndKinds(t *testing.T) {
	// Layouts as specified for the project (common practice for the names of truss joints:
	// L along the bottom chord, U along the top).
	cases := []struct {
		name   string
		p      Params
		want   map[string]Kind
		absent []string
	}{
		{"pratt through", Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
			map[string]Kind{"L0-L1": BottomChord, "U1-U2": TopChord, "L0-U1": EndPost, "U7-L8": EndPost,
				"L1-U1": Vertical, "U1-L2": Diagonal, "U3-L4": Diagonal, "L4-U5": Diagonal, "L6-U7": Diagonal},
			[]string{"U0-U1", "L0-U0", "L1-U2"}},
		{"pratt vertical end posts", Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6, EndPosts: "vertical"},
			map[string]Kind{"L0-U0": EndPost, "L8-U8": EndPost, "U0-U1": TopChord, "U0-L1": Diagonal, "L7-U8": Diagonal},
			[]string{"L0-U1"}},
		{"howe through", Params{Type: "howe", SpanM: 48, Panels: 8, DepthM: 6},
			map[string]Kind{"L0-U1": EndPost, "L1-U2": Diagonal, "U5-L6": Diagonal, "U6-L7": Diagonal},
			[]string{"U1-L2"}},
		{"howe deck", Params{Type: "howe", SpanM: 48, Panels: 8, DepthM: 6, Deck: "deck"},
			map[string]Kind{"L0-U0": EndPost, "L0-U1": Diagonal, "U7-L8": Diagonal},
			nil},
		{"warren", Params{Type: "warren", SpanM: 40, Panels: 5, DepthM: 5},
			map[string]Kind{"L0-U1": Diagonal, "U1-L1": Diagonal, "U1-U2": TopChord, "U5-L5": Diagonal},
			[]string{"L1-U1"}},
		{"warren with verticals", Params{Type: "warren-verticals", SpanM: 40, Panels: 6, DepthM: 5},
			map[string]Kind{"L0-U1": Diagonal, "U1-L2": Diagonal, "L2-U3": Diagonal, "U5-L6": Diagonal, "L1-U1": Vertical, "U1-U2": TopChord},
			[]string{"L1-U2"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := checkKinds(t, c.p, c.want)
			for _, l := range c.absent {
				if _, ok := got[l]; ok {
					t.Errorf("member %s should not exist", l)
				}
			}
		})
	}
}

func TestDeckPanelPoints(t *testing.T) {
	through, _ := Build(Params{Type: "pratt", SpanM: 60, Panels: 6, DepthM: 7})
	deck, _ := Build(Params{Type: "pratt", SpanM: 60, Panels: 6, DepthM: 7, Deck: "deck"})
	for _, c := range []struct {
		name string
		tr   *Truss
		row  byte
		y    float64
	}{{"through", through, 'L', 0}, {"deck", deck, 'U', 7}} {
		xs := c.tr.DeckX()
		if len(xs) != 7 {
			t.Fatalf("%s: %d deck points, want 7", c.name, len(xs))
		}
		for i, j := range c.tr.DeckJoints {
			jt := c.tr.Joints[j]
			// x = i·L/n (the layout's definition)
			if jt.Name[0] != c.row || jt.Y != c.y || math.Abs(xs[i]-float64(i)*10) > 1e-12 {
				t.Errorf("%s: deck point %d is %+v", c.name, i, jt)
			}
		}
	}
	if deck.Params.EndPosts != VerticalPosts || through.Params.EndPosts != Inclined {
		t.Errorf("default end posts: deck %q, through %q", deck.Params.EndPosts, through.Params.EndPosts)
	}
}

func TestBadParameters(t *testing.T) {
	cases := []struct {
		name  string
		p     Params
		param string
		says  string
	}{
		{"unknown type", Params{Type: "bowstring", SpanM: 40, Panels: 8, DepthM: 5}, "type", "known types"},
		{"odd panels pratt", Params{Type: "pratt", SpanM: 40, Panels: 7, DepthM: 5}, "panels", "even"},
		{"odd panels warren-verticals", Params{Type: "warren-verticals", SpanM: 40, Panels: 5, DepthM: 5}, "panels", "even"},
		{"one panel", Params{Type: "warren", SpanM: 10, Panels: 1, DepthM: 3}, "panels", "at least 2"},
		{"zero span", Params{Type: "pratt", SpanM: 0, Panels: 8, DepthM: 5}, "span", "positive"},
		{"NaN span", Params{Type: "pratt", SpanM: math.NaN(), Panels: 8, DepthM: 5}, "span", "positive"},
		{"infinite depth", Params{Type: "pratt", SpanM: 40, Panels: 8, DepthM: math.Inf(1)}, "depth", "finite"},
		{"negative depth", Params{Type: "howe", SpanM: 40, Panels: 8, DepthM: -2}, "depth", "positive"},
		{"too shallow", Params{Type: "pratt", SpanM: 100, Panels: 10, DepthM: 1}, "depth", "span/depth"},
		{"panels too long", Params{Type: "warren", SpanM: 60, Panels: 2, DepthM: 4}, "panels", "panel length/depth"},
		{"deck warren with verticals", Params{Type: "warren-verticals", SpanM: 40, Panels: 8, DepthM: 5, Deck: "deck"}, "deck", "through"},
		{"deck pratt inclined", Params{Type: "pratt", SpanM: 40, Panels: 8, DepthM: 5, Deck: "deck", EndPosts: "inclined"}, "end_posts", "vertical"},
		{"end posts on warren", Params{Type: "warren", SpanM: 40, Panels: 8, DepthM: 5, EndPosts: "vertical"}, "end_posts", "no choice"},
		{"unknown deck", Params{Type: "pratt", SpanM: 40, Panels: 8, DepthM: 5, Deck: "half-through"}, "deck", "may be"},
		// the forms of older fleets (forms.go)
		{"too few depths", Params{Type: "pratt", SpanM: 72, Panels: 8, DepthsM: []float64{6, 7, 6}}, "depths", "has 7 top-chord joints"},
		{"negative depth", Params{Type: "pratt", SpanM: 72, Panels: 8, DepthsM: []float64{6, -7, 6}}, "depths", "depth 2"},
		{"both forms", Params{Type: "pratt", SpanM: 72, Panels: 8, DepthM: 9, DepthsM: []float64{9}, EndDepthM: 6}, "end_depth", "not both"},
		{"deck polygonal", Params{Type: "pratt", SpanM: 72, Panels: 8, DepthM: 9, EndDepthM: 6, Deck: "deck"}, "end_depth", "through"},
		{"end deeper", Params{Type: "pratt", SpanM: 72, Panels: 8, DepthM: 9, EndDepthM: 10}, "end_depth", "at most"},
		{"depth not the largest", Params{Type: "pratt", SpanM: 72, Panels: 8, DepthM: 12, DepthsM: []float64{6, 7, 8, 9, 8, 7, 6}}, "depth", "largest"},
		{"sub-panels not of four", Params{Type: "pratt-sub-ties", SpanM: 72, Panels: 10, DepthM: 9}, "panels", "multiple of 4"},
		{"four spans", Params{Type: "pratt", SpanM: 40, Panels: 8, DepthM: 5, Spans: 4}, "spans", "1 to 3"},
		{"continuous k", Params{Type: "k-truss", SpanM: 40, Panels: 8, DepthM: 5, Spans: 2}, "spans", "one span"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Build(c.p)
			var pe *ParamError
			if !errors.As(err, &pe) {
				t.Fatalf("got %v, want a ParamError", err)
			}
			if pe.Param != c.param || !strings.Contains(err.Error(), c.says) {
				t.Errorf("got %q (param %s), want param %s saying %q", err, pe.Param, c.param, c.says)
			}
		})
	}
}

func TestFormLabels(t *testing.T) {
	// Labels of the new forms (our naming: M for mid-height joints, L before M before U where
	// joints share an abscissa).
	cases := []struct {
		name string
		p    Params
		want map[string]Kind
	}{
		{"sub-struts", Params{Type: "pratt-sub-struts", SpanM: 96, Panels: 16, DepthM: 12},
			map[string]Kind{"L0-M1": EndPost, "M1-U2": EndPost, "M1-L2": Diagonal, "L1-M1": Vertical, "U2-M3": Diagonal,
				"M3-L4": Diagonal, "L2-M3": Diagonal, "U2-U4": TopChord, "L2-U2": Vertical, "M13-U14": Diagonal, "M13-L14": Diagonal}},
		{"sub-ties", Params{Type: "pratt-sub-ties", SpanM: 96, Panels: 16, DepthM: 12, EndPosts: "vertical"},
			map[string]Kind{"L0-U0": EndPost, "U0-M1": Diagonal, "M1-U2": Diagonal, "M1-L2": Diagonal, "U14-M15": Diagonal}},
		{"k", Params{Type: "k-truss", SpanM: 96, Panels: 8, DepthM: 14},
			map[string]Kind{"L0-U1": EndPost, "L1-M1": Vertical, "M1-U1": Vertical, "M1-U2": Diagonal, "M1-L2": Diagonal,
				"L4-U4": Vertical, "U6-M7": Diagonal, "L6-M7": Diagonal}},
		{"deck warren", Params{Type: "warren", SpanM: 40, Panels: 8, DepthM: 5, Deck: "deck"},
			map[string]Kind{"U0-L1": EndPost, "L1-U1": Diagonal, "U7-L8": Diagonal, "L8-U8": EndPost, "U0-U1": TopChord, "L1-L2": BottomChord}},
		{"two spans", Params{Type: "pratt", SpanM: 48, Panels: 6, DepthM: 7, Spans: 2},
			map[string]Kind{"L6-U6": Vertical, "U5-U6": TopChord, "U6-U7": TopChord, "L5-U6": Diagonal, "U6-L7": Diagonal, "U11-L12": EndPost}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) { checkKinds(t, c.p, c.want) })
	}
}

func TestPolygonalDepths(t *testing.T) {
	// The parabola through the end depth at the first top joint and the midspan depth (the
	// rule documented in forms.go): at U1 (x = 8) 7.5, at U5 (x = 40) 11, at U3 (x = 24)
	// 11 - 3.5·(16/32)² = 10.125 (arithmetic).
	tr, err := Build(Params{Type: "pratt", SpanM: 80, Panels: 10, DepthM: 11, EndDepthM: 7.5})
	if err != nil {
		t.Fatal(err)
	}
	for name, want := range map[string]float64{"U1": 7.5, "U5": 11, "U3": 10.125, "U9": 7.5} {
		for _, j := range tr.Joints {
			if j.Name == name && math.Abs(j.Y-want) > 1e-12 {
				t.Errorf("%s at depth %g, want %g", name, j.Y, want)
			}
		}
	}
	// A listed depth sits where it is listed; DepthM becomes the largest.
	tr, err = Build(Params{Type: "pratt", SpanM: 72, Panels: 8, DepthsM: []float64{6.5, 8.2, 9.1, 9.4, 9.1, 8.0, 6.4}})
	if err != nil {
		t.Fatal(err)
	}
	if tr.Params.DepthM != 9.4 || tr.Joints[len(tr.Joints)-1].Y != 6.4 {
		t.Errorf("depth %g, last top joint %+v", tr.Params.DepthM, tr.Joints[len(tr.Joints)-1])
	}
}

// checkKinds builds the truss and checks that its labels are unique and that the wanted
// members have the wanted kinds; it returns every member's kind by label.
func checkKinds(t *testing.T, p Params, want map[string]Kind) map[string]Kind {
	t.Helper()
	tr, err := Build(p)
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]Kind{}
	for _, m := range tr.Members {
		if _, dup := got[m.Label]; dup {
			t.Errorf("duplicate label %s", m.Label)
		}
		got[m.Label] = m.Kind
	}
	for l, k := range want {
		if got[l] != k {
			t.Errorf("member %s: kind %q, want %q", l, got[l], k)
		}
	}
	return got
}
