package fatigue

import (
	"cmp"
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
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
	proptest.Check(t, func(t *rapid.T) {
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

// Extending a list whose storage the Calculator is about to take for the longer train's (the
// kept lists let go at their bound, the first slot's storage reused) still gives the longer
// train's events.
func TestExtendingAfterTheListsAreLetGo(t *testing.T) {
	x := []float64{0, 4, 9, 12}
	l, err := NewLine(x, []float64{0, 1, -0.5, 0})
	if err != nil {
		t.Fatal(err)
	}
	long, err := PrepareTrain(axleTrainOf(40))
	if err != nil {
		t.Fatal(err)
	}
	var c Calculator
	k := l.dir[0]
	c.eventsOf(k, long) // the first slot gets storage for 160 events
	c.Forget()
	ta, tb := c.withCount(long, 5), c.withCount(long, 6)
	eva := c.eventsOf(k, ta) // in the first slot's storage
	c.eventsKept = maxKeptEvents
	if got, want := c.eventsExtending(k, ta, tb, eva), bruteEvents(k, tb); !slices.Equal(got, want) {
		t.Fatalf("extended events %v, brute force %v", got, want)
	}
}

// axleTrainOf is a train of n two-axle wagons, 6 m long, 100 kN axles 1 m and 5 m behind
// each wagon's front.
func axleTrainOf(n int) *traffic.Train {
	v := traffic.Vehicle{Name: "wagon", LengthM: 6, Axles: []traffic.Axle{{AtM: 1, LoadKN: 100}, {AtM: 5, LoadKN: 100}}}
	return &traffic.Train{Name: "wagons", Consist: []traffic.Group{{Vehicle: v, Min: n, Max: n}}}
}
