package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newRankCmd) }

func newRankCmd(a *app) *cobra.Command {
	var runID int64
	var limit int
	cmd := &cobra.Command{
		Use:   "rank",
		Short: "Print the priority list of a run (default: the latest completed run)",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx := cmd.Context()
			return a.withRun(ctx, runID, func(db *store.DB, run store.Run) error {
				rows, err := db.Ranked(ctx, run.ID, limit)
				if err != nil {
					return err
				}
				return printRanked(cmd.OutOrStdout(), run, rows, a.cfg.units())
			})
		},
	}
	cmd.Flags().Int64Var(&runID, "run", 0, "run id (default: the latest completed run)")
	cmd.Flags().IntVar(&limit, "limit", 0, "show only the first N bridges")
	addUnitsFlag(cmd)
	return cmd
}

// printRanked prints a priority list for a person. Inventory text goes through
// safetext.Cell: no control characters, and at most safetext.CellRunes runes a cell. Lengths
// are in units u, rounded (internal/units).
func printRanked(w io.Writer, run store.Run, rows []report.BridgeRow, u units.System) error {
	fmt.Fprintf(w, "Priority list, run %d (%s, started %s)\n\n", run.ID, run.Status, run.StartedAt.Format("2006-01-02 15:04"))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "rank\tbridge\tname\tline\tkm\ttype\tspan "+u.Name(units.Length)+"\tworst\tkind\tRF ex\tRF pr\tchange\tdemand +\theadroom\tE rating\tcategories\tflags\tunrated\tgoverning train (where)\tloading case\tinspected")
	cell, cut := safetext.Cell, false
	for _, r := range rows {
		cut = cut || r.Status == "failed" && cell(r.Error) != safetext.Terminal(r.Error)
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%.0f%%\t%s\t%s\t%s\t%s\t%d\t%s\t%s\t%s\n",
			r.Rank, cell(r.BridgeID), cell(r.Name), cell(r.Line), fmtOpt(r.ChainageKm, "%.3f"), cell(r.TrussType), u.Format(units.Length, r.SpanM), cell(r.WorstMember), worstKind(r.WorstMember),
			fmtRF(r.RFExisting), fmtRF(r.RFProposed), fmtPct(r.Change), 100*r.DemandIncrease, fmtOpt(r.Headroom, "%.2f×"),
			fmtE(r.ERating), categoriesText(r.Categories), flagsText(r), r.Unrated, governing(r.GoverningTrain, r.GoverningSense, r.GoverningDirection, r.GoverningHeadM, u), caseText(r), cell(r.LastInspected))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	noRockingNote(w, rows)
	printFatigueNotes(w, rows, nil)
	if failed := countFailed(rows); failed > 0 {
		fmt.Fprintf(w, "\n%s could not be screened (listed last, NOT SCREENED): not cleared; fix their data and run again.\n", plural(failed, "bridge"))
		if cut {
			fmt.Fprintf(w, "Reasons longer than %d characters are cut short here; trussfleet export writes them in full.\n", safetext.CellRunes)
		}
	}
	fmt.Fprintln(w)
	printCaution(w)
	return nil
}

// flagsText is a table cell of a row's flags, or of why its bridge was not screened.
func flagsText(r report.BridgeRow) string {
	if r.Status == "failed" {
		return "NOT SCREENED: " + safetext.Cell(r.Error)
	}
	return safetext.Cell(strings.Join(r.Flags, ","))
}

func countFailed(rows []report.BridgeRow) int {
	n := 0
	for _, r := range rows {
		if r.Status == "failed" {
			n++
		}
	}
	return n
}

// pickRun is the run asked for, or the latest completed one.
func pickRun(ctx context.Context, db *store.DB, id int64) (store.Run, error) {
	if id > 0 {
		return db.GetRun(ctx, id)
	}
	return db.LatestRun(ctx, true)
}

func fmtOpt(v *float64, format string) string {
	if v == nil {
		return "—"
	}
	return fmt.Sprintf(format, *v)
}

func fmtPct(v *float64) string {
	if v == nil {
		return "—"
	}
	return fmt.Sprintf("%+.0f%%", 100**v)
}

func governing(train, sense, dir string, head *float64, u units.System) string {
	if train == "" {
		return "—"
	}
	at := "—"
	if head != nil {
		at = u.Format(units.Length, *head) + " " + u.Name(units.Length)
	}
	return fmt.Sprintf("%s, %s, head at %s, %s", safetext.Cell(train), safetext.Cell(sense), at, safetext.Cell(dir))
}

// caseText is a priority-list cell of the governing loading case; a bridge screened without
// AREMA's rocking term is marked.
func caseText(r report.BridgeRow) string { return safetext.Cell(report.CaseCell(r)) }

// noRockingNote says once how many bridges lack AREMA's rocking term.
func noRockingNote(w io.Writer, rows []report.BridgeRow) {
	n := 0
	for _, r := range rows {
		if r.NoRocking {
			n++
		}
	}
	if n > 0 {
		fmt.Fprintf(w, "\n%s screened without AREMA's rocking term (marked \"no rocking term\" under loading case): their rows give no truss spacing.\n", plural(n, "bridge"))
	}
}
