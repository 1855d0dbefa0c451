package screening_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening"
	"pgregory.net/rapid"
)

// TestCombineBruteForce: Presence.Combine against every arrangement written out (from memory:
// EN 1991-2, each track alone, any two tracks fully loaded, or 0.75 × every track with three
// or more; AREMA, factors 1, 1, 1/2, 1/4 given to the tracks in every order).
func TestCombineBruteForce(t *testing.T) {
	proptest.Check(t, func(rt *rapid.T) {
		n := rapid.IntRange(1, 5).Draw(rt, "tracks")
		c := make([]float64, n)
		for i := range c {
			c[i] = rapid.Float64Range(0, 1000).Draw(rt, "c")
		}
		f := make([]float64, n)
		// EN 1991-2
		want := 0.0
		for i := range c {
			want = max(want, c[i])
			for j := i + 1; j < n; j++ {
				want = max(want, c[i]+c[j])
			}
		}
		if n >= 3 {
			sum := 0.0
			for _, v := range c {
				sum += v
			}
			want = max(want, 0.75*sum)
		}
		if got := screening.PresenceEN.Combine(c, f); math.Abs(got-want) > 1e-9*(1+want) || math.Abs(dot(f, c)-got) > 1e-9*(1+want) {
			rt.Fatalf("EN: %v gives %g (factors %v), brute force %g", c, got, f, want)
		}
		// AREMA: every permutation of the factors over the tracks
		factors := []float64{1, 1, 0.5, 0.25, 0}
		want = 0
		perm(n, func(p []int) {
			s := 0.0
			for k, t := range p {
				s += factors[min(k, 4)] * c[t]
			}
			want = max(want, s)
		})
		if got := screening.PresenceAREMA.Combine(c, f); math.Abs(got-want) > 1e-9*(1+want) || math.Abs(dot(f, c)-got) > 1e-9*(1+want) {
			rt.Fatalf("AREMA: %v gives %g (factors %v), brute force %g", c, got, f, want)
		}
	})
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

// perm calls f with every permutation of 0..n-1.
func perm(n int, f func([]int)) {
	p := make([]int, n)
	used := make([]bool, n)
	var rec func(k int)
	rec = func(k int) {
		if k == n {
			f(p)
			return
		}
		for i := range n {
			if !used[i] {
				used[i], p[k] = true, i
				rec(k + 1)
				used[i] = false
			}
		}
	}
	rec(0)
}
