package main

import (
	"fmt"

	"github.com/spf13/viper"
	"github.com/trussfleet/trussfleet/screening/floor"
)

// FloorConfig sets the floor system's determinant lengths for EN 1991-2's dynamic factors
// (configs/default.yaml documents them).
type FloorConfig struct {
	StringerAddM   float64 `mapstructure:"stringer_add_m"`
	FloorBeamTimes float64 `mapstructure:"floor_beam_times"`
	EndFloorBeamM  float64 `mapstructure:"end_floor_beam_m"`
}

func setFloorDefaults(v *viper.Viper) {
	d := floor.DefaultLengths
	v.SetDefault("floor.stringer_add_m", d.StringerAddM)
	v.SetDefault("floor.floor_beam_times", d.FloorBeamTimes)
	v.SetDefault("floor.end_floor_beam_m", d.EndFloorBeamM)
}

func (f FloorConfig) lengths() floor.Lengths {
	return floor.Lengths{StringerAddM: f.StringerAddM, FloorBeamTimes: f.FloorBeamTimes, EndFloorBeamM: f.EndFloorBeamM}
}

func (f FloorConfig) validate() []error {
	if err := f.lengths().Validate(); err != nil {
		return []error{fmt.Errorf("configuration key floor: %w", err)}
	}
	return nil
}

// planLengths is nil for the default lengths, so that a plan that keeps them hashes as before.
func (f FloorConfig) planLengths() *floor.Lengths {
	if l := f.lengths(); l != floor.DefaultLengths {
		return &l
	}
	return nil
}
