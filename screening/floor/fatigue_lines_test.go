package floor

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"pgregory.net/rapid"
)

// TestFloorBeamFatigueShares: two tracks at +1.5 m and -1.5 m (towards truss A positive) on
// trusses 8 m apart, stringer lines 1.5 m apart: track 1's lines stand 1.75 and 3.25 m from
// truss A, track 2's 4.75 and 6.25 m. With both tracks loaded the largest moment per unit
// reaction stands under an inner line (3.25 or 4.75 m, symmetric; the first found, 3.25 m).
// There each track's share by statics (a simple beam's moment at y from P at x: P x (b - y) / b
// left of y, P y (b - x) / b right of it; each line P = 1/2): track 1: 0.5 (1.75 + 3.25) 4.75 /
// 8 = 1.484375; track 2: 0.5 x 3.25 ((8 - 4.75) + (8 - 6.25)) / 8 = 1.015625.
// Their sum is the moment the strength check rates with both tracks loaded (liveCoefficients:
// the same statics by another path).
func TestFloorBeamFatigueShares(t *testing.T) {
	sys := System{PanelX: []float64{0, 6, 12}, Tracks: 2, TrussSpacingM: 8, TrackOffsetsM: []float64{1.5, -1.5}, StringerSpacingM: 1.5}
	fl, err := sys.FatigueLine("FB1", DefaultLengths)
	if err != nil {
		t.Fatal(err)
	}
	if fl.SectionM != 3.25 || math.Abs(fl.Shares[0]-1.484375) > 1e-12 || math.Abs(fl.Shares[1]-1.015625) > 1e-12 {
		t.Errorf("section %v, shares %v; want 3.25 m, [1.484375 1.015625]", fl.SectionM, fl.Shares)
	}
	m, _ := liveCoefficients(8, sys.stringerLinesChecked(t))
	if math.Abs(fl.Shares[0]+fl.Shares[1]-m) > 1e-12 {
		t.Errorf("shares sum to %v, the strength check's moment per unit reaction is %v", fl.Shares[0]+fl.Shares[1], m)
	}
	// The reaction line: a triangle of height 1 over the two panels (common practice).
	if len(fl.X) != 3 || fl.X[0] != 0 || fl.X[1] != 6 || fl.X[2] != 12 || fl.Eta[1] != 1 || fl.Eta[0] != 0 || fl.Eta[2] != 0 {
		t.Errorf("line %v %v", fl.X, fl.Eta)
	}
	// Errors name the element: a stringer beyond the panels, a floor beam without the spacing.
	if _, err := sys.FatigueLine("S3-1", DefaultLengths); err == nil {
		t.Error("S3-1 on two tracks: no error")
	}
	sys.TrussSpacingM, sys.TrackOffsetsM = 0, nil
	if _, err := sys.FatigueLine("FB1", DefaultLengths); err == nil {
		t.Error("floor beam without the truss spacing: no error")
	}
}

// stringerLinesChecked is the system's stringer lines after its defaults are filled in.
func (s System) stringerLinesChecked(t *testing.T) [][2]float64 {
	t.Helper()
	c, _, err := s.check()
	if err != nil {
		t.Fatal(err)
	}
	return c.stringerLines()
}

// TestFatigueLinesAgreeWithLive: for random single-track floor systems and axle trains, two
// computations of one effect agree. A floor beam's moment history of one passage (the passage
// walk of screening/fatigue on its fatigue line, times its share) peaks at the live moment
// the strength check rates (Analyser.Live: the exact envelope of its reaction line times the
// statics across the beam). A stringer's mid-span moment never exceeds the absolute largest
// moment anywhere along the span that the strength check rates (MaxMoment), and reaches it
// for a single axle (P L / 4 at mid-span, textbook).
func TestFatigueLinesAgreeWithLive(t *testing.T) {
	proptest.Check(t, func(rt *rapid.T) {
		tr := drawAxles(rt, 5)
		n := len(tr.Consist[0].Vehicle.Axles)
		panels := rapid.IntRange(2, 6).Draw(rt, "panels")
		x := []float64{0}
		for range panels {
			x = append(x, x[len(x)-1]+rapid.Float64Range(3, 8).Draw(rt, "panel"))
		}
		b := rapid.Float64Range(4, 9).Draw(rt, "truss spacing")
		st := rapid.Float64Range(1.2, 2).Draw(rt, "stringer spacing")
		e := rapid.Float64Range(-1, 1).Draw(rt, "offset") * (b - st) / 2
		sys := System{PanelX: x, TrussSpacingM: b, StringerSpacingM: st, TrackOffsetsM: []float64{e}}
		els, live := liveUnder(t, sys, tr)
		ft, err := fatigue.PrepareTrain(tr)
		if err != nil {
			rt.Fatal(err)
		}
		var c fatigue.Calculator
		for i, el := range els {
			if el.Effect != Moment {
				continue
			}
			fl, err := sys.FatigueLine(el.Element, DefaultLengths)
			if err != nil {
				rt.Fatal(err)
			}
			line, err := fatigue.NewLine(fl.X, fl.Eta)
			if err != nil {
				rt.Fatal(err)
			}
			peak := 0.0
			for _, dir := range []fatigue.Direction{fatigue.LeftToRight, fatigue.RightToLeft} {
				for _, pt := range c.History(line, ft, dir, nil) {
					peak = max(peak, pt.Value*fl.Shares[0])
				}
			}
			want := live[i].Max.Value
			switch {
			case el.Kind == KindFloorBeam && math.Abs(peak-want) > 1e-9*max(want, 1):
				rt.Fatalf("%s: history peak %.12g, strength's live moment %.12g", el.Label, peak, want)
			case el.Kind == KindStringer && peak > want*(1+1e-9)+1e-9:
				rt.Fatalf("%s: mid-span peak %.12g above the span's largest moment %.12g", el.Label, peak, want)
			case el.Kind == KindStringer && n == 1 && math.Abs(peak-want) > 1e-9*max(want, 1):
				rt.Fatalf("%s: one axle's mid-span peak %.12g, largest moment %.12g (P L / 4 at mid-span)", el.Label, peak, want)
			}
		}
	})
}
