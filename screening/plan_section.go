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
	if s.Existing.Speeds, err = speeds("existing", p.Existing, p.ExistingSpeeds, p.ExistingLineSpeed); err != nil {
		return err
	}
	if s.Proposed.Speeds, err = speeds("proposed", p.Proposed, p.ProposedSpeeds, p.ProposedLineSpeed); err != nil {
		return err
	}
	return nil
}

// maxSpeedKmh bounds a train's speed.
const maxSpeedKmh = 500.0

// speeds gives a scenario's trains their speeds by their place in the scenario; nil where
// no train has one.
func speeds(scenario string, trains []TrainRef, kmh map[string]float64, line []string) ([]TrainSpeed, error) {
	if len(kmh) == 0 && len(line) == 0 {
		return nil, nil
	}
	out := make([]TrainSpeed, len(trains))
	place := func(key, n string) (int, error) {
		for i, r := range trains {
			if r.Asked == n {
				return i, nil
			}
		}
		return -1, fmt.Errorf("configuration key %s: %q is not one of the scenario's trains (%v)", key, n, TrainNames(trains))
	}
	names := make([]string, 0, len(kmh))
	for n := range kmh {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		key := "scenarios." + scenario + ".speeds_kmh." + n
		k, err := place(key, n)
		if err != nil {
			return nil, err
		}
		if v := kmh[n]; !(v > 0 && v <= maxSpeedKmh) {
			return nil, fmt.Errorf("configuration key %s: a speed from above 0 to %g km/h, got %v", key, maxSpeedKmh, v)
		}
		out[k].Kmh = kmh[n]
	}
	for _, n := range line {
		k, err := place("scenarios."+scenario+".at_line_speed", n)
		if err != nil {
			return nil, err
		}
		if out[k].Kmh > 0 {
			return nil, fmt.Errorf("configuration key scenarios.%s.at_line_speed: %q has a speed of its own in speeds_kmh; give one or the other", scenario, n)
		}
		out[k].Line = true
	}
	return out, nil
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
