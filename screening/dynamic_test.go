package screening_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// TestMemberDynamics: each member's allowance against the formulas (from memory; EN 1991-2
// 6.4.5.2 and Table 6.2, AREMA chapter 15), on the through Pratt of span 48 m, 8 panels of
// 6 m (inclined end posts): L1-U1 is its hanger (it carries the floor beam at L1 alone), the
// bottom chord L2-L3 a main member.
func TestMemberDynamics(t *testing.T) {
	const ft = 0.3048
	aremaPct := func(lm float64) float64 { // percent of live load, L in ft
		l := lm / ft
		if l < 80 {
			return 40 - 3*l*l/1600
		}
		return 16 + 600/(l-30)
	}
	phi3 := func(l float64) float64 { return min(max(2.16/(math.Sqrt(l)-0.2)+0.73, 1), 2) }
	tests := []struct {
		name            string
		dyn             traffic.Dynamic
		lengths         string
		spacing         float64
		chord, hanger   float64
		source          string
		noRockingWanted bool
	}{
		{"AREMA with rocking, trusses 5 m apart", traffic.Dynamic{Kind: traffic.AREMASteel}, "", 5,
			1 + (aremaPct(48)+100/(5/ft))/100, 1 + (aremaPct(6)+100/(5/ft))/100, "L = span; hanger L = panel 6 m; rocking 100/S", false},
		{"AREMA without spacing", traffic.Dynamic{Kind: traffic.AREMASteel}, "", 0,
			1 + aremaPct(48)/100, 1 + aremaPct(6)/100, "no rocking term where S is not known", true},
		{"EN Phi3, trusses 5 m apart", traffic.Dynamic{Kind: traffic.Phi3}, "", 5,
			phi3(48), phi3(10), "main members L_phi = span; hanger as its cross girder, 2b = 10 m", false},
		{"EN Phi3 without spacing", traffic.Dynamic{Kind: traffic.Phi3}, "", 0,
			phi3(48), phi3(6), "hanger: the longer adjacent panel, 6 m", false},
		{"span for every member", traffic.Dynamic{Kind: traffic.Phi3}, screening.LengthsSpan, 5,
			phi3(48), phi3(48), "dynamic_lengths: span", false},
	}
	// the case: 1 + I = 1.207 at this span without rocking, 1.268 with S = 5 m
	if got := 1 + aremaPct(48)/100; math.Abs(got-1.207) > 0.001 {
		t.Fatalf("AREMA at 48 m: %g, want 1.207", got)
	}
	for _, tc := range tests {
		s := settings(t, axle("existing axle", 100), axle("proposed axle", 200))
		s.Dynamic, s.Lengths = tc.dyn, tc.lengths
		b := pratt48(0.5, 1, 0)
		if tc.spacing > 0 {
			b = pratt48(0, 0, tc.spacing, 0)
		}
		res := screening.ScreenBridge(b, s)
		c, h := member(t, res, "L2-L3"), member(t, res, "L1-U1")
		if math.Abs(c.Proposed.Impact-tc.chord) > 1e-12 || math.Abs(h.Proposed.Impact-tc.hanger) > 1e-12 { // source: tc.source
			t.Errorf("%s: chord %g, hanger %g; want %g, %g (%s)", tc.name, c.Proposed.Impact, h.Proposed.Impact, tc.chord, tc.hanger, tc.source)
		}
		if res.NoRocking != tc.noRockingWanted {
			t.Errorf("%s: NoRocking %v", tc.name, res.NoRocking)
		}
		for _, m := range res.Members {
			if m.Dynamic.Local != (m.Label == "L1-U1" || m.Label == "L7-U7") {
				t.Errorf("%s: %s local %v", tc.name, m.Label, m.Dynamic.Local)
			}
		}
	}
}

// TestDynamicText: the member's allowance is described with its length and why.
func TestDynamicText(t *testing.T) {
	s := settings(t, axle("existing axle", 100), axle("proposed axle", 200))
	s.Dynamic = traffic.Dynamic{Kind: traffic.AREMASteel}
	res := screening.ScreenBridge(pratt48(0, 0, 5, 0), s)
	h := member(t, res, "L1-U1")
	if got, want := screening.DynamicText(h, h.Proposed), "arema, length 6.00 m (hanger: longer adjacent panel), rocking with trusses 5.00 m apart"; got != want {
		t.Errorf("hanger: %q, want %q", got, want)
	}
}
