package fatigue

import (
	"math"
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

// The two shorter trains' cycles of a passage (the longer train's walk starting where the
// shorter's saved its state) are those of each train's own whole walk (TurningOf, Rainflow),
// to the bit; and the events built by extending the shorter train's are the longer's merged
// afresh.
func TestShorterPassagesAreWholeWalks(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, eta := genLine(t)
		tr := genPassageTrain(t)
		span := x[len(x)-1] - x[0]
		n := steadyCount(t, tr, span)
		p := withVehicles(t, tr, 2*n+rapid.IntRange(2, 8).Draw(t, "extra vehicles"))
		l, err := NewLine(x, eta)
		if err != nil {
			t.Fatal(err)
		}
		var c Calculator
		for _, dir := range []Direction{LeftToRight, RightToLeft} {
			c.Forget()
			ta, tb := c.withCount(p, n), c.withCount(p, n+1)
			var got passageCycles
			c.shorterPassages(&got, l, ta, tb, dir)
			var fresh Calculator
			wantA, _, _ := RainflowRepeated(fresh.TurningOf(l, ta, dir, nil), nil, nil, nil)
			wantB, _, _ := RainflowRepeated(fresh.TurningOf(l, tb, dir, nil), nil, nil, nil)
			if !slices.Equal(got.a, wantA) || !slices.Equal(got.b, wantB) {
				t.Fatalf("%s: cycles %v and %v, of the whole walks %v and %v", dir, got.a, got.b, wantA, wantB)
			}
			k := l.kinksFor(dir)
			if ext, want := c.eventsExtending(k, ta, tb, c.eventsOf(k, ta)), bruteEvents(k, tb); !slices.Equal(ext, want) {
				t.Fatalf("%s: extended events %v, brute force %v", dir, ext, want)
			}
		}
	})
}

// steadyCount is the count of steady's shorter train for tr over a span, whatever the count
// tr has: ceil((tailM - r0 + span) / unit length) + 3.
func steadyCount(t *rapid.T, tr *traffic.Train, spanM float64) int {
	p, err := PrepareTrain(tr)
	if err != nil {
		t.Fatal(err)
	}
	return int(math.Ceil((p.tailM-p.r0+spanM)/p.unitLen)) + 3
}

// withVehicles is tr with count vehicles in its last group, prepared (tr is changed).
func withVehicles(t *rapid.T, tr *traffic.Train, count int) *Train {
	last := &tr.Consist[len(tr.Consist)-1]
	last.Min, last.Max = count, count
	p, err := PrepareTrain(tr)
	if err != nil {
		t.Fatal(err)
	}
	return p
}
