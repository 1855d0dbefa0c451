package fatigue

import (
	"cmp"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// bruteEvents is every (item, kink) pair's event sorted by position, then kink, then item: the
// order History's sums follow, by a general sort instead of mergeKinks' merge of runs.
func bruteEvents(k *kinks, tr *Train) []event {
	var ev []event
	for i, it := range tr.items {
		for j, x := range k.x {
			ev = append(ev, event{s: x + it.d, it: int32(i), j: int32(j)})
		}
	}
	slices.SortFunc(ev, func(a, b event) int {
		return cmp.Or(cmp.Compare(a.s, b.s), cmp.Compare(a.j, b.j), cmp.Compare(a.it, b.it))
	})
	return ev
}

// The merged events are the brute-force sort's, and a line kinking where another does (same
// positions, other ordinates) takes the kept list, which is still the brute force's.
func TestMergedEventsAreSorted(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		x, eta := genLine(t)
		tr := genPassageTrain(t)
		l, p := prepared(t, x, eta, tr)
		other := make([]float64, len(eta))
		f := rapid.Float64Range(0.1, 3).Draw(t, "factor")
		for k := range other {
			other[k] = -f * eta[k]
		}
		var c Calculator
		for _, dir := range []int{0, 1} {
			want := bruteEvents(l.dir[dir], p)
			if got := mergeKinks(nil, new([]event), l.dir[dir], p.items, 0); !slices.Equal(got, want) {
				t.Fatalf("direction %d: merged %v, brute force %v", dir, got, want)
			}
			if got := c.eventsOf(l.dir[dir], p); !slices.Equal(got, want) {
				t.Fatalf("direction %d: kept %v, brute force %v", dir, got, want)
			}
			o, err := NewLine(x, other)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(o.dir[dir].x, l.dir[dir].x) {
				continue // a slope change at the noise threshold kept in one line only
			}
			if got := c.eventsOf(o.dir[dir], p); !slices.Equal(got, want) {
				t.Fatalf("direction %d: kept for the other line %v, brute force %v", dir, got, want)
			}
		}
	})
}
