package proptest

import (
	"flag"
	"testing"

	"pgregory.net/rapid"
)

// TestSeedPinned: with the variable set, two checks draw the same first case, and the flag
// holds the seed.
func TestSeedPinned(t *testing.T) {
	if f := flag.Lookup("rapid.seed"); f.Value.String() != "0" {
		t.Skip("a seed was given on the command line")
	}
	t.Setenv(SeedVariable, "12345")
	var first []int
	for range 2 {
		drawn := false
		Check(t, func(rt *rapid.T) {
			v := rapid.Int().Draw(rt, "v")
			if !drawn {
				first, drawn = append(first, v), true
			}
		})
	}
	if got := flag.Lookup("rapid.seed").Value.String(); got != "12345" {
		t.Fatalf("rapid.seed = %s, want 12345", got)
	}
	if first[0] != first[1] {
		t.Fatalf("first cases differ: %d, %d", first[0], first[1])
	}
}
