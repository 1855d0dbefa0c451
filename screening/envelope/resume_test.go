package envelope

import (
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"pgregory.net/rapid"
)

// TestResumedSweepsEqualFullSweeps: sweeps of a variable consist that resume where the
// previous count left off give exactly (bit for bit, placements included) what sweeping
// every count from the beginning gives. Reference: the full sweep of each count, an
// independent run of the same event sweep with no state carried between counts.
func TestResumedSweepsEqualFullSweeps(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, ord := genLines(t)
		tr := genTrain(t)
		l, ld := prepared(t, x, ord, tr)
		var resumed, full Calculator
		got, err := resumed.Envelope(l, ld, Options{}, nil)
		if err != nil {
			t.Fatal(err)
		}
		want, err := full.envelope(l, ld, Options{}, nil, plainSweeps{fullSweeps: true})
		if err != nil {
			t.Fatal(err)
		}
		for i := range want {
			if got[i] != want[i] {
				t.Fatalf("member %d: resumed sweeps give %+v, full sweeps %+v", i, got[i], want[i])
			}
		}
	})
}
