package network

import (
	"math"
	"sort"
)

// Stop is a bridge on a line, as the corridor view sees it.
type Stop struct {
	BridgeID, Name string
	// ChainageKm is the bridge's place along the line; nil where the inventory has none.
	ChainageKm *float64
	// Highest are the highest categories the bridge carries; Rated is false where the run
	// holds no category rating for it (not rated by category, or not screened): such a bridge
	// is taken to carry nothing, so it keeps the line from every category until it is rated.
	Highest []string
	Rated   bool
	// Limits holds, for a category the bridge does not carry, its outcome there (lowest RF,
	// limiting member, limit), where the run stored it; may be nil.
	Limits map[string]CategoryRating
}

// carried is the set of categories the stop carries: those some highest category dominates.
func (s Stop) carried() []bool {
	out := make([]bool, len(Categories))
	if !s.Rated {
		return out
	}
	for _, h := range s.Highest {
		top, ok := ByName(h)
		if !ok {
			continue
		}
		for i, c := range Categories {
			if top.Dominates(c) {
				out[i] = true
			}
		}
	}
	return out
}

// Links is one category on a line: the bridges that keep the line from it and what upgrading
// them would open.
type Links struct {
	Category string
	// Open: every bridge of the line carries the category.
	Open bool
	// Weakest are the bridges that do not carry it, in chainage order (their BridgeIDs).
	Weakest []string
	// Opens are the categories the line would carry, beyond those it carries now, if the
	// weakest links were upgraded to carry this category (and so every category it
	// dominates), in the standard's order; the category itself is among them.
	Opens []string
}

// Corridor is a line's network view.
type Corridor struct {
	Line string
	// Stops are the line's bridges in chainage order (those without a chainage last, by id).
	Stops []Stop
	// Highest are the highest categories the whole line carries (every bridge carries them).
	Highest []string
	// Categories are in the order of Categories.
	Categories []Links
}

// NewCorridor puts a line's bridges in chainage order and finds, for each category, its
// weakest links. stops is not modified.
func NewCorridor(name string, stops []Stop) Corridor {
	c := Corridor{Line: name, Stops: append([]Stop(nil), stops...)}
	sort.SliceStable(c.Stops, func(i, j int) bool {
		a, b := c.Stops[i], c.Stops[j]
		ka, kb := math.Inf(1), math.Inf(1)
		if a.ChainageKm != nil {
			ka = *a.ChainageKm
		}
		if b.ChainageKm != nil {
			kb = *b.ChainageKm
		}
		if ka != kb {
			return ka < kb
		}
		return a.BridgeID < b.BridgeID
	})
	sets := make([][]bool, len(c.Stops))
	for i, s := range c.Stops {
		sets[i] = s.carried()
	}
	line := lineCarries(sets, nil, nil)
	c.Highest = Highest(line)
	for k, cat := range Categories {
		l := Links{Category: cat.Name, Open: line[k]}
		var up []int
		for i, s := range c.Stops {
			if !sets[i][k] {
				l.Weakest = append(l.Weakest, s.BridgeID)
				up = append(up, i)
			}
		}
		if !l.Open {
			after := lineCarries(sets, up, &cat)
			for n, o := range Categories {
				if after[n] && !line[n] {
					l.Opens = append(l.Opens, o.Name)
				}
			}
		}
		c.Categories = append(c.Categories, l)
	}
	return c
}

// lineCarries is the set of categories every bridge carries, with the bridges up upgraded to
// carry the category to (and every category it dominates). A line without bridges carries
// every category.
func lineCarries(sets [][]bool, up []int, to *Category) []bool {
	out := make([]bool, len(Categories))
	for k := range out {
		out[k] = true
	}
	upgraded := map[int]bool{}
	for _, i := range up {
		upgraded[i] = true
	}
	for i, s := range sets {
		for k, cat := range Categories {
			has := s[k] || (upgraded[i] && to.Dominates(cat))
			out[k] = out[k] && has
		}
	}
	return out
}
