package screening_test

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// axle is a train of one axle of p kN.
func axle(name string, p float64) *traffic.Train {
	return &traffic.Train{Name: name, Consist: []traffic.Group{{Vehicle: traffic.Vehicle{Name: "axle", LengthM: 1,
		Axles: []traffic.Axle{{AtM: 0.5, LoadKN: p}}}, Min: 1, Max: 1}}}
}

func settings(t *testing.T, ex, pr *traffic.Train) *screening.Settings {
	t.Helper()
	e, err := screening.NewScenario("existing", []*traffic.Train{ex})
	if err != nil {
		t.Fatal(err)
	}
	p, err := screening.NewScenario("proposed", []*traffic.Train{pr})
	if err != nil {
		t.Fatal(err)
	}
	return &screening.Settings{Existing: e, Proposed: p, Method: rating.WorkingStress,
		Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2}}
}

// TestSingleAxleClosedForm: a Pratt truss, span 48 m, 8 panels, depth 6 m. For the bottom
// chord L2-L3 the moment centre is U2 at x = 12 m, so a single axle P gives at most
// P·12·36/48/6 = 1.5 P (the panel-point moment over the depth, method of sections), and a
// dead load q gives q·12·36/2/6 = 36 q (simple beam under uniform load, M = q·x(L−x)/2).
func TestSingleAxleClosedForm(t *testing.T) {
	const q, share, cap = 10.0, 0.5, 600.0
	b := screening.Bridge{ID: "T-1", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		TrussShare: share, Tracks: 1, DeadLoadKNPerM: q,
		Members: map[string]rating.Member{"L2-L3": {CapacityTension: cap, CapacityCompression: cap}}}
	res := screening.ScreenBridge(b, settings(t, axle("existing axle", 100), axle("proposed axle", 400)))
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	m := memberNamed(res, "L2-L3")
	dead, lex, lpr := 36*q, share*100*1.5, share*400*1.5
	rfEx, rfPr := (cap-dead)/lex, (cap-dead)/lpr // working-stress rating equation, no dynamic allowance
	near := func(a, b float64) bool { return math.Abs(a-b) < 1e-9*(1+math.Abs(b)) }
	if !near(m.Dead, dead) || !near(m.Existing.Max.Value, lex) || !near(m.Proposed.Max.Value, lpr) || m.Proposed.Min.Value != 0 {
		t.Fatalf("D %g, L existing %g, L proposed %g (min %g); want %g, %g, %g", m.Dead, m.Existing.Max.Value, m.Proposed.Max.Value, m.Proposed.Min.Value, dead, lex, lpr)
	}
	// The axle stands over L2 (x = 12 m) at the extreme.
	if p := m.Proposed.Max; !p.Loaded || math.Abs(p.HeadM-12-0.5*dirSign(p.Direction)) > 1e-6 {
		t.Errorf("placement %+v, want the axle at x = 12 m", p)
	}
	a := m.Assessment
	if !near(a.WorstEx.RF, rfEx) || !near(a.WorstPr.RF, rfPr) || !a.Has(rating.Exceeds) || !a.Has(rating.Worse) {
		t.Errorf("RF %g → %g, flags %v; want %g → %g, exceeds and worse", a.WorstEx.RF, a.WorstPr.RF, a.Flags, rfEx, rfPr)
	}
	// The other members hold no capacity: each one whose dead plus live force acts in a sense
	// the axle loads is unrated, counted in the summary and not flagged
	// (thresholds.flag_unrated off). Counted here from the envelopes and the dead loads.
	loaded := 0
	for _, r := range res.Members {
		p := r.Proposed
		if r.Label != "L2-L3" && (p.Max.Value > 0 && r.Dead+p.Max.Value*p.Impact > 0 || p.Min.Value < 0 && r.Dead+p.Min.Value*p.Impact < 0) {
			loaded++
		}
	}
	if res.Summary.Worst < 0 || res.Members[res.Summary.Worst].Label != "L2-L3" || res.Summary.FlagCounts[rating.NoCapacity] != 0 ||
		loaded == 0 || res.Summary.Unrated != loaded {
		t.Errorf("summary %+v, want %d unrated and no no-capacity flag", res.Summary, loaded)
	}
	if !near(res.Summary.Headroom, rfPr) || res.Governing == nil || res.Governing.Train != "proposed axle" {
		t.Errorf("headroom %g, governing %+v", res.Summary.Headroom, res.Governing)
	}
}

// dirSign: the front of a train running left to right is ahead (larger x) of its axles.
func dirSign(d interface{ String() string }) float64 {
	if d.String() == "left-to-right" {
		return 1
	}
	return -1
}

func TestBadBridgeFailsAlone(t *testing.T) {
	set := settings(t, axle("a", 100), axle("b", 200))
	good := screening.Bridge{ID: "G", Truss: truss.Params{Type: "warren", SpanM: 30, Panels: 5, DepthM: 4}, TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 5}
	cases := map[string]screening.Bridge{
		"odd panels":     {ID: "B1", Truss: truss.Params{Type: "pratt", SpanM: 30, Panels: 5, DepthM: 4}, TrussShare: 0.5, Tracks: 1},
		"unknown member": {ID: "B2", Truss: good.Truss, TrussShare: 0.5, Tracks: 1, Members: map[string]rating.Member{"L9-L10": {CapacityTension: 1}}},
		"no share":       {ID: "B3", Truss: good.Truss, Tracks: 1},
	}
	bridges := []screening.Bridge{good}
	for _, b := range cases {
		bridges = append(bridges, b)
	}
	res, err := screening.ScreenAll(context.Background(), bridges, set, 3)
	if err != nil {
		t.Fatal(err)
	}
	if res[0].Err != nil || len(res[0].Members) != 19 {
		t.Errorf("good bridge: %v, %d members", res[0].Err, len(res[0].Members))
	}
	for _, r := range res[1:] {
		if r.Err == nil {
			t.Errorf("%s: no error", r.BridgeID)
		}
	}
}

func TestScreenAllStopsWhenCancelled(t *testing.T) {
	set := settings(t, axle("a", 100), axle("b", 200))
	b := screening.Bridge{ID: "G", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6}, TrussShare: 0.5, Tracks: 1}
	bridges := make([]screening.Bridge, 200)
	for i := range bridges {
		bridges[i] = b
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := screening.ScreenAll(ctx, bridges, set, 2); !errors.Is(err, context.Canceled) {
		t.Fatalf("got %v, want context.Canceled", err)
	}
	res, err := screening.ScreenAll(context.Background(), bridges, set, 2)
	if err != nil || len(res) != 200 || res[199].Err != nil {
		t.Fatalf("%v, %d results", err, len(res))
	}
}

// TestNonFiniteFailsTheBridge: a capacity or allowance that makes no number never reads as
// "no rating factor": the bridge fails with the reason.
func TestNonFiniteFailsTheBridge(t *testing.T) {
	set := settings(t, axle("a", 100), axle("b", 200))
	set.Dynamic = traffic.Dynamic{Kind: traffic.FixedDynamic, Fraction: math.NaN()}
	b := screening.Bridge{ID: "N", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6}, TrussShare: 0.5, Tracks: 1}
	if r := screening.ScreenBridge(b, set); r.Err == nil {
		t.Errorf("NaN allowance: no error")
	}
	set.Dynamic = traffic.Dynamic{}
	b.Members = map[string]rating.Member{"L2-L3": {CapacityTension: math.Inf(1) / math.Inf(1), CapacityCompression: 1}}
	if r := screening.ScreenBridge(b, set); r.Err != nil {
		t.Errorf("a NaN capacity is no capacity (HasCapacity): %v", r.Err)
	}
}

// TestStoredRatingBesideCapacity: a member holding a stored rating factor for one sense and a
// capacity for the other is rated in both, each from its own source. Pratt, span 48 m,
// 8 panels, depth 6 m, q = 10 kN/m, truss share 0.5. The vertical L3-U3 carries the shear of
// panel 3–4 (method of sections): ordinates +0.125, +0.25, +0.375 at L1..L3, −0.5, −0.375,
// −0.25, −0.125 at L4..L7, so D = 10·6·(0.75 − 1.25) = −30 kN. Reference axle 100 kN:
// L_t = 0.5·100·0.375 = 18.75, L_c = 0.5·100·0.5 = 25; D + L_t = −11.25, D − L_c = −55:
// compression governs, so the stored RF 2.0 rates compression. Proposed axle 400 kN:
// L_t = 75, L_c = 100; compression RF = 2.0·25/100 = 0.5 (load-effect ratio), tension from
// the capacity 500 kN: (500 + 30)/75 = 7.0667 (working stress, no dynamic allowance).
func TestStoredRatingBesideCapacity(t *testing.T) {
	ref := axle("reference axle", 100)
	s := settings(t, ref, axle("proposed axle", 400))
	ld, err := envelope.Prepare(ref)
	if err != nil {
		t.Fatal(err)
	}
	s.References = map[string]*envelope.Load{"reference axle": ld}
	b := screening.Bridge{ID: "T-4", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 10,
		Members: map[string]rating.Member{"L3-U3": {CapacityTension: 500, RatingFactor: 2.0, ReferenceTrain: "reference axle"}}}
	res := screening.ScreenBridge(b, s)
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	for _, m := range res.Members {
		if m.Label != "L3-U3" {
			continue
		}
		a := m.Assessment
		want := map[rating.Sense]struct {
			rf    float64
			basis string
		}{rating.Tension: {530.0 / 75, rating.FromCapacity}, rating.Compression: {0.5, rating.FromRatio}}
		if math.Abs(m.Dead+30) > 1e-9 || len(a.Proposed) != 2 || len(a.MissingPr) != 0 {
			t.Fatalf("D %g, proposed %+v, missing %v", m.Dead, a.Proposed, a.MissingPr)
		}
		for _, f := range a.Proposed {
			if w := want[f.Sense]; math.Abs(f.RF-w.rf) > 1e-9*(1+w.rf) || f.Basis != w.basis {
				t.Errorf("%v: RF %g (%s), want %g (%s)", f.Sense, f.RF, f.Basis, w.rf, w.basis)
			}
		}
		return
	}
	t.Fatal("no L3-U3")
}
