package main

import (
	"fmt"
	"path/filepath"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/screening/report"
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
			db, err := a.openDatabase(ctx)
			if err != nil {
				return err
			}
			defer db.Close()
			r, err := pickRun(ctx, db, runID)
			if err != nil {
				return err
			}
			run, err := db.ReportRun(ctx, r.ID)
			if err != nil {
				return err
			}
			rows, err := db.Ranked(ctx, r.ID, 0)
			if err != nil {
				return err
			}
			if out == "" {
				out = filepath.Join(a.cfg.Output, "report")
			}
			if err := report.WriteSite(out, run, rows, func(id string) (report.Bridge, error) {
				return db.ReportBridge(ctx, run, id)
			}); err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			fmt.Fprintf(w, "Wrote the report of run %d: %s\n", r.ID, filepath.Join(out, "index.html"))
			printCaution(w)
			return nil
		},
	}
	cmd.Flags().Int64Var(&runID, "run", 0, "run id (default: the latest completed run)")
	cmd.Flags().StringVar(&out, "out", "", "output folder (default: <output>/report)")
	return cmd
}
