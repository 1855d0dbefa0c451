// Package proptest runs the project's property tests (rapid) with the seed a run pins.
//
// A property test draws new cases on every run. That is how it finds the rare case, but it
// makes a failure hard to repeat on another machine. When TRUSSFLEET_PROPERTY_SEED is set
// (CI sets it from the commit), every property test starts from that seed, so a run on a
// commit draws the same cases wherever it runs and a failure can be replayed with the same
// variable. A seed given on the command line (-rapid.seed) wins; without either, each run
// draws afresh, as rapid does by default.
package proptest

import (
	"flag"
	"os"
	"strconv"
	"sync"
	"testing"

	"pgregory.net/rapid"
)

// SeedVariable names the environment variable that pins the seed.
const SeedVariable = "TRUSSFLEET_PROPERTY_SEED"

var pinOnce sync.Once

// Check runs prop as rapid.Check does, from the pinned seed if there is one.
func Check(t *testing.T, prop func(*rapid.T)) {
	t.Helper()
	pinOnce.Do(func() { pin(t) })
	rapid.Check(t, prop)
}

// pin sets rapid's seed flag from the environment unless the command line gave one.
func pin(t *testing.T) {
	s := os.Getenv(SeedVariable)
	if s == "" {
		return
	}
	f := flag.Lookup("rapid.seed")
	if f == nil {
		t.Fatalf("%s is set, but rapid has no -rapid.seed flag", SeedVariable)
	}
	if f.Value.String() != "0" {
		return
	}
	if _, err := strconv.ParseUint(s, 10, 64); err != nil {
		t.Fatalf("%s=%q: not a decimal seed: %v", SeedVariable, s, err)
	}
	if err := flag.Set("rapid.seed", s); err != nil {
		t.Fatalf("%s=%q: %v", SeedVariable, s, err)
	}
}
