package main

import (
	"fmt"
	"os"
	"os/signal"
	"path/filepath"
	"syscall"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/importers"
)

func init() { commands = append(commands, newDemoCmd) }

func newDemoCmd(a *app) *cobra.Command {
	var from, trains, traffic string
	cmd := &cobra.Command{
		Use:   "demo",
		Short: "Screen the invented demo railway end to end on the embedded database",
		Long: `demo starts the embedded PostgreSQL (unless a database URL is configured), migrates it,
imports the invented fleet of the Northmoor & Eastfell Railway from testdata/demo and the
example trains from configs/trains, screens the existing against the proposed traffic
(with the demo's invented fatigue traffic, testdata/demo/traffic.yaml, where the
configuration lists none),
writes the priority list and the HTML report to the output folder (trussfleet-out) and
prints a summary.
Running it again re-imports (nothing changes) and screens again as a new run.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx, stop := signal.NotifyContext(cmd.Context(), os.Interrupt, syscall.SIGTERM)
			defer stop()
			out := cmd.OutOrStdout()
			for _, p := range []string{filepath.Join(from, "bridges.csv"), filepath.Join(from, "trusses.csv"), filepath.Join(from, "members.csv"), trains} {
				if _, err := os.Stat(p); err != nil {
					return fmt.Errorf("demo input %s: %w (run the demo from the root of a trussfleet checkout, or give --from and --trains)", p, err)
				}
			}
			db, err := a.openDatabase(ctx)
			if err != nil {
				return err
			}
			defer db.Close()
			if db.Server != nil {
				fmt.Fprintf(out, "Embedded PostgreSQL: %s\n", db.Server.DataDir())
			}
			steps := []struct {
				what string
				run  func() (importers.Result, error)
			}{
				{"trains", func() (importers.Result, error) { return importers.ImportTrains(ctx, db, trains, importers.Options{}) }},
				{"bridges", func() (importers.Result, error) {
					return importers.ImportBridgesFile(ctx, db, filepath.Join(from, "bridges.csv"), importers.Options{})
				}},
				{"trusses", func() (importers.Result, error) {
					return importers.ImportTrussTablesFile(ctx, db, filepath.Join(from, "trusses.csv"), importers.Options{})
				}},
				{"members", func() (importers.Result, error) {
					return importers.ImportMembersFile(ctx, db, filepath.Join(from, "members.csv"), importers.Options{Replace: true})
				}},
			}
			for _, s := range steps {
				res, err := s.run()
				if err != nil {
					return err
				}
				c := res.Counts
				fmt.Fprintf(out, "Imported %-8s %s: %d inserted, %d updated, %d unchanged%s\n", s.what, res.File, c.Inserted, c.Updated, c.Unchanged, removed(res, ", %d removed"))
			}
			if err := useDemoTraffic(&a.cfg, traffic); err != nil {
				return err
			}
			screenErr := a.screen(ctx, db, out, cmd.ErrOrStderr(), false, 0)
			run, err := db.LatestRun(ctx, true)
			if err != nil {
				if screenErr != nil {
					return screenErr
				}
				return err
			}
			for _, format := range []string{"csv", "json"} {
				paths, err := exportRun(ctx, db, run, a.cfg.Output, format, a.cfg.units())
				if err != nil {
					return err
				}
				for _, p := range paths {
					fmt.Fprintln(out, "wrote", p)
				}
			}
			site := filepath.Join(a.cfg.Output, "report")
			if err := writeReport(ctx, db, run.ID, site, a.cfg.units()); err != nil {
				return err
			}
			fmt.Fprintf(out, "wrote %s (open it in a browser)\n", filepath.Join(site, "index.html"))
			return screenErr
		},
	}
	cmd.Flags().StringVar(&from, "from", filepath.Join("testdata", "demo"), "folder with the demo's bridges.csv and members.csv")
	cmd.Flags().StringVar(&trains, "trains", filepath.Join("configs", "trains"), "folder of train files")
	cmd.Flags().StringVar(&traffic, "traffic", filepath.Join("testdata", "demo", "traffic.yaml"), "the demo's fatigue traffic, used where the configuration lists none")
	cmd.Flags().String("out", "", "output folder (default: the output setting, trussfleet-out)")
	return cmd
}
