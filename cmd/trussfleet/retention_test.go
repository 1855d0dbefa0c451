package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/spf13/pflag"
)

// TestParseAge: ages as whole days or Go durations; anything else is refused with the value.
func TestParseAge(t *testing.T) {
	for _, c := range []struct {
		in   string
		want time.Duration
		bad  bool
	}{
		{"", 0, false},
		{"0", 0, false},
		{"90d", 90 * 24 * time.Hour, false},
		{"720h", 720 * time.Hour, false},
		{" 1d ", 24 * time.Hour, false},
		{"1.5d", 0, true},
		{"-3d", 0, true},
		{"-1h", 0, true},
		{"soon", 0, true},
	} {
		got, err := parseAge(c.in)
		if (err != nil) != c.bad || got != c.want {
			t.Errorf("parseAge(%q) = %v, %v; want %v, error %v", c.in, got, err, c.want, c.bad)
		}
		if err != nil && !strings.Contains(err.Error(), strings.TrimSpace(c.in)) {
			t.Errorf("parseAge(%q): %v does not quote the value", c.in, err)
		}
	}
}

// TestRetentionSettings: the retention keys of a config file resolve to the prune rules;
// a bad age names its key.
func TestRetentionSettings(t *testing.T) {
	dir := t.TempDir()
	load := func(text string) (Config, error) {
		p := filepath.Join(dir, "c.yaml")
		if err := os.WriteFile(p, []byte(text), 0o600); err != nil {
			t.Fatal(err)
		}
		return loadConfig(p, pflag.NewFlagSet("t", pflag.ContinueOnError))
	}
	cfg, err := load("retention:\n  keep: 30\n  older_than: 90d\n")
	if err != nil {
		t.Fatal(err)
	}
	r, ok, err := cfg.Retention.retention()
	if err != nil || !ok || r.Keep != 30 || r.OlderThan != 90*24*time.Hour || !cfg.Retention.Vacuum {
		t.Errorf("retention %+v, on %v, vacuum %v, err %v; want keep 30, 90 days, on, vacuum", r, ok, cfg.Retention.Vacuum, err)
	}
	cfg, err = load("workers: 1\n")
	if err != nil {
		t.Fatal(err)
	}
	if _, ok, _ := cfg.Retention.retention(); ok {
		t.Error("retention is on by default; want off")
	}
	if _, err := load("retention:\n  older_than: someday\n"); err == nil || !strings.Contains(err.Error(), "retention.older_than") {
		t.Errorf("a bad age: %v; want an error naming retention.older_than", err)
	}
	if _, err := load("retention:\n  keep: -2\n"); err == nil || !strings.Contains(err.Error(), "retention.keep") {
		t.Errorf("a negative keep: %v; want an error naming retention.keep", err)
	}
}
