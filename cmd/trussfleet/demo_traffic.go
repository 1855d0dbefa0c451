package main

import (
	"errors"
	"fmt"

	"github.com/spf13/viper"
)

// useDemoTraffic gives the configuration the demo railway's invented fatigue traffic (the
// scenarios' traffic lists of the file at path, and its fatigue.history where the
// configuration has none) where it lists no traffic.
func useDemoTraffic(c *Config, path string) error {
	for _, name := range []string{scenarioExisting, scenarioProposed} {
		if len(c.Screen.Scenarios[name].Traffic) > 0 {
			return nil
		}
	}
	v := viper.New()
	v.SetConfigFile(path)
	if err := v.ReadInConfig(); err != nil {
		return fmt.Errorf("demo traffic %s: %w", path, err)
	}
	var f struct {
		Scenarios map[string]ScenarioConfig `mapstructure:"scenarios"`
		Fatigue   struct {
			History []PeriodConfig `mapstructure:"history"`
		} `mapstructure:"fatigue"`
	}
	if err := v.Unmarshal(&f); err != nil {
		return fmt.Errorf("demo traffic %s: %w", path, err)
	}
	scenarios := make(map[string]ScenarioConfig, len(c.Screen.Scenarios))
	for name, sc := range c.Screen.Scenarios {
		sc.Traffic = f.Scenarios[name].Traffic
		scenarios[name] = sc
	}
	s := c.Screen
	s.Scenarios = scenarios
	if len(s.Fatigue.History) == 0 {
		s.Fatigue.History = f.Fatigue.History
	}
	if errs := s.validateFatigue(); len(errs) > 0 {
		return fmt.Errorf("demo traffic %s: %w", path, errors.Join(errs...))
	}
	c.Screen = s
	return nil
}
