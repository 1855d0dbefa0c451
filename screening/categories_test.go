package screening_test

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/screening/truss/trusstest"
)

// categoryBridge is a Pratt span of 48 m (8 panels, 6 m deep), one track centred between two
// trusses, 30 kN/m of dead load per truss, dynamic allowance Phi3, and each member's
// capacity in each sense set from its own demands: the dead force acting in that sense plus
// 1.02 times the largest live force with allowance of the categories D4 dominates (so those
// leave RF >= 1.02), plus 1 kN. It returns the bridge, its settings, and each member's live
// envelope under every category's own train (computed here, straight from the category's
// train, not from the shared unit geometries the screening sweeps).
func categoryBridge(t *testing.T) (screening.Bridge, *screening.Settings, map[string][]envelope.Extremes, []float64, float64) {
	t.Helper()
	p := truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6}
	lines, ords := influenceLines(t, p)
	dead := make([]float64, len(lines.Members))
	const q, share = 30.0, 0.5
	for i, m := range lines.Members {
		dead[i] = analysis.DeadLoad(lines.X, m.Ordinates, q)
	}
	dyn := traffic.Dynamic{Kind: traffic.Phi3}
	impact := dyn.Factor(48)
	byCat := map[string][]envelope.Extremes{}
	for _, c := range network.Categories {
		ext, err := envelope.Compute(lines.X, ords, c.Train(), envelope.Options{Share: share})
		if err != nil {
			t.Fatal(err)
		}
		byCat[c.Name] = ext
	}
	d4, _ := network.ByName("D4")
	members := map[string]rating.Member{}
	for i, m := range lines.Members {
		lt, lc := 0.0, 0.0
		for _, c := range network.Categories {
			if d4.Dominates(c) {
				lt = math.Max(lt, byCat[c.Name][i].Max.Value*impact)
				lc = math.Max(lc, -byCat[c.Name][i].Min.Value*impact)
			}
		}
		members[m.Label] = rating.Member{
			CapacityTension:     math.Max(dead[i], 0) + 1.02*lt + 1,
			CapacityCompression: math.Max(-dead[i], 0) + 1.02*lc + 1,
		}
	}
	b := screening.Bridge{ID: "CAT-1", Truss: p, TrussShare: share, Tracks: 1, DeadLoadKNPerM: q, Members: members}
	s := settings(t, axle("existing axle", 100), axle("proposed axle", 200))
	s.Dynamic = dyn
	// Every member at the span's allowance (hangers' own lengths are checked in
	// dynamic_test.go), so that the worked RFs here take one 1 + I.
	s.Lengths = screening.LengthsSpan
	var err error
	if s.Network, err = screening.NewNetworkTrains(); err != nil {
		t.Fatal(err)
	}
	return b, s, byCat, dead, impact
}

// TestBridgeCarriesD4NotE4: a bridge built to carry D4 (capacities from its own demands, in
// the test) and not E4 is classified so: its highest category is D4 alone, E4 and E5 are not
// carried, and each category's lowest RF is the one worked here from the working-stress
// rating equation RF = (C - D) / (L (1 + I)) (DOMAIN.md, common practice) over every member.
func TestBridgeCarriesD4NotE4(t *testing.T) {
	b, s, byCat, dead, impact := categoryBridge(t)
	res := screening.ScreenBridge(b, s)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	nr := res.Network
	if nr == nil {
		t.Fatal("no network result")
	}
	// The worked RF of each category: the lowest over members and senses.
	rfOf := func(cat string) float64 {
		low := math.Inf(1)
		for i, m := range res.Members {
			c := b.Members[m.Label]
			e := byCat[cat][i]
			if l := e.Max.Value * impact; l > 0 {
				low = math.Min(low, (c.CapacityTension-dead[i])/l)
			}
			if l := -e.Min.Value * impact; l > 0 {
				low = math.Min(low, (c.CapacityCompression+dead[i])/l)
			}
		}
		return low
	}
	if rf := rfOf("E4"); !(rf < 1) {
		t.Fatalf("test bridge: E4's RF %v, want below 1 (the bridge must not carry E4)", rf)
	}
	for k, c := range nr.Categories {
		want := rfOf(c.Category)
		if math.Abs(c.RF-want) > 1e-9*want {
			t.Errorf("%s: RF %v, worked %v", c.Category, c.RF, want)
		}
		if c.Pass != (want >= 1) {
			t.Errorf("%s: pass %v with RF %v", c.Category, c.Pass, want)
		}
		d4, _ := network.ByName("D4")
		if wantCarried := d4.Dominates(network.Categories[k]); c.Carried != wantCarried {
			t.Errorf("%s: carried %v, want %v", c.Category, c.Carried, wantCarried)
		}
	}
	if len(nr.Highest) != 1 || nr.Highest[0] != "D4" {
		t.Errorf("highest categories %v, want [D4]", nr.Highest)
	}
}

// TestERatingIsEighty: a member's E rating is 80 x its RF under Cooper E80 exactly (AREMA
// practice, from memory: live effects are linear in the loads), here against the RF of the
// same bridge screened with Cooper E80 as its proposed traffic; the bridge's E rating is its
// worst member's.
func TestERatingIsEighty(t *testing.T) {
	b, s, _, _, _ := categoryBridge(t)
	res := screenUnderE80(t, b, s)
	low, at := math.Inf(1), ""
	for i, m := range res.Members {
		a := m.Assessment
		if !a.HasPr {
			if !math.IsNaN(res.Network.MemberE[i]) {
				t.Errorf("%s: E rating %v without a rating", m.Label, res.Network.MemberE[i])
			}
			continue
		}
		if e := res.Network.MemberE[i]; e != 80*a.WorstPr.RF { // exact: definition of the E rating
			t.Errorf("%s: E rating %v, 80 x RF under E80 = %v", m.Label, e, 80*a.WorstPr.RF)
		}
		if res.Network.MemberE[i] < low {
			low, at = res.Network.MemberE[i], m.Label
		}
	}
	if res.Network.ERating != low || res.Network.EMember != at {
		t.Errorf("bridge E rating %v (%s), worst member's %v (%s)", res.Network.ERating, res.Network.EMember, low, at)
	}
	if res.Network.ERating != 80*res.Summary.WorstPr.RF {
		t.Errorf("bridge E rating %v, 80 x the bridge's RF under E80 %v", res.Network.ERating, 80*res.Summary.WorstPr.RF)
	}
}

// TestCategoryLimits: in the D4 bridge, a hanger (its influence line spans two panels: one
// bogie group governs) is limited by the axle load and a mid-span bottom chord (a long
// triangle: the full train) by the mass per metre (DOMAIN.md, the floor system: common
// practice).
func TestCategoryLimits(t *testing.T) {
	b, s, _, _, _ := categoryBridge(t)
	// Capacities far above the demands except the member under test, so that it limits.
	for _, tc := range []struct {
		member string
		want   network.Limit
	}{{"L1-U1", network.LimitAxleLoad}, {"L3-L4", network.LimitMassPerMetre}} {
		mem := map[string]rating.Member{}
		for l, m := range b.Members {
			if l != tc.member {
				m.CapacityTension, m.CapacityCompression = 1e5, 1e5
			}
			mem[l] = m
		}
		bb := b
		bb.Members = mem
		res := screening.ScreenBridge(bb, s)
		if res.Err != nil {
			t.Fatal(res.Err)
		}
		for _, c := range res.Network.Categories {
			if c.Member != tc.member || c.Limit != tc.want {
				t.Errorf("%s: limited by %s (%s), want %s (%s)", c.Category, c.Member, c.Limit, tc.member, tc.want)
			}
		}
	}
}

// influenceLines are the truss's influence lines and their ordinates, member by member.
func influenceLines(tb testing.TB, p truss.Params) (*analysis.Lines, [][]float64) {
	tb.Helper()
	return trusstest.InfluenceLines(tb, p)
}
