package main

import (
	"io"

	"github.com/spf13/cobra"
)

// version is set at build time with -ldflags "-X main.version=..."; "dev" otherwise.
var version = "dev"

// app holds what every command shares: the resolved configuration.
type app struct {
	cfgFile string
	cfg     Config
	// cfgUsed is the configuration file read ("" for none), stderr where notes to the user
	// go (the database in use), and saidDatabase whether that note was given.
	cfgUsed      string
	stderr       io.Writer
	saidDatabase bool
}

func newRootCmd() *cobra.Command {
	a := &app{}
	root := &cobra.Command{
		Use:   "trussfleet",
		Short: "Screen a fleet of railway truss bridges for heavier proposed trains",
		Long: `trussfleet screens an owner's inventory of steel truss spans: it builds each truss,
computes every member's influence line and force envelope under the existing and the
proposed traffic, and ranks the bridges and members whose demand outgrows their capacity.

CAUTION: screening is not a load rating. It shows where a licensed engineer should look
first; local codes, the owner's standards and licensed practice govern.`,
		Version:       version,
		SilenceUsage:  true,
		SilenceErrors: true,
		PersistentPreRunE: func(cmd *cobra.Command, args []string) error {
			a.stderr = cmd.ErrOrStderr()
			if err := startProfile(cmd.Name()); err != nil {
				return err
			}
			a.cfgUsed = a.cfgFile
			if a.cfgUsed == "" {
				a.cfgUsed = findConfigFile()
			}
			cfg, err := loadConfig(a.cfgUsed, cmd.Flags())
			if err != nil {
				return err
			}
			a.cfg = cfg
			return nil
		},
	}
	pf := root.PersistentFlags()
	pf.StringVar(&a.cfgFile, "config", "", "configuration file (YAML); default: the first present of ./trussfleet.yaml, $XDG_CONFIG_HOME/trussfleet/trussfleet.yaml (or ~/.config/trussfleet/trussfleet.yaml)")
	pf.String("database-url", "", "PostgreSQL connection string; empty starts the embedded server")
	pf.String("data-dir", "", "data directory of the embedded server (default $XDG_DATA_HOME/trussfleet/pg)")

	for _, add := range commands {
		root.AddCommand(add(a))
	}
	return root
}

// commands lists the constructors of the sub-commands; each command file appends its own
// in an init function, so that adding a command touches one file.
var commands []func(*app) *cobra.Command
