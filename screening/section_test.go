package screening_test

import (
	"math"
	"slices"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// TestLeverShares: a track e from the centre line between trusses b apart puts 1/2 + e/b of
// its load on A and 1/2 - e/b on B (lever rule: moments about the other truss).
func TestLeverShares(t *testing.T) {
	tests := []struct {
		name       string
		e, b       float64
		wantA, wan float64
		source     string
	}{
		{"centred", 0, 5, 0.5, 0.5, "symmetry"},
		{"over truss A", 2.5, 5, 1, 0, "lever rule: the load stands on A's line"},
		{"towards B", -1.25, 5, 0.25, 0.75, "lever rule: 3.75/5 on B"},
		{"outside A", 5, 5, 1.5, -0.5, "lever rule: the track 2.5 m beyond A lifts B by 2.5/5"},
	}
	for _, tc := range tests {
		a, b := screening.LeverShares(tc.e, tc.b)
		if math.Abs(a-tc.wantA) > 1e-12 || math.Abs(b-tc.wan) > 1e-12 || math.Abs(a+b-1) > 1e-12 { // source: tc.source
			t.Errorf("%s: shares %g, %g; want %g, %g (%s)", tc.name, a, b, tc.wantA, tc.wan, tc.source)
		}
	}
	br := screening.Bridge{TrussSpacingM: 6, TrackOffsetsM: []float64{-2.4, 1.5}}
	// lever rule: A 1/2 - 2.4/6 = 0.1 and 1/2 + 1.5/6 = 0.75; B the rest of each track's load
	if a, b := br.TrackShares("A"), br.TrackShares("B"); !near(a, []float64{0.1, 0.75}) || !near(b, []float64{0.9, 0.25}) {
		t.Errorf("track shares A %v, B %v", a, b)
	}
	legacy := screening.Bridge{TrussShare: 0.5, Tracks: 3}
	if got := legacy.TrackShares("B"); !slices.Equal(got, []float64{0.5, 0.5, 0.5}) {
		t.Errorf("a row without a cross-section gives %v, want three copies of its truss share", got)
	}
	if got := br.TrackShares("C"); got != nil {
		t.Errorf("truss C gives %v, want nil", got)
	}
}

func near(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-12 {
			return false
		}
	}
	return true
}

// pratt48 is the Pratt truss of TestSingleAxleClosedForm: a single axle P over L2 gives the
// bottom chord L2-L3 the force 1.5 P (method of sections), and never compression.
func pratt48(share float64, tracks int, spacing float64, offsets ...float64) screening.Bridge {
	return screening.Bridge{ID: "X-1", Truss: truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
		TrussShare: share, Tracks: tracks, TrussSpacingM: spacing, TrackOffsetsM: offsets, DeadLoadKNPerM: 20,
		Members: map[string]rating.Member{"L2-L3": {CapacityTension: 3000, CapacityCompression: 3000}}}
}

func member(t *testing.T, res screening.Result, label string) screening.MemberResult {
	t.Helper()
	if res.Err != nil {
		t.Fatal(res.Err)
	}
	for _, m := range res.Members {
		if m.Label == label {
			return m
		}
	}
	t.Fatalf("no member %s", label)
	return screening.MemberResult{}
}

// TestSymmetricTwoTracksAsAverageShare: two tracks at ±e between the trusses load each truss
// with shares 1/2 + e/b and 1/2 - e/b, which sum to 1: the same as the average share 0.5 on
// both tracks (lever rule), so the results equal those of the row giving truss_share 0.5 and
// tracks 2, member by member, to rounding.
func TestSymmetricTwoTracksAsAverageShare(t *testing.T) {
	s := settings(t, wagons("today", 180), wagons("heavier", 240))
	legacy := screening.ScreenBridge(pratt48(0.5, 2, 0), s)
	section := screening.ScreenBridge(pratt48(0, 0, 5.2, -2.25, 2.25), s)
	if legacy.Err != nil || section.Err != nil {
		t.Fatal(legacy.Err, section.Err)
	}
	for i, m := range section.Members {
		l := legacy.Members[i]
		for _, pair := range [][2]float64{{m.Existing.Max.Value, l.Existing.Max.Value}, {m.Existing.Min.Value, l.Existing.Min.Value},
			{m.Proposed.Max.Value, l.Proposed.Max.Value}, {m.Proposed.Min.Value, l.Proposed.Min.Value}, {m.Dead, l.Dead}} {
			if math.Abs(pair[0]-pair[1]) > 1e-9*(1+math.Abs(pair[1])) {
				t.Errorf("%s: %g with the cross-section, %g with the average share", m.Label, pair[0], pair[1])
			}
		}
		// lever rule: the shares of both tracks sum to 1 = 0.5 × 2 tracks
		if m.Proposed.Max.Value > 0 && (math.Abs(m.Proposed.MaxShare-1) > 1e-12 || l.Proposed.MaxShare != 1) {
			t.Errorf("%s: share %g with the cross-section, %g with the average share; want 1", m.Label, m.Proposed.MaxShare, l.Proposed.MaxShare)
		}
		if len(m.Proposed.MaxCase.Tracks) == 1 && m.Proposed.Max.Value > 0 {
			t.Errorf("%s: case %v loads one track; both load it", m.Label, m.Proposed.MaxCase)
		}
	}
	if got, want := member(t, section, "L2-L3").Assessment.WorstPr.RF, member(t, legacy, "L2-L3").Assessment.WorstPr.RF; math.Abs(got-want) > 1e-9 {
		t.Errorf("rating factor %g with the cross-section, %g with the average share", got, want)
	}
}

// TestOneTrackAndNegativeShare: one track 1.5 m towards A between trusses 5 m apart loads A
// with 0.8 and B with 0.2 of it (lever rule), so A governs L2-L3: 0.8 × 1.5 P. A track 3.5 m
// towards A (outside A) gives A 1.2 and B -0.2: B's bottom chord then sees compression
// 0.2 × 1.5 P and no tension (the opposite extreme counts where the share is negative).
func TestOneTrackAndNegativeShare(t *testing.T) {
	const p = 400.0
	s := settings(t, axle("existing axle", 100), axle("proposed axle", p))
	m := member(t, screening.ScreenBridge(pratt48(0, 0, 5, 1.5), s), "L2-L3")
	if m.Truss != "A" || math.Abs(m.Proposed.Max.Value-0.8*1.5*p) > 1e-9 || m.Proposed.MaxCase.String() != "truss A: track 1 × 0.800" {
		t.Errorf("one eccentric track: truss %s, max %g (want %g), case %q", m.Truss, m.Proposed.Max.Value, 0.8*1.5*p, m.Proposed.MaxCase)
	}
	b := screening.Bridge{TrussSpacingM: 5, TrackOffsetsM: []float64{3.5}}
	if got := b.ScreenedTrusses(); !slices.Equal(got, []string{"A", "B"}) {
		t.Fatalf("screened trusses %v", got)
	}
	br := pratt48(0, 0, 5, 3.5)
	br.Members = nil
	res := screening.ScreenBridge(br, s)
	// Without capacities both trusses are unrated: the larger force governs, A's 1.2 × 1.5 P.
	if m := member(t, res, "L2-L3"); m.Truss != "A" || math.Abs(m.Proposed.Max.Value-1.2*1.5*p) > 1e-9 {
		t.Errorf("outside track: truss %s, max %g, want A, %g", m.Truss, m.Proposed.Max.Value, 1.2*1.5*p)
	}
	// The track outside B: A's share is -0.2. Without dead load and with a tiny compression
	// capacity, A's compression (the opposite extreme) governs.
	br.TrackOffsetsM = []float64{-3.5}
	br.DeadLoadKNPerM = 0
	br.Members = map[string]rating.Member{"L2-L3": {CapacityTension: 3000, CapacityCompression: 1}}
	m = member(t, screening.ScreenBridge(br, s), "L2-L3")
	if m.Truss != "A" || math.Abs(m.Proposed.Min.Value+0.2*1.5*p) > 1e-9 || m.Proposed.Max.Value != 0 {
		t.Errorf("track outside B: truss %s, max %g, min %g; want A, 0, %g", m.Truss, m.Proposed.Max.Value, m.Proposed.Min.Value, -0.2*1.5*p)
	}
}

// TestThreeTracks: three tracks; a single axle per track, each placed independently over L2.
// EN 1991-2 (from memory): the worse of two tracks fully loaded and 0.75 × all three.
// AREMA (from memory): 1, 1, 1/2 on the tracks in order of their effect.
func TestThreeTracks(t *testing.T) {
	const p = 100.0
	s := settings(t, axle("existing axle", p), axle("proposed axle", p))
	tests := []struct {
		name    string
		offsets []float64
		rule    screening.Presence
		want    float64 // in units of 1.5 P (the axle over L2 on one track, share 1)
		tracks  []int
		source  string
	}{
		// shares on A: 1/2 + e/12 = 1/6, 1/2, 5/6
		{"far apart, EN: two tracks govern", []float64{-4, 0, 4}, screening.PresenceEN, 5.0/6 + 0.5, []int{2, 3}, "two tracks 4/3 > 0.75 × 3/2"},
		// shares 5/12, 1/2, 7/12
		{"close together, EN: all three at 0.75", []float64{-1, 0, 1}, screening.PresenceEN, 0.75 * 1.5, []int{1, 2, 3}, "0.75 × 3/2 > 13/12"},
		{"far apart, AREMA", []float64{-4, 0, 4}, screening.PresenceAREMA, 5.0/6 + 0.5 + 0.5/6, []int{1, 2, 3}, "1 × 5/6 + 1 × 1/2 + 1/2 × 1/6"},
	}
	for _, tc := range tests {
		s.Presence = tc.rule
		m := member(t, screening.ScreenBridge(pratt48(0, 0, 12, tc.offsets...), s), "L2-L3")
		if m.Truss != "A" || math.Abs(m.Proposed.Max.Value-tc.want*1.5*p) > 1e-9 || !slices.Equal(m.Proposed.MaxCase.Tracks, tc.tracks) { // source: tc.source
			t.Errorf("%s: truss %s, max %g, case %v; want A, %g, tracks %v (%s)", tc.name, m.Truss, m.Proposed.Max.Value, m.Proposed.MaxCase, tc.want*1.5*p, tc.tracks, tc.source)
		}
	}
}

// TestTrainsKeptToTracks: the heavier train kept to track 2, the lighter one free: track 1
// sees the lighter train only. Shares on A 0.25 (track 1) and 0.75 (track 2).
func TestTrainsKeptToTracks(t *testing.T) {
	e, err := screening.NewScenario("existing", []*traffic.Train{axle("light", 100)})
	if err != nil {
		t.Fatal(err)
	}
	pr, err := screening.NewScenario("proposed", []*traffic.Train{axle("light", 100), axle("heavy", 400)})
	if err != nil {
		t.Fatal(err)
	}
	s := &screening.Settings{Existing: e, Proposed: pr, Method: rating.WorkingStress, Thresholds: rating.Thresholds{Flag: 1, Review: 1.1}}
	br := pratt48(0, 0, 5, -1.25, 1.25)
	free := member(t, screening.ScreenBridge(br, s), "L2-L3")
	s.Proposed.OnTracks = screening.TrackTrains{1: {1}}
	kept := member(t, screening.ScreenBridge(br, s), "L2-L3")
	// lever rule: the truss nearer the heavy train's track, with shares 0.75 and 0.25
	if want := (0.75*400 + 0.25*400) * 1.5; math.Abs(free.Proposed.Max.Value-want) > 1e-9 {
		t.Errorf("free: %g, want %g", free.Proposed.Max.Value, want)
	}
	if want := (0.75*400 + 0.25*100) * 1.5; math.Abs(kept.Proposed.Max.Value-want) > 1e-9 || kept.Truss != "B" {
		t.Errorf("heavy train kept to track 1 (B's near track): %g on %s, want %g on B", kept.Proposed.Max.Value, kept.Truss, want)
	}
}

// TestTrussWeightInScreen: the truss's own weight w moves part of the dead load from the deck
// chord's panel points to the top chord's joints. Pratt with vertical end posts, span 48 m, 8
// panels, depth 6 m (TestDeadLoadSplit in screening/analysis by the method of joints): the
// vertical L2-U2 gains 3 w of compression, the chord L2-L3 keeps 36 q (M = q·12·36/2 over 6 m).
func TestTrussWeightInScreen(t *testing.T) {
	const q, w = 30.0, 8.0
	s := settings(t, axle("existing axle", 100), axle("proposed axle", 200))
	b := pratt48(0.5, 1, 0)
	b.Truss.EndPosts = truss.VerticalPosts
	b.DeadLoadKNPerM = q
	before := screening.ScreenBridge(b, s)
	b.TrussWeightKNPerM = w
	after := screening.ScreenBridge(b, s)
	if d := member(t, after, "L2-U2").Dead - member(t, before, "L2-U2").Dead; math.Abs(d+3*w) > 1e-9 {
		t.Errorf("vertical changed by %g, want %g", d, -3*w)
	}
	if c := member(t, after, "L2-L3").Dead; math.Abs(c-36*q) > 1e-9 || math.Abs(member(t, before, "L2-L3").Dead-36*q) > 1e-9 {
		t.Errorf("chord %g, want %g either way", c, 36*q)
	}
}

// TestTrussMembers: a member row of truss B alone stands in for the row of both on B. One
// centred track (shares 0.5 each, lever rule): B's smaller capacity governs L2-L3, with the
// same force 0.5 × 1.5 P (method of sections).
func TestTrussMembers(t *testing.T) {
	const p = 400.0
	s := settings(t, axle("existing axle", 100), axle("proposed axle", p))
	b := pratt48(0.5, 1, 0)
	b.DeadLoadKNPerM = 0
	b.TrussMembers = map[string]map[string]rating.Member{"B": {"L2-L3": {CapacityTension: 150, CapacityCompression: 150}}}
	m := member(t, screening.ScreenBridge(b, s), "L2-L3")
	// working-stress RF = C / L without dead load or allowance: 150 / (0.5 × 1.5 × 400) = 0.5
	if m.Truss != "B" || math.Abs(m.Assessment.WorstPr.RF-0.5) > 1e-12 {
		t.Errorf("truss %s, RF %g; want B, 0.5", m.Truss, m.Assessment.WorstPr.RF)
	}
	b.TrussMembers = map[string]map[string]rating.Member{"B": {"L9-L9": {CapacityTension: 150}}}
	if res := screening.ScreenBridge(b, s); res.Err == nil {
		t.Error("a truss row of a member the geometry lacks was accepted")
	}
}

// TestOtherTrussKept: one track 0.6 m towards A between trusses 5.2 m apart puts
// 1/2 + 0.6/5.2 of its load on A and 1/2 - 0.6/5.2 on B (lever rule, common practice). A
// governs L2-L3; B's outcome is kept beside it, its RF that of B's share: working stress
// without dead load or allowance, RF = C / (share × 1.5 P) (method of sections for the
// single axle over L2, as in pratt48). A symmetric bridge screens one truss and keeps none.
func TestOtherTrussKept(t *testing.T) {
	const pEx, pPr, c = 100.0, 400.0, 600.0
	s := settings(t, axle("existing axle", pEx), axle("proposed axle", pPr))
	b := pratt48(0, 0, 5.2, 0.6)
	b.DeadLoadKNPerM = 0
	b.Members = map[string]rating.Member{"L2-L3": {CapacityTension: c, CapacityCompression: c}}
	m := member(t, screening.ScreenBridge(b, s), "L2-L3")
	shareA, shareB := 0.5+0.6/5.2, 0.5-0.6/5.2 // lever rule
	if m.Truss != "A" || m.Other == nil || m.Other.Truss != "B" || !m.Other.HasPr || !m.Other.HasEx {
		t.Fatalf("governing truss %s, other %+v; want A with B's outcome kept", m.Truss, m.Other)
	}
	for _, chk := range []struct {
		name      string
		got, want float64
	}{
		{"A proposed", m.Assessment.WorstPr.RF, c / (shareA * 1.5 * pPr)},
		{"B proposed", m.Other.RFProposed, c / (shareB * 1.5 * pPr)},
		{"B existing", m.Other.RFExisting, c / (shareB * 1.5 * pEx)},
	} {
		if math.Abs(chk.got-chk.want) > 1e-9*chk.want { // source: lever rule and method of sections
			t.Errorf("%s RF %g, want %g", chk.name, chk.got, chk.want)
		}
	}
	if m := member(t, screening.ScreenBridge(pratt48(0.5, 1, 0), s), "L2-L3"); m.Other != nil {
		t.Errorf("a bridge without a cross-section kept another truss: %+v", m.Other)
	}
}
