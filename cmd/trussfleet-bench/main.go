// Command trussfleet-bench measures trussfleet itself: the end-to-end fleet run of
// BENCHMARKS.md ("Fleet run"). It is a program of its own so that the binary users install
// carries no measurement tools: no benchmark command, no /proc sampling, no profiling, no
// copy-floor tables.
//
// It measures the real trussfleet binary as a child process (built from ./cmd/trussfleet,
// found next to this program or named by --trussfleet), so that the time, CPU and memory it
// reports are those of the program users run. The database side of the measurement (the
// COPY floor, settling the database, deleting the benchmark's runs) is in internal/benchdb.
//
// Configuration follows trussfleet's: --config, --database-url and --data-dir, or
// TRUSSFLEET_DATABASE_URL and TRUSSFLEET_DATABASE_DATA_DIR, or the config file's database
// keys; the benchmark passes them on to every trussfleet process it starts.
package main

import (
	"fmt"
	"os"

	"github.com/spf13/cobra"
)

// bench holds what the sub-commands share: the root's flags.
type bench struct {
	cfgFile string
}

func newRootCmd() *cobra.Command {
	b := &bench{}
	root := &cobra.Command{
		Use:           "trussfleet-bench",
		Short:         "Measurements of trussfleet itself (BENCHMARKS.md)",
		SilenceUsage:  true,
		SilenceErrors: true,
	}
	pf := root.PersistentFlags()
	pf.StringVar(&b.cfgFile, "config", "", "trussfleet configuration file (YAML); default: ./trussfleet.yaml if present")
	pf.String("database-url", "", "PostgreSQL connection string; empty starts the embedded server")
	pf.String("data-dir", "", "data directory of the embedded server (default: DIR/n-N/pg, beside the fleet)")
	root.AddCommand(newRunCmd(b), newNightlyCmd(b))
	return root
}

func main() {
	if err := newRootCmd().Execute(); err != nil {
		fmt.Fprintln(os.Stderr, "trussfleet-bench:", err)
		os.Exit(1)
	}
}
