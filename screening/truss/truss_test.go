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
			tr, err := Build(c.p)
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
			for l, k := range c.want {
				if got[l] != k {
					t.Errorf("member %s: kind %q, want %q", l, got[l], k)
				}
			}
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
		{"deck warren", Params{Type: "warren", SpanM: 40, Panels: 8, DepthM: 5, Deck: "deck"}, "deck", "through"},
		{"deck pratt inclined", Params{Type: "pratt", SpanM: 40, Panels: 8, DepthM: 5, Deck: "deck", EndPosts: "inclined"}, "end_posts", "vertical"},
		{"end posts on warren", Params{Type: "warren", SpanM: 40, Panels: 8, DepthM: 5, EndPosts: "vertical"}, "end_posts", "no choice"},
		{"unknown deck", Params{Type: "pratt", SpanM: 40, Panels: 8, DepthM: 5, Deck: "half-through"}, "deck", "may be"},
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
