package floor

import (
	"sync"
	"testing"

	"github.com/trussfleet/trussfleet/screening/envelope"
)

// TestMemoChangesNothing: bridges whose panels repeat one another's, analysed by several
// analysers at once through one Memo, get exactly the effects and placements a fresh
// analyser without a Memo computes for each alone (the Memo keeps pure functions of the
// train and the panel lengths; the fresh analyser is the reference). Run with -race, it also
// checks the Memo's locking.
func TestMemoChangesNothing(t *testing.T) {
	ld := prepare(t, cooperE80(t))
	loads := []*envelope.Load{ld}
	bridges := []System{
		{PanelX: []float64{0, 5.5, 11, 16.5, 22}, TrussSpacingM: 5},
		{PanelX: []float64{0, 5.5, 11, 16.5, 22, 27.5}, TrussSpacingM: 5.2},
		{PanelX: []float64{10, 15.5, 21, 27, 33}, TrussSpacingM: 4.8, Tracks: 1, TrackOffsetsM: []float64{0.4}},
		{PanelX: []float64{0, 6, 12, 18}},
	}
	want := make([][]envelope.Extremes, len(bridges))
	els := make([][]Element, len(bridges))
	for i, sys := range bridges {
		var err error
		if els[i], _, err = sys.Elements(); err != nil {
			t.Fatal(err)
		}
		var fresh Analyser
		if want[i], err = fresh.Live(sys, els[i], loads); err != nil {
			t.Fatal(err)
		}
	}
	var memo Memo
	var wg sync.WaitGroup
	for range 4 {
		wg.Go(func() {
			a := Analyser{Memo: &memo}
			for round := range 3 {
				for i, sys := range bridges {
					a.Reset()
					got, err := a.Live(sys, els[i], loads)
					if err != nil {
						t.Error(err)
						return
					}
					for k := range got {
						if got[k] != want[i][k] {
							t.Errorf("round %d, bridge %d, %s: %+v through the memo, %+v alone", round, i, els[i][k].Label, got[k], want[i][k])
						}
					}
				}
			}
		})
	}
	wg.Wait()
	if len(memo.peaks) == 0 || len(memo.swept) == 0 {
		t.Errorf("the memo kept nothing: %d moments, %d sweeps", len(memo.peaks), len(memo.swept))
	}
}
