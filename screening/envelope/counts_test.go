package envelope

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

// TestSteadyCountEqualsAllCounts: sweeping a variable consist only up to the count beyond
// which more vehicles show the bridge nothing new (Load.steadyCount) gives the extremes of
// sweeping every count from min to max. Reference: the full sweep of every count, the same
// event sweep with the shortcut turned off. Placements may name another count that gives the
// same value, so they are checked by reproducing their value with the independent reference
// response instead.
func TestSteadyCountEqualsAllCounts(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genLines(t)
		tr := genTrain(t)
		if n := len(tr.Consist); n > 0 {
			tr.Consist[n-1].Max += rapid.IntRange(0, 30).Draw(t, "more vehicles")
		}
		if err := tr.Validate(); err != nil {
			t.Skip(err)
		}
		shortcutAgrees(t, x, ord, tr, plainSweeps{allCounts: true})
	})
}

// TestLongConsistEqualsTruncated: a locomotive with 1 to 40,000 wagons gives on a 20 m span
// exactly the envelope of the same consist with 1 to 10 wagons, swept at every count.
// Reference: the truncated consist, since wagons beyond the tenth cannot reach the bridge
// while anything but wagons and the parts' constant tails stands on it (common practice).
func TestLongConsistEqualsTruncated(t *testing.T) {
	x, labels, ord := prattLines(20, 4, 4)
	loco := traffic.Vehicle{Name: "loco", LengthM: 18, Axles: []traffic.Axle{{AtM: 2, LoadKN: 220}, {AtM: 4, LoadKN: 220}, {AtM: 14, LoadKN: 220}, {AtM: 16, LoadKN: 220}}}
	wagon := traffic.Vehicle{Name: "wagon", LengthM: 12, Axles: []traffic.Axle{{AtM: 1.5, LoadKN: 200}, {AtM: 3.3, LoadKN: 200}, {AtM: 8.7, LoadKN: 200}, {AtM: 10.5, LoadKN: 200}}}
	for _, c := range []struct {
		name  string
		parts []traffic.Part
	}{
		{"axles only", nil},
		{"part over the locomotive", []traffic.Part{{FromM: 0, ToM: 18, QKNPerM: 30, Mode: traffic.Whole}}},
		{"trailing part cut where unfavourable", []traffic.Part{{FromM: 18, ToM: math.Inf(1), QKNPerM: 40, Mode: traffic.CutUnfavourable}}},
		{"parts where unfavourable", []traffic.Part{{FromM: math.Inf(-1), ToM: 0, QKNPerM: 50, Mode: traffic.WhereUnfavourable}, {FromM: 18, ToM: math.Inf(1), QKNPerM: 50, Mode: traffic.WhereUnfavourable}}},
	} {
		t.Run(c.name, func(t *testing.T) {
			train := func(max int) *traffic.Train {
				return &traffic.Train{Name: "long", Consist: []traffic.Group{{Vehicle: loco, Min: 1, Max: 1}, {Vehicle: wagon, Min: 1, Max: max}}, Parts: c.parts}
			}
			l, long := prepared(t, x, ord, train(40000))
			_, short := prepared(t, x, ord, train(10))
			var c1, c2 Calculator
			got, err := c1.Envelope(l, long, Options{}, nil)
			if err != nil {
				t.Fatal(err)
			}
			want, err := c2.envelope(l, short, Options{}, nil, plainSweeps{allCounts: true})
			if err != nil {
				t.Fatal(err)
			}
			for i := range ord {
				g, w := senses(got[i]), senses(want[i])
				for k := range g {
					if !near(g[k].e.Value, w[k].e.Value, 1e-9) {
						t.Errorf("%s sense %v: 40,000 wagons give %v kN, 10 wagons %v kN", labels[i], g[k].sense, g[k].e.Value, w[k].e.Value)
					}
					if w[k].e.Value != 0 && g[k].e.Value == 0 {
						t.Errorf("%s sense %v: silently 0 kN", labels[i], g[k].sense)
					}
				}
			}
		})
	}
}

// TestTooLargeRefused: a train that cannot be swept within MaxEvents is refused with an
// error that names the limit, before anything is allocated for it.
func TestTooLargeRefused(t *testing.T) {
	x, _, ord := prattLines(20, 4, 4)
	// A vehicle of a micrometre: 20 million of them stand on the span at once.
	tiny := traffic.Vehicle{Name: "tiny", LengthM: 1e-6, Axles: []traffic.Axle{{AtM: 0, LoadKN: 1}}}
	for _, parts := range [][]traffic.Part{nil, {{FromM: 0, ToM: math.Inf(1), QKNPerM: 10, Mode: traffic.Whole}}} {
		tr := &traffic.Train{Name: "tiny", Consist: []traffic.Group{{Vehicle: tiny, Min: 1, Max: math.MaxInt}}, Parts: parts}
		l, ld := prepared(t, x, ord, tr)
		var c Calculator
		_, err := c.Envelope(l, ld, Options{}, nil)
		if !errors.Is(err, ErrTooLarge) {
			t.Fatalf("parts %v: got error %v, want ErrTooLarge", parts, err)
		}
		if !strings.Contains(err.Error(), "16777216") {
			t.Errorf("the error does not state the limit: %v", err)
		}
	}
}

// BenchmarkLongConsistWithParts: a locomotive and 1 to 40,000 wagons with a part over the
// locomotive on a 20 m span, swept only up to the count beyond which more wagons change
// nothing (the full sweep of every count took 32 s).
func BenchmarkLongConsistWithParts(b *testing.B) {
	x, _, ord := prattLines(20, 4, 4)
	loco := traffic.Vehicle{Name: "loco", LengthM: 18, Axles: []traffic.Axle{{AtM: 2, LoadKN: 220}, {AtM: 4, LoadKN: 220}, {AtM: 14, LoadKN: 220}, {AtM: 16, LoadKN: 220}}}
	wagon := traffic.Vehicle{Name: "wagon", LengthM: 12, Axles: []traffic.Axle{{AtM: 1.5, LoadKN: 200}, {AtM: 3.3, LoadKN: 200}, {AtM: 8.7, LoadKN: 200}, {AtM: 10.5, LoadKN: 200}}}
	tr := &traffic.Train{Name: "long", Consist: []traffic.Group{{Vehicle: loco, Min: 1, Max: 1}, {Vehicle: wagon, Min: 1, Max: 40000}},
		Parts: []traffic.Part{{FromM: 0, ToM: 18, QKNPerM: 30, Mode: traffic.Whole}}}
	l, ld := prepared(b, x, ord, tr)
	var c Calculator
	var out []Extremes
	for b.Loop() {
		var err error
		if out, err = c.Envelope(l, ld, Options{}, out); err != nil {
			b.Fatal(err)
		}
	}
}

// TestLinesTooLargeRefused: lines whose refined grid could need more entries than 32-bit
// indexes hold are refused with the limit named, and lines just within it are accepted.
// Reference: the worst case (n + m(n-1)) m, one zero crossing per member and panel, worked
// by hand: 50,000 members on 2 points need 2,500,100,000 > 2,147,483,647; 40,000 need
// 1,600,080,000.
func TestLinesTooLargeRefused(t *testing.T) {
	x := []float64{0, 10}
	for _, c := range []struct {
		members int
		ok      bool
	}{{40000, true}, {50000, false}} {
		ord := make([][]float64, c.members)
		for i := range ord {
			ord[i] = []float64{0, 0}
		}
		_, err := NewLines(x, ord)
		if c.ok && err != nil {
			t.Errorf("%d members: %v", c.members, err)
		}
		if !c.ok && (err == nil || !strings.Contains(err.Error(), "2147483647")) {
			t.Errorf("%d members: got %v, want a refusal naming the limit", c.members, err)
		}
	}
}
