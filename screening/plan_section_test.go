package screening_test

import (
	"slices"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/screening"
)

// TestPlanSection: the plan's presence rule and tracks by train name reach the settings,
// by the train's place in its scenario; an unknown train or track is refused naming the key.
func TestPlanSection(t *testing.T) {
	p := screening.Plan{
		Existing: []screening.TrainRef{{Asked: "lm71", Name: "LM71", Builtin: "lm71"}},
		Proposed: []screening.TrainRef{{Asked: "lm71", Name: "LM71", Builtin: "lm71"}, {Asked: "e80", Name: "Cooper E80", Builtin: "cooper:e=80"}},
		Dynamic:  "none", Presence: "arema", ProposedTracks: map[string][]int{"e80": {2}},
	}
	s, err := p.Settings()
	if err != nil {
		t.Fatal(err)
	}
	if s.Presence != screening.PresenceAREMA || s.Existing.OnTracks != nil || !slices.Equal(s.Proposed.OnTracks[1], []int{2}) {
		t.Errorf("settings: presence %q, existing %v, proposed %v", s.Presence, s.Existing.OnTracks, s.Proposed.OnTracks)
	}
	for _, bad := range []struct {
		tracks map[string][]int
		msg    string
	}{
		{map[string][]int{"e81": {1}}, "scenarios.proposed.tracks.e81"},
		{map[string][]int{"e80": {0}}, "numbered from 1"},
		{map[string][]int{"e80": {}}, "at least one track"},
	} {
		p.ProposedTracks = bad.tracks
		if _, err := p.Settings(); err == nil || !strings.Contains(err.Error(), bad.msg) {
			t.Errorf("tracks %v: error %v, want one with %q", bad.tracks, err, bad.msg)
		}
	}
	p.ProposedTracks, p.Presence = nil, "both"
	if _, err := p.Settings(); err == nil || !strings.Contains(err.Error(), "multiple_presence") {
		t.Errorf("presence %q: error %v", p.Presence, err)
	}
}
