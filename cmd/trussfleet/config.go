package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
	"github.com/spf13/viper"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/store"
)

// Config is the whole resolved configuration. configs/default.yaml documents every key.
type Config struct {
	Database DatabaseConfig `mapstructure:"database"`
	Workers  int            `mapstructure:"workers"`
	Output   string         `mapstructure:"output"`
	// Units of what is printed for people: si or imperial (internal/units). JSON is SI always.
	Units string `mapstructure:"units"`
	// Screening settings live in config_screen.go.
	Screen ScreenConfig `mapstructure:",squash"`
	// Retention prunes old runs after each completed screen (runs prune does it by hand).
	Retention RetentionConfig `mapstructure:"retention"`
}

// RetentionConfig says which runs screen keeps after a completed run; both zero keeps all.
type RetentionConfig struct {
	Keep int `mapstructure:"keep"`
	// OlderThan is an age such as 90d or 720h; empty: no age rule.
	OlderThan string `mapstructure:"older_than"`
	// Vacuum runs VACUUM on the run tables after a prune that removed something, so that the
	// next runs reuse the space at once.
	Vacuum bool `mapstructure:"vacuum"`
}

// retention resolves the configured rules; ok is false when none is set.
func (r RetentionConfig) retention() (ret store.Retention, ok bool, err error) {
	age, err := parseAge(r.OlderThan)
	if err != nil {
		return ret, false, fmt.Errorf("configuration key retention.older_than: %w", err)
	}
	ret = store.Retention{Keep: r.Keep, OlderThan: age}
	return ret, r.Keep > 0 || age > 0, nil
}

// parseAge reads an age as a Go duration (720h, 90m) or a whole number of days (30d).
func parseAge(s string) (time.Duration, error) {
	s = strings.TrimSpace(s)
	if s == "" || s == "0" {
		return 0, nil
	}
	if days, ok := strings.CutSuffix(s, "d"); ok {
		n, err := strconv.Atoi(days)
		if err != nil || n < 0 || n > 36500 {
			return 0, fmt.Errorf("age %q: want a whole number of days from 0 to 36500 (30d) or a duration (720h)", s)
		}
		return time.Duration(n) * 24 * time.Hour, nil
	}
	d, err := time.ParseDuration(s)
	if err != nil || d < 0 {
		return 0, fmt.Errorf("age %q: want a whole number of days (30d) or a duration (720h)", s)
	}
	return d, nil
}

// DatabaseConfig says which PostgreSQL to use.
type DatabaseConfig struct {
	// URL of an existing server; empty starts the embedded one.
	URL string `mapstructure:"url"`
	// DataDir of the embedded server.
	DataDir string `mapstructure:"data_dir"`
}

// Redacted is the configuration as a run stores it: the database URL with its password
// replaced by xxxxx (store.RedactConnString), so that whoever can read the runs cannot read
// the password. The URL is kept otherwise, to record which server a run used; a password
// never changes a result, so the configuration hash does not depend on it either. The
// receiver is not modified.
func (c Config) Redacted() Config {
	c.Database.URL = store.RedactConnString(c.Database.URL)
	return c
}

// flagKeys maps persistent and command flags to configuration keys.
var flagKeys = map[string]string{
	"database-url": "database.url",
	"data-dir":     "database.data_dir",
	"workers":      "workers",
	"out":          "output",
	"units":        "units",
}

func setDefaults(v *viper.Viper) {
	v.SetDefault("database.url", "")
	v.SetDefault("database.data_dir", "")
	v.SetDefault("workers", runtime.NumCPU())
	v.SetDefault("output", "trussfleet-out")
	v.SetDefault("units", "si")
	setScreenDefaults(v)
	v.SetDefault("retention.keep", 0)
	v.SetDefault("retention.older_than", "")
	v.SetDefault("retention.vacuum", true)
}

// findConfigFile is the configuration file used when --config names none: the first that
// exists of ./trussfleet.yaml, $XDG_CONFIG_HOME/trussfleet/trussfleet.yaml (when
// XDG_CONFIG_HOME is set, else ~/.config/trussfleet/trussfleet.yaml); "" for none.
func findConfigFile() string {
	for _, p := range configSearchPath() {
		if st, err := os.Stat(p); err == nil && !st.IsDir() {
			return p
		}
	}
	return ""
}

// configSearchPath lists the places findConfigFile looks, in order.
func configSearchPath() []string {
	out := []string{"trussfleet.yaml"}
	// The XDG base directory specification ignores a relative XDG_CONFIG_HOME.
	if d := os.Getenv("XDG_CONFIG_HOME"); d != "" && filepath.IsAbs(d) {
		return append(out, filepath.Join(d, "trussfleet", "trussfleet.yaml"))
	}
	if home, err := os.UserHomeDir(); err == nil {
		out = append(out, filepath.Join(home, ".config", "trussfleet", "trussfleet.yaml"))
	}
	return out
}

// loadConfig resolves flags > TRUSSFLEET_* environment > config file > defaults, once.
func loadConfig(file string, flags *pflag.FlagSet) (Config, error) {
	v := viper.New()
	setDefaults(v)
	v.SetEnvPrefix("TRUSSFLEET")
	v.SetEnvKeyReplacer(strings.NewReplacer(".", "_"))
	v.AutomaticEnv()
	if file == "" {
		file = findConfigFile()
	}
	if file != "" {
		v.SetConfigFile(file)
		if err := v.ReadInConfig(); err != nil {
			return Config{}, fmt.Errorf("config file %s: %w", file, err)
		}
	}
	for name, key := range flagKeys {
		if f := flags.Lookup(name); f != nil {
			if err := v.BindPFlag(key, f); err != nil {
				return Config{}, err
			}
		}
	}
	var cfg Config
	if err := v.Unmarshal(&cfg); err != nil {
		return Config{}, fmt.Errorf("configuration: %w", err)
	}
	if err := cfg.validate(); err != nil {
		return Config{}, err
	}
	return cfg, nil
}

func (c Config) validate() error {
	var errs []error
	if c.Workers < 1 {
		errs = append(errs, fmt.Errorf("configuration key workers: must be at least 1, got %d", c.Workers))
	}
	if _, err := units.Parse(c.Units); err != nil {
		errs = append(errs, fmt.Errorf("configuration key units: %w", err))
	}
	errs = append(errs, c.Screen.validate()...)
	if c.Retention.Keep < 0 {
		errs = append(errs, fmt.Errorf("configuration key retention.keep: must not be negative, got %d", c.Retention.Keep))
	}
	if _, _, err := c.Retention.retention(); err != nil {
		errs = append(errs, err)
	}
	return errors.Join(errs...)
}

// units is the resolved system of units for people's outputs (validated by loadConfig).
func (c Config) units() units.System {
	u, _ := units.Parse(c.Units)
	return u
}

// addUnitsFlag gives a command that prints for people the --units flag (configuration key
// units).
func addUnitsFlag(cmd *cobra.Command) {
	cmd.Flags().String("units", "", "units of the output for people: si (m, kN) or imperial (ft, kip); default: the units setting, si. JSON stays SI")
}
