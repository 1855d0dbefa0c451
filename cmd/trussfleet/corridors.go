package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/ranking"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/runreport"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newCorridorsCmd) }

func newCorridorsCmd(a *app) *cobra.Command {
	var runID int64
	var format, line string
	cmd := &cobra.Command{
		Use:   "corridors",
		Short: "Print each line's bridges in chainage order and the weakest links of each line category",
		Long: `corridors prints, for each line of a run, its bridges in chainage order with the highest
EN 15528 line categories each carries and its Cooper E rating, then for each category the
bridges that keep the line from it (the weakest links: their lowest RF under the category's
reference wagons, the member that limits them and whether its axle load or its mass per
metre does) and the categories upgrading them would open. A bridge the run did not rate by
category keeps the line from every category. The categories' values are recalled from
EN 15528 and the reference wagons are trussfleet's own (four-axle wagons of the category's
axle load, bogie axles 1.8 m apart, as long as the mass per metre requires), standing in for
the standard's. --format csv writes one row per line, category and weakest link.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := outputFormat(format, "table", "csv", "json"); err != nil {
				return err
			}
			ctx := cmd.Context()
			return a.withRun(ctx, runID, func(db *store.DB, run store.Run) error {
				rows, err := db.Ranked(ctx, run.ID, 0)
				if err != nil {
					return err
				}
				cs, err := runreport.Corridors(ctx, db, run.ID, rows)
				if err != nil {
					return err
				}
				if !anyRated(cs) {
					return fmt.Errorf("run %d holds no line categories (it was screened with network: false, or before trussfleet rated them): screen again with network: true", run.ID)
				}
				if line != "" {
					var only []network.Corridor
					for _, c := range cs {
						if c.Line == line {
							only = append(only, c)
						}
					}
					if len(only) == 0 {
						return fmt.Errorf("--line %q: no bridge of run %d is on that line", safetext.Terminal(line), run.ID)
					}
					cs = only
				}
				byID := map[string]ranking.Row{}
				for _, r := range rows {
					byID[r.BridgeID] = r
				}
				w := cmd.OutOrStdout()
				switch format {
				case "json":
					return writeJSON(w, corridorsJSON(run, cs, byID))
				case "csv":
					return corridorsCSV(w, cs, byID)
				}
				return corridorsTable(w, run, cs, byID)
			})
		},
	}
	cmd.Flags().Int64Var(&runID, "run", 0, "run id (default: the latest completed run)")
	cmd.Flags().StringVar(&format, "format", "table", "output: table, csv or json")
	cmd.Flags().StringVar(&line, "line", "", "only this line (its name as in the inventory)")
	return cmd
}

// weakLink describes a weakest link for a person: "N-4 (RF 0.93, L1-U1, axle load)".
func weakLink(s network.Stop, cat string) string {
	id := safetext.Cell(s.BridgeID)
	if !s.Rated {
		return id + " (not rated)"
	}
	l, ok := s.Limits[cat]
	if !ok || math.IsNaN(l.RF) || math.IsInf(l.RF, 0) {
		return id
	}
	return fmt.Sprintf("%s (RF %.2f, %s, %s)", id, l.RF, safetext.Cell(l.Member), l.Limit)
}

// corridorsTable prints the corridors for a person; inventory text goes through safetext.
func corridorsTable(w io.Writer, run store.Run, cs []network.Corridor, byID map[string]ranking.Row) error {
	fmt.Fprintf(w, "Corridors, run %d (%s, started %s): EN 15528 line categories (values from memory; trussfleet's own reference wagons) and Cooper E ratings\n",
		run.ID, run.Status, run.StartedAt.Format("2006-01-02 15:04"))
	for _, c := range cs {
		fmt.Fprintf(w, "\nLine %s: %s; the whole line carries %s\n", safetext.Cell(c.Line), plural(len(c.Stops), "bridge"), categoriesText(orEmpty(c.Highest)))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  km\tbridge\tname\tcarries\tE rating\tRF pr\tflags")
		for _, s := range c.Stops {
			r := byID[s.BridgeID]
			carries := categoriesText(r.Categories)
			if r.Status == "failed" {
				carries = "NOT SCREENED"
			}
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t%s\t%s\n", fmtOpt(s.ChainageKm, "%.3f"), safetext.Cell(s.BridgeID), safetext.Cell(s.Name),
				carries, fmtE(r.ERating), fmtRF(r.RFProposed), flagsText(r))
		}
		if err := tw.Flush(); err != nil {
			return err
		}
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  category\tline\tweakest links (lowest RF there, limiting member, limit)\tupgrading them opens")
		for _, l := range c.Categories {
			if l.Open {
				fmt.Fprintf(tw, "  %s\topen\t\t\n", l.Category)
				continue
			}
			// One weakest link a row: the category and what upgrading opens on the first.
			for i, id := range l.Weakest {
				if i == 0 {
					fmt.Fprintf(tw, "  %s\tclosed\t%s\t%s\n", l.Category, weakLink(stopOf(c, id), l.Category), strings.Join(l.Opens, " "))
					continue
				}
				fmt.Fprintf(tw, "  \t\t%s\t\n", weakLink(stopOf(c, id), l.Category))
			}
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	fmt.Fprintln(w)
	printCaution(w)
	return nil
}

// orEmpty is list, or an empty list for nil (a line's categories are always known).
func orEmpty(list []string) []string {
	if list == nil {
		return []string{}
	}
	return list
}

func stopOf(c network.Corridor, id string) network.Stop {
	for _, s := range c.Stops {
		if s.BridgeID == id {
			return s
		}
	}
	return network.Stop{BridgeID: id}
}

// corridorsCSV writes one row per line, category and weakest link (one row with no bridge
// for an open category), after the caution; text cells go through safetext.CSVCell.
func corridorsCSV(w io.Writer, cs []network.Corridor, byID map[string]ranking.Row) error {
	if _, err := fmt.Fprintf(w, "# %s\n", caution); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	cw.Write([]string{"line", "category", "line_open", "line_carries", "weakest_bridge_id", "weakest_name", "chainage_km",
		"rated", "rf", "limiting_member", "limit", "upgrading_opens"})
	text := safetext.CSVCell
	for _, c := range cs {
		for _, l := range c.Categories {
			base := []string{text(c.Line), l.Category, strconv.FormatBool(l.Open), strings.Join(c.Highest, ";")}
			if l.Open {
				cw.Write(append(base, "", "", "", "", "", "", "", ""))
				continue
			}
			for _, id := range l.Weakest {
				s := stopOf(c, id)
				rf, member, limit := "", "", ""
				if lim, ok := s.Limits[l.Category]; ok && !math.IsNaN(lim.RF) && !math.IsInf(lim.RF, 0) {
					rf, member, limit = strconv.FormatFloat(lim.RF, 'f', 4, 64), lim.Member, string(lim.Limit)
				}
				cw.Write(append(base, text(id), text(byID[id].Name), fmtOptPlain(s.ChainageKm), strconv.FormatBool(s.Rated),
					rf, text(member), limit, strings.Join(l.Opens, ";")))
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

func fmtOptPlain(v *float64) string {
	if v == nil {
		return ""
	}
	return strconv.FormatFloat(*v, 'f', 3, 64)
}

// corridorsJSON is the corridors for programs: full precision, SI.
func corridorsJSON(run store.Run, cs []network.Corridor, byID map[string]ranking.Row) any {
	type link struct {
		BridgeID string   `json:"bridge_id"`
		Rated    bool     `json:"rated"`
		RF       *float64 `json:"rf"`
		Member   string   `json:"limiting_member,omitempty"`
		Limit    string   `json:"limit,omitempty"`
	}
	type category struct {
		Category string   `json:"category"`
		Open     bool     `json:"open"`
		Weakest  []link   `json:"weakest_links"`
		Opens    []string `json:"upgrading_opens"`
	}
	type bridge struct {
		BridgeID   string   `json:"bridge_id"`
		Name       string   `json:"name"`
		ChainageKm *float64 `json:"chainage_km"`
		Status     string   `json:"status"`
		Categories []string `json:"categories"`
		ERating    *float64 `json:"e_rating"`
		RFProposed *float64 `json:"rf_proposed"`
		Flags      []string `json:"flags"`
	}
	type line struct {
		Line       string     `json:"line"`
		Carries    []string   `json:"carries"`
		Bridges    []bridge   `json:"bridges"`
		Categories []category `json:"categories"`
	}
	out := []line{}
	for _, c := range cs {
		l := line{Line: c.Line, Carries: orEmpty(c.Highest)}
		for _, s := range c.Stops {
			r := byID[s.BridgeID]
			l.Bridges = append(l.Bridges, bridge{BridgeID: s.BridgeID, Name: s.Name, ChainageKm: s.ChainageKm, Status: r.Status,
				Categories: r.Categories, ERating: r.ERating, RFProposed: r.RFProposed, Flags: orEmpty(r.Flags)})
		}
		for _, k := range c.Categories {
			cat := category{Category: k.Category, Open: k.Open, Weakest: []link{}, Opens: orEmpty(k.Opens)}
			for _, id := range k.Weakest {
				s := stopOf(c, id)
				lk := link{BridgeID: id, Rated: s.Rated}
				if lim, ok := s.Limits[k.Category]; ok {
					lk.RF, lk.Member, lk.Limit = num(lim.RF), lim.Member, string(lim.Limit)
				}
				cat.Weakest = append(cat.Weakest, lk)
			}
			l.Categories = append(l.Categories, cat)
		}
		out = append(out, l)
	}
	return map[string]any{"caution": caution, "run": run.ID, "run_status": run.Status, "run_started_at": run.StartedAt,
		"categories_note": "EN 15528 line categories, values from memory; trussfleet's own reference wagons stand in for the standard's",
		"lines":           out}
}

// num is a finite number, nil for NaN or an infinity.
func num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// anyRated says whether any bridge of the corridors was rated by line category.
func anyRated(cs []network.Corridor) bool {
	for _, c := range cs {
		for _, s := range c.Stops {
			if s.Rated {
				return true
			}
		}
	}
	return false
}
