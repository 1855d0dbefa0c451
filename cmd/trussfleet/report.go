package main

import (
	"context"
	"fmt"
	"path/filepath"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/runreport"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newReportCmd) }

func newReportCmd(a *app) *cobra.Command {
	var runID int64
	var out string
	cmd := &cobra.Command{
		Use:   "report",
		Short: "Write a static HTML report of a run for inspectors (opens from disk, prints on A4 and Letter)",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx := cmd.Context()
			if out == "" {
				out = filepath.Join(a.cfg.Output, "report")
			}
			return a.withRun(ctx, runID, func(db *store.DB, r store.Run) error {
				if err := writeReport(ctx, db, r.ID, out, a.cfg.units()); err != nil {
					return err
				}
				w := cmd.OutOrStdout()
				fmt.Fprintf(w, "wrote the report of run %d: %s\n", r.ID, filepath.Join(out, "index.html"))
				printCaution(w)
				return nil
			})
		},
	}
	cmd.Flags().Int64Var(&runID, "run", 0, "run id (default: the latest completed run)")
	cmd.Flags().StringVar(&out, "out", "", "output folder (default: <output>/report)")
	addUnitsFlag(cmd)
	return cmd
}

// writeReport writes the HTML report of a run into dir, lengths and forces in units u.
func writeReport(ctx context.Context, db *store.DB, runID int64, dir string, u units.System) error {
	run, err := runreport.Run(ctx, db, runID)
	if err != nil {
		return err
	}
	rows, err := db.Ranked(ctx, runID, 0)
	if err != nil {
		return err
	}
	return report.WriteSiteIn(dir, run, rows, func(id string) (report.Bridge, error) {
		return runreport.Bridge(ctx, db, run, id)
	}, u)
}
