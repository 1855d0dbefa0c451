package main

import (
	"context"
	"fmt"
	"math"
	"time"

	"github.com/spf13/viper"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/store"
)

// TrafficConfig is one real train's passages in a scenario, for the fatigue check.
type TrafficConfig struct {
	Train string `mapstructure:"train"`
	// PerDay or PerYear (exactly one) counts the passages over both directions.
	PerDay  float64 `mapstructure:"per_day"`
	PerYear float64 `mapstructure:"per_year"`
	// SpeedKmh: 0 not known (fatigue.dynamic_factor applies).
	SpeedKmh   float64 `mapstructure:"speed_kmh"`
	Directions string  `mapstructure:"directions"`
	Track      int     `mapstructure:"track"`
}

// FatigueConfig sets the fatigue check (configs/default.yaml, "fatigue").
type FatigueConfig struct {
	GammaMf          float64 `mapstructure:"gamma_mf"`
	RivetedCategory  float64 `mapstructure:"riveted_category"`
	DynamicFactor    float64 `mapstructure:"dynamic_factor"`
	Year             int     `mapstructure:"year"`
	DefaultYearBuilt int     `mapstructure:"default_year_built"`
	// History: past traffic periods, each from a year on, as a multiple of today's existing
	// traffic.
	History      []PeriodConfig `mapstructure:"history"`
	HorizonYears float64        `mapstructure:"horizon_years"`
	RiseFactor   float64        `mapstructure:"rise_factor"`
}

// PeriodConfig is one period of past traffic.
type PeriodConfig struct {
	From   int     `mapstructure:"from"`
	Factor float64 `mapstructure:"factor"`
}

func setFatigueDefaults(v *viper.Viper) {
	v.SetDefault("fatigue.gamma_mf", 1.15)
	v.SetDefault("fatigue.riveted_category", 71)
	v.SetDefault("fatigue.dynamic_factor", 1.10)
	v.SetDefault("fatigue.year", 0)
	v.SetDefault("fatigue.default_year_built", 1900)
	v.SetDefault("fatigue.horizon_years", 30)
	v.SetDefault("fatigue.rise_factor", 2.0)
}

// validate checks the traffic lists and the fatigue settings; the settings' own ranges are
// checked again with the plan (fatigue.Settings.Validate).
func (s ScreenConfig) validateFatigue() []error {
	var errs []error
	bad := func(key, format string, a ...any) {
		errs = append(errs, fmt.Errorf("configuration key %s: %s", key, fmt.Sprintf(format, a...)))
	}
	with := 0
	for _, name := range []string{scenarioExisting, scenarioProposed} {
		sc := s.Scenarios[name]
		if len(sc.Traffic) > 0 {
			with++
		}
		for i, t := range sc.Traffic {
			key := fmt.Sprintf("scenarios.%s.traffic[%d]", name, i)
			if t.Train == "" {
				bad(key+".train", "names no train")
			}
			if (t.PerDay > 0) == (t.PerYear > 0) || t.PerDay < 0 || t.PerYear < 0 || math.IsInf(t.PerDay+t.PerYear, 0) {
				bad(key, "give exactly one of per_day and per_year, a positive number of passages (both directions together)")
			}
		}
	}
	if with == 1 {
		bad("scenarios", "fatigue traffic is listed for one scenario only: list it for both existing and proposed, or for neither (no fatigue check)")
	}
	if s.Fatigue.Year != 0 && (s.Fatigue.Year < 1800 || s.Fatigue.Year > 2300) {
		bad("fatigue.year", "must be 0 (this year) or a year from 1800 to 2300, got %d", s.Fatigue.Year)
	} else if with > 0 {
		f := s.Fatigue
		set := fatigue.Settings{GammaMf: f.GammaMf, RivetedCategoryMPa: f.RivetedCategory, DynamicFactor: f.DynamicFactor,
			Year: f.Year, DefaultYearBuilt: f.DefaultYearBuilt, HorizonYears: f.HorizonYears, RiseFactor: f.RiseFactor}
		if set.Year == 0 {
			set.Year = time.Now().UTC().Year()
		}
		for _, h := range f.History {
			set.History = append(set.History, fatigue.Period{FromYear: h.From, Factor: h.Factor})
		}
		if err := set.Validate(); err != nil {
			errs = append(errs, fmt.Errorf("configuration key %w", err))
		}
	}
	return errs
}

// fatiguePlan resolves the scenarios' fatigue traffic into the plan's fatigue part; nil when
// no scenario lists traffic. now gives the year when fatigue.year is 0.
func fatiguePlan(ctx context.Context, db *store.DB, s ScreenConfig, now time.Time) (*screening.FatiguePlan, error) {
	if len(s.Scenarios[scenarioExisting].Traffic) == 0 && len(s.Scenarios[scenarioProposed].Traffic) == 0 {
		return nil, nil
	}
	f := s.Fatigue
	p := &screening.FatiguePlan{GammaMf: f.GammaMf, RivetedCategoryMPa: f.RivetedCategory, DynamicFactor: f.DynamicFactor,
		Year: f.Year, DefaultYearBuilt: f.DefaultYearBuilt, HorizonYears: f.HorizonYears, RiseFactor: f.RiseFactor}
	if p.Year == 0 {
		p.Year = now.UTC().Year()
	}
	for _, h := range f.History {
		p.History = append(p.History, fatigue.Period{FromYear: h.From, Factor: h.Factor})
	}
	for _, name := range []string{scenarioExisting, scenarioProposed} {
		var out []screening.FatigueTraffic
		for i, t := range s.Scenarios[name].Traffic {
			key := fmt.Sprintf("scenarios.%s.traffic[%d].train", name, i)
			ref, err := fleetrun.ResolveTrain(ctx, db, t.Train)
			if err != nil {
				return nil, fmt.Errorf("configuration key %s: %w", key, err)
			}
			per := t.PerYear
			if t.PerDay > 0 {
				per = t.PerDay * 365
			}
			out = append(out, screening.FatigueTraffic{Train: ref, PerYear: per, SpeedKmh: t.SpeedKmh, Directions: t.Directions, Track: t.Track})
		}
		if name == scenarioExisting {
			p.Existing = out
		} else {
			p.Proposed = out
		}
	}
	return p, nil
}
