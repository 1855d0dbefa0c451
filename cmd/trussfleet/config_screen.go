package main

import (
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/spf13/viper"
)

// ScreenConfig holds the settings of a screening run. configs/default.yaml documents each.
type ScreenConfig struct {
	Scenarios  map[string]ScenarioConfig `mapstructure:"scenarios"`
	Dynamic    string                    `mapstructure:"dynamic"`
	Rating     RatingConfig              `mapstructure:"rating"`
	Thresholds ThresholdConfig           `mapstructure:"thresholds"`
	ChunkSize  int                       `mapstructure:"chunk_size"`
	// Jobs is the number of jobs one process works at once (each with Workers goroutines).
	Jobs int `mapstructure:"jobs"`
	// JobTimeout bounds one job; RescueAfter hands a job whose worker died to another.
	JobTimeout  time.Duration `mapstructure:"job_timeout"`
	RescueAfter time.Duration `mapstructure:"rescue_after"`

	// MultiplePresence is the rule for several tracks loaded at once: en1991-2 or arema.
	MultiplePresence string `mapstructure:"multiple_presence"`
	// DynamicLengths is the rule for members' determinant lengths: by-member or span.
	DynamicLengths string `mapstructure:"dynamic_lengths"`
	// Floor sets the floor system's determinant lengths (config_floor.go).
	Floor FloorConfig `mapstructure:"floor"`
	// Network rates every bridge by line category and Cooper E rating as well.
	Network bool `mapstructure:"network"`
	// Fatigue sets the fatigue check (config_fatigue.go).
	Fatigue FatigueConfig `mapstructure:"fatigue"`
}

// ScenarioConfig is one traffic scenario: the envelope over all its trains.
type ScenarioConfig struct {
	Trains []string `mapstructure:"trains"`
	// Tracks keeps trains (by the name in Trains) to given tracks, numbered from 1; a train
	// not named may run on every track.
	Tracks map[string][]int `mapstructure:"tracks"`
	// SpeedsKmh gives trains a speed (EN 1991-2 Annex C); AtLineSpeed runs trains at each
	// bridge's line speed.
	SpeedsKmh   map[string]float64 `mapstructure:"speeds_kmh"`
	AtLineSpeed []string           `mapstructure:"at_line_speed"`
	// Traffic lists real trains' passages for the fatigue check (config_fatigue.go).
	Traffic []TrafficConfig `mapstructure:"traffic"`
}

// RatingConfig selects the rating equation and its factors.
type RatingConfig struct {
	Method           string  `mapstructure:"method"`
	Phi              float64 `mapstructure:"phi"`
	GammaD           float64 `mapstructure:"gamma_d"`
	GammaL           float64 `mapstructure:"gamma_l"`
	GammaDFavourable float64 `mapstructure:"gamma_d_favourable"`
}

// ThresholdConfig sets when members are flagged.
type ThresholdConfig struct {
	Flag          float64 `mapstructure:"flag"`
	Review        float64 `mapstructure:"review"`
	WorseFraction float64 `mapstructure:"worse_fraction"`
	// ReversalFraction: the reversed force's least share of the larger force for new-reversal.
	ReversalFraction float64 `mapstructure:"reversal_fraction"`
	// FlagUnrated flags members (and bridges) that are unrated in a loaded sense.
	FlagUnrated bool `mapstructure:"flag_unrated"`
}

// The two scenarios every run compares.
const (
	scenarioExisting = "existing"
	scenarioProposed = "proposed"
)

func setScreenDefaults(v *viper.Viper) {
	v.SetDefault("scenarios", map[string]any{
		scenarioExisting: map[string]any{"trains": []string{"northmoor-freight-today", "eastfell-multiple-unit"}},
		scenarioProposed: map[string]any{"trains": []string{"northmoor-freight-proposed", "eastfell-multiple-unit"}},
	})
	v.SetDefault("dynamic", "phi3")
	v.SetDefault("multiple_presence", "en1991-2")
	v.SetDefault("dynamic_lengths", "by-member")
	v.SetDefault("rating.method", "working-stress")
	v.SetDefault("rating.phi", 0.9)
	v.SetDefault("rating.gamma_d", 1.25)
	v.SetDefault("rating.gamma_l", 1.75)
	v.SetDefault("rating.gamma_d_favourable", 0.9)
	v.SetDefault("thresholds.flag", 1.0)
	v.SetDefault("thresholds.review", 1.1)
	v.SetDefault("thresholds.worse_fraction", 0.20)
	v.SetDefault("thresholds.reversal_fraction", 0.10)
	v.SetDefault("thresholds.flag_unrated", false)
	v.SetDefault("chunk_size", 50)
	v.SetDefault("jobs", 4)
	v.SetDefault("job_timeout", "2m")
	v.SetDefault("rescue_after", "5m")
	setFloorDefaults(v)
	v.SetDefault("network", true)
	setFatigueDefaults(v)
}

func (s ScreenConfig) validate() []error {
	var errs []error
	bad := func(key, format string, a ...any) {
		errs = append(errs, fmt.Errorf("configuration key %s: %s", key, fmt.Sprintf(format, a...)))
	}
	for _, name := range []string{scenarioExisting, scenarioProposed} {
		sc, ok := s.Scenarios[name]
		if !ok || len(sc.Trains) == 0 {
			bad("scenarios."+name+".trains", "needs at least one train (a stored train name, a train file, or a built-in such as lm71:alpha=1.0)")
		}
	}
	for name := range s.Scenarios {
		if name != scenarioExisting && name != scenarioProposed {
			bad("scenarios."+name, "unknown scenario; allowed: %s, %s", scenarioExisting, scenarioProposed)
		}
	}
	switch m := strings.ToLower(s.Rating.Method); m {
	case "working-stress", "factored":
	default:
		bad("rating.method", "%q; allowed: working-stress, factored", s.Rating.Method)
	}
	for key, v := range map[string]float64{"rating.phi": s.Rating.Phi, "rating.gamma_d": s.Rating.GammaD, "rating.gamma_l": s.Rating.GammaL, "rating.gamma_d_favourable": s.Rating.GammaDFavourable} {
		if !(v > 0) || math.IsInf(v, 0) {
			bad(key, "must be a positive number, got %v", v)
		}
	}
	if !(s.Thresholds.Flag > 0) {
		bad("thresholds.flag", "must be positive, got %v", s.Thresholds.Flag)
	}
	if !(s.Thresholds.Review >= s.Thresholds.Flag) {
		bad("thresholds.review", "must be at least thresholds.flag (%v), got %v", s.Thresholds.Flag, s.Thresholds.Review)
	}
	if !(s.Thresholds.WorseFraction >= 0 && s.Thresholds.WorseFraction < 1) {
		bad("thresholds.worse_fraction", "must be from 0 to below 1, got %v", s.Thresholds.WorseFraction)
	}
	if !(s.Thresholds.ReversalFraction >= 0 && s.Thresholds.ReversalFraction <= 1) {
		bad("thresholds.reversal_fraction", "must be from 0 (any change of sign) to 1 (reversed force as large as the other), got %v", s.Thresholds.ReversalFraction)
	}
	if s.Jobs < 1 || s.Jobs > 64 {
		bad("jobs", "must be from 1 to 64 jobs at once, got %d", s.Jobs)
	}
	if s.JobTimeout < time.Second {
		bad("job_timeout", "must be at least 1s, got %v", s.JobTimeout)
	}
	if s.RescueAfter <= s.JobTimeout {
		bad("rescue_after", "must be longer than job_timeout (%v), got %v", s.JobTimeout, s.RescueAfter)
	}
	if s.ChunkSize < 1 || s.ChunkSize > 10000 {
		bad("chunk_size", "must be from 1 to 10000 bridges per job, got %d", s.ChunkSize)
	}
	errs = append(errs, s.validateFatigue()...)
	return append(errs, s.Floor.validate()...)
}
