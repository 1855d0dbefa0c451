package main

import (
	"fmt"
	"os"
	"strings"

	"github.com/spf13/pflag"
	"github.com/spf13/viper"
)

// database is where the benchmark's database is: a server's URL, or the data directory of
// the embedded server.
type database struct {
	url, dataDir string
}

// resolveDatabase reads the database keys as trussfleet does: flags > TRUSSFLEET_*
// environment > config file (the one given, or ./trussfleet.yaml if present). The rest of
// the configuration is trussfleet's own business: the child processes resolve it, and the
// benchmark reads what a run used from the run's record.
func resolveDatabase(file string, flags *pflag.FlagSet) (database, error) {
	v := viper.New()
	v.SetEnvPrefix("TRUSSFLEET")
	v.SetEnvKeyReplacer(strings.NewReplacer(".", "_"))
	v.AutomaticEnv()
	if file == "" {
		if _, err := os.Stat("trussfleet.yaml"); err == nil {
			file = "trussfleet.yaml"
		}
	}
	if file != "" {
		v.SetConfigFile(file)
		if err := v.ReadInConfig(); err != nil {
			return database{}, fmt.Errorf("config file %s: %w", file, err)
		}
	}
	for name, key := range map[string]string{"database-url": "database.url", "data-dir": "database.data_dir"} {
		if f := flags.Lookup(name); f != nil {
			if err := v.BindPFlag(key, f); err != nil {
				return database{}, err
			}
		}
	}
	return database{url: v.GetString("database.url"), dataDir: v.GetString("database.data_dir")}, nil
}
