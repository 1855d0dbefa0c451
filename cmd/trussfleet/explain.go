package main

import (
	"context"
	"errors"
	"fmt"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/runreport"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newExplainCmd) }

func newExplainCmd(a *app) *cobra.Command {
	var runID int64
	cmd := &cobra.Command{
		Use:     "explain BRIDGE MEMBER",
		Short:   "Show how a member's rating factors and flags came about: geometry, influence line, trains, arithmetic",
		Example: "  trussfleet explain NER-00001 L5-L6\n  trussfleet explain NER-00013 L3-U3 --run 2",
		Args:    cobra.ExactArgs(2),
		RunE: func(cmd *cobra.Command, args []string) error {
			ctx := cmd.Context()
			return a.withRun(ctx, runID, func(db *store.DB, r store.Run) error {
				run, err := runreport.Run(ctx, db, r.ID)
				if err != nil {
					return err
				}
				b, err := runreport.Bridge(ctx, db, run, args[0])
				if err != nil {
					return withBridgeHint(ctx, db, args[0], err)
				}
				return report.ExplainIn(cmd.OutOrStdout(), run, b, args[1], a.cfg.units())
			})
		},
	}
	cmd.Flags().Int64Var(&runID, "run", 0, "run id (default: the latest completed run)")
	addUnitsFlag(cmd)
	return cmd
}

// withBridgeHint adds to a "not found" error for bridge id the ids that differ from it only
// in case: bridge ids are matched exactly (member labels regardless of case).
func withBridgeHint(ctx context.Context, db *store.DB, id string, err error) error {
	if !errors.Is(err, store.ErrNotFound) {
		return err
	}
	like, lerr := db.BridgeIDsFolded(ctx, id)
	if lerr != nil || len(like) == 0 {
		return err
	}
	return fmt.Errorf("%w (bridge ids are matched exactly, capitals included; did you mean %s?)", err, safetext.Terminal(strings.Join(like, " or ")))
}
