package screening

import (
	"fmt"
	"sort"
)

// maxTrackNumber bounds a track number a scenario may keep a train to (the importer's bound
// on a span's tracks).
const maxTrackNumber = 8

// sectionSettings sets the cross-section's run-wide inputs from the plan: the presence rule
// and the tracks each scenario keeps its trains to.
func (p Plan) sectionSettings(s *Settings) error {
	var err error
	if s.Presence, err = ParsePresence(p.Presence); err != nil {
		return fmt.Errorf("configuration key multiple_presence: %w", err)
	}
	if s.Lengths, err = ParseLengths(p.Lengths); err != nil {
		return fmt.Errorf("configuration key %w", err)
	}
	if s.Existing.OnTracks, err = onTracks("existing", p.Existing, p.ExistingTracks); err != nil {
		return err
	}
	if s.Proposed.OnTracks, err = onTracks("proposed", p.Proposed, p.ProposedTracks); err != nil {
		return err
	}
	return nil
}

// onTracks turns a scenario's tracks by train name (the name asked for) into TrackTrains by
// the train's place in the scenario; nil where no train is kept to tracks.
func onTracks(scenario string, trains []TrainRef, byName map[string][]int) (TrackTrains, error) {
	if len(byName) == 0 {
		return nil, nil
	}
	names := make([]string, 0, len(byName))
	for n := range byName {
		names = append(names, n)
	}
	sort.Strings(names)
	out := TrackTrains{}
	for _, n := range names {
		key := "scenarios." + scenario + ".tracks." + n
		k := -1
		for i, r := range trains {
			if r.Asked == n {
				k = i
			}
		}
		if k < 0 {
			return nil, fmt.Errorf("configuration key %s: %q is not one of the scenario's trains (%v)", key, n, TrainNames(trains))
		}
		if len(byName[n]) == 0 {
			return nil, fmt.Errorf("configuration key %s: give at least one track number (from 1)", key)
		}
		for _, t := range byName[n] {
			if t < 1 || t > maxTrackNumber {
				return nil, fmt.Errorf("configuration key %s: track %d; tracks are numbered from 1 to %d in the order of track_offsets_m", key, t, maxTrackNumber)
			}
		}
		out[k] = append([]int(nil), byName[n]...)
	}
	return out, nil
}
