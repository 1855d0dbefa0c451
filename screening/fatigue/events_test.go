package fatigue

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"pgregory.net/rapid"
)

// TestHeapMergeIsTheScan: the heap merge that lines with many kinks take lists the same
// events, in the same order, as the scan of every kink's head (the two are independent
// formulations of one merge). Positions are drawn on a coarse grid, so that events at equal
// positions (the order among them: earlier kinks first) occur often.
func TestHeapMergeIsTheScan(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		nk := rapid.IntRange(1, 40).Draw(t, "kinks")
		k := &kinks{}
		x := 0.0
		for range nk {
			x += float64(rapid.IntRange(0, 4).Draw(t, "dx")) // 0: a jump's two kinks at one position
			k.x = append(k.x, x)
		}
		tr := &Train{}
		d := 0.0
		for range rapid.IntRange(0, 30).Draw(t, "items") {
			d += float64(rapid.IntRange(0, 3).Draw(t, "gap"))
			tr.items = append(tr.items, item{d: d})
		}
		var c Calculator
		c.heapEvents(k, tr)
		heap := append([]event(nil), c.events...)
		c.events = c.events[:0]
		c.scanEvents(k, tr)
		if len(heap) != len(c.events) {
			t.Fatalf("heap merge gave %d events, the scan %d", len(heap), len(c.events))
		}
		for i := range heap {
			if heap[i] != c.events[i] {
				t.Fatalf("event %d: heap merge %+v, scan %+v", i, heap[i], c.events[i])
			}
		}
	})
}

// BenchmarkBuildEvents merges the events of the example freight train (252 axles) over
// lines of a few and of many kinks, by the scan and by the heap: heapMergeKinks is where
// the heap starts to pay.
func BenchmarkBuildEvents(b *testing.B) {
	t, err := traffic.ParseSpec("northmoor-freight-proposed", configs.Trains())
	if err != nil {
		b.Fatal(err)
	}
	tr, err := PrepareTrain(t)
	if err != nil {
		b.Fatal(err)
	}
	for _, nk := range []int{3, 6, 8, 12, 24} {
		k := &kinks{}
		for j := range nk {
			k.x = append(k.x, 5*float64(j)+math.Sqrt(float64(j))) // no two alike
		}
		var c Calculator
		b.Run("scan-"+itoa(nk), func(b *testing.B) {
			for b.Loop() {
				c.events = c.events[:0]
				c.scanEvents(k, tr)
			}
		})
		b.Run("heap-"+itoa(nk), func(b *testing.B) {
			for b.Loop() {
				c.events = c.events[:0]
				c.heapEvents(k, tr)
			}
		})
	}
}

func itoa(n int) string { return string(rune('0'+n/10)) + string(rune('0'+n%10)) }
