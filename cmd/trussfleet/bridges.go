package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newBridgesCmd) }

func newBridgesCmd(a *app) *cobra.Command {
	cmd := &cobra.Command{Use: "bridges", Short: "The bridges in the inventory"}
	var format string
	list := &cobra.Command{
		Use:   "list",
		Short: "List the stored bridges with their member counts",
		Long: `List the stored bridges. --format csv writes the columns of bridges.csv (and a members
count, which an import ignores), so the list can be edited and imported again.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := outputFormat(format, "table", "csv", "json"); err != nil {
				return err
			}
			db, err := a.openDatabase(cmd.Context())
			if err != nil {
				return err
			}
			defer db.Close()
			bs, err := db.BridgeSummaries(cmd.Context())
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			switch format {
			case "csv":
				return bridgesCSV(w, bs, a.cfg.units())
			case "json":
				enc := json.NewEncoder(w)
				enc.SetIndent("", "  ")
				return enc.Encode(map[string]any{"caution": caution, "bridges": bs})
			}
			return bridgesTable(w, bs, a.cfg.units())
		},
	}
	list.Flags().StringVar(&format, "format", "table", "output: table, csv or json")
	addUnitsFlag(list)
	cmd.AddCommand(list)
	return cmd
}

// bridgesTable prints the bridges for a person in units u, rounded (internal/units), their
// text through safetext.Cell.
func bridgesTable(w io.Writer, bs []store.BridgeSummary, u units.System) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "bridge_id\tname\tline\tkm\ttype\tdeck\tspan %[1]s\tpanels\tdepth %[1]s\tdead %[2]s/truss\tbuilt\tinspected\tmembers\n",
		u.Name(units.Length), u.Name(units.PerLength))
	cell := safetext.Cell
	for _, b := range bs {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%d\t%s\t%s\t%s\t%s\t%d\n", cell(b.BridgeID), cell(b.Name), cell(b.Line), optFixed(b.ChainageKM, 3),
			cell(b.TrussType), cell(b.Deck), u.Format(units.Length, b.SpanM), b.Panels, u.Format(units.Length, b.DepthM),
			u.Format(units.PerLength, b.DeadLoadKNPerM), optInt(b.YearBuilt), optDate(b), b.Members)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w, plural(len(bs), "bridge"))
	printCaution(w)
	return nil
}

// bridgesCSV writes the bridges.csv columns, so the output imports again; the first line
// is the caution as a comment, which the importer skips. Text cells go through
// safetext.CSVCell: a name a spreadsheet would run as a formula is written after a quote.
// Lengths and loads are in units u, under the importer's column names for them (span_m or
// span_ft), written by units.Exact: without floating-point noise, yet not rounded to display
// precision, so that importing the list again leaves the bridges as they were.
func bridgesCSV(w io.Writer, bs []store.BridgeSummary, u units.System) error {
	fmt.Fprintf(w, "# %s\n", caution)
	cw := csv.NewWriter(w)
	length := u.Column(units.Length)
	cw.Write([]string{"bridge_id", "name", "line", "chainage_km", "truss_type", "span_" + length, "panels", "depth_" + length, "deck", "end_posts",
		"trusses", "truss_share", "tracks", "dead_load_" + u.Column(units.PerLength), "year_built", "latitude", "longitude", "last_inspected",
		"depths_" + length, "end_depth_" + length, "spans", "members"})
	text := safetext.CSVCell
	for _, b := range bs {
		f := func(v float64) string { return units.SI.Exact(units.Length, v) } // a plain number, noise removed
		cw.Write([]string{text(b.BridgeID), text(b.Name), text(b.Line), optFloat(b.ChainageKM), text(b.TrussType), u.Exact(units.Length, b.SpanM), strconv.Itoa(b.Panels),
			u.Exact(units.Length, b.DepthM), text(b.Deck), text(b.EndPosts), strconv.Itoa(b.Trusses), f(b.TrussShare), strconv.Itoa(b.Tracks), u.Exact(units.PerLength, b.DeadLoadKNPerM),
			optInt(b.YearBuilt), optFloat(b.Latitude), optFloat(b.Longitude), optDate(b), depthsCell(b.DepthsM, u), endDepthCell(b.EndDepthM, u),
			strconv.Itoa(max(b.Spans, 1)), strconv.Itoa(b.Members)})
	}
	cw.Flush()
	return cw.Error()
}

func optFloat(p *float64) string {
	if p == nil {
		return ""
	}
	return strconv.FormatFloat(*p, 'f', -1, 64)
}

// optFixed writes an optional value with the given decimals; "" for none.
func optFixed(p *float64, decimals int) string {
	if p == nil {
		return ""
	}
	return units.Fixed(*p, decimals)
}

func optInt(p *int) string {
	if p == nil {
		return ""
	}
	return strconv.Itoa(*p)
}

func optDate(b store.BridgeSummary) string {
	if b.LastInspected == nil {
		return ""
	}
	return b.LastInspected.Format("2006-01-02")
}
