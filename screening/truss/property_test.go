package truss_test

import (
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/screening/truss/trusstest"
	"pgregory.net/rapid"
)

// TestDeterminateCount checks m + 3 = 2j for random valid parameters of every type: the
// counting condition for a statically determinate plane truss on a pin and a roller (common
// practice). Stability is checked by solving, in the analysis package's tests. A deck Warren
// for example bears on its upper chord: the count holds the same.
func TestDeterminateCount(t *testing.T) {
	proptest.Check(t, func(rt *rapid.T) {
		p := trusstest.RandomParams(rt)
		tr, err := truss.Build(p)
		if err != nil {
			rt.Fatalf("%+v: %v", p, err)
		}
		if m, j := len(tr.Members), len(tr.Joints); m+3 != 2*j {
			rt.Fatalf("%+v: m=%d j=%d, m+3 != 2j", p, m, j)
		}
	})
}
