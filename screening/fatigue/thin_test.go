package fatigue

import (
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"pgregory.net/rapid"
)

// The turning points a passage gives without passing the points inside straight runs of one
// sense are those of its whole history (Turning of History), to the bit.
func TestTurningOfIsTurningOfHistory(t *testing.T) {
	proptest.Check(t, func(t *rapid.T) {
		x, eta := genLine(t)
		tr := genPassageTrain(t)
		l, p := prepared(t, x, eta, tr)
		var c Calculator
		for _, dir := range []Direction{LeftToRight, RightToLeft} {
			got := c.TurningOf(l, p, dir, nil)
			want := Turning(c.History(l, p, dir, nil), PassageTol(l, p), nil)
			if !slices.Equal(got, want) {
				t.Fatalf("%s: turning points %v, of the whole history %v", dir, got, want)
			}
		}
	})
}
