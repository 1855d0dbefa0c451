package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening/report"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newExportCmd) }

func newExportCmd(a *app) *cobra.Command {
	var runID int64
	var format string
	cmd := &cobra.Command{
		Use:   "export",
		Short: "Write the priority list (bridges and flagged members) for inspectors",
		Long: `export writes priority-bridges.{csv,json} and priority-members.{csv,json} into the output
folder (--out, default trussfleet-out). Columns are described in the README.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := outputFormat(format, "csv", "json"); err != nil {
				return err
			}
			ctx := cmd.Context()
			return a.withRun(ctx, runID, func(db *store.DB, run store.Run) error {
				paths, err := exportRun(ctx, db, run, a.cfg.Output, format)
				for _, p := range paths {
					fmt.Fprintln(cmd.OutOrStdout(), "wrote", p)
				}
				return err
			})
		},
	}
	cmd.Flags().Int64Var(&runID, "run", 0, "run id (default: the latest completed run)")
	cmd.Flags().StringVar(&format, "format", "csv", "csv or json")
	cmd.Flags().String("out", "", "output folder (default: the output setting, trussfleet-out)")
	return cmd
}

var bridgeExportHeader = []string{"rank", "bridge_id", "name", "line", "chainage_km", "truss_type", "span_m", "panels",
	"worst_member", "rf_existing", "rf_proposed", "rf_change_pct", "demand_increase_pct", "flags", "unrated_members",
	"headroom", "governing_train", "governing_sense", "governing_head_m", "governing_direction", "loaded_from_m", "loaded_to_m",
	"last_inspected", "status", "error"}

var memberExportHeader = []string{"bridge_rank", "bridge_id", "name", "member", "kind", "rf_existing", "rf_proposed",
	"sense", "demand_increase_pct", "flags", "dead_kn", "live_max_kn", "live_min_kn", "impact", "governing_train",
	"head_m", "direction", "loaded_from_m", "loaded_to_m"}

// exportRun writes the bridge-level and member-level priority lists of a run.
func exportRun(ctx context.Context, db *store.DB, run store.Run, dir, format string) ([]string, error) {
	rows, err := db.Ranked(ctx, run.ID, 0)
	if err != nil {
		return nil, err
	}
	members, err := db.FlaggedMembers(ctx, run.ID)
	if err != nil {
		return nil, err
	}
	bPath := filepath.Join(dir, "priority-bridges."+format)
	mPath := filepath.Join(dir, "priority-members."+format)
	d := forPeople
	if format == "json" {
		d = forPrograms
	}
	br := make([][]string, len(rows))
	for i, r := range rows {
		br[i] = bridgeRecord(r, d)
	}
	mr := make([][]string, len(members))
	for i, m := range members {
		mr[i] = memberRecord(m, d)
	}
	if format == "json" {
		doc := func(kind string, header []string, records [][]string) any {
			items := make([]map[string]any, len(records))
			for i, rec := range records {
				items[i] = recordObject(header, rec)
			}
			return map[string]any{"caution": caution, "run": run.ID, "run_status": run.Status,
				"run_started_at": run.StartedAt, "kind": kind, "items": items}
		}
		if err := writeFileAtomic(bPath, func(w io.Writer) error { return writeJSON(w, doc("bridges", bridgeExportHeader, br)) }); err != nil {
			return nil, err
		}
		if err := writeFileAtomic(mPath, func(w io.Writer) error { return writeJSON(w, doc("members", memberExportHeader, mr)) }); err != nil {
			return nil, err
		}
		return []string{bPath, mPath}, nil
	}
	if err := writeFileAtomic(bPath, func(w io.Writer) error { return writeCSV(w, bridgeExportHeader, br) }); err != nil {
		return nil, err
	}
	if err := writeFileAtomic(mPath, func(w io.Writer) error { return writeCSV(w, memberExportHeader, mr) }); err != nil {
		return nil, err
	}
	return []string{bPath, mPath}, nil
}

// numericColumns are the export columns that JSON writes as numbers (null when empty).
var numericColumns = map[string]bool{"rank": true, "bridge_rank": true, "chainage_km": true, "span_m": true,
	"panels": true, "rf_existing": true, "rf_proposed": true, "rf_change_pct": true, "demand_increase_pct": true,
	"unrated_members": true, "headroom": true, "governing_head_m": true, "loaded_from_m": true, "loaded_to_m": true, "dead_kn": true,
	"live_max_kn": true, "live_min_kn": true, "impact": true, "head_m": true}

// recordObject turns an export record into a JSON object with the CSV's column names; flags
// become a list.
func recordObject(header, rec []string) map[string]any {
	o := make(map[string]any, len(header))
	for i, h := range header {
		v := rec[i]
		switch {
		case h == "flags":
			flags := []string{}
			if v != "" {
				flags = strings.Split(v, ";")
			}
			o[h] = flags
		case numericColumns[h] && v == "":
			o[h] = nil
		case numericColumns[h]:
			f, err := strconv.ParseFloat(v, 64)
			if err != nil {
				o[h] = v
			} else {
				o[h] = f
			}
		default:
			o[h] = v
		}
	}
	return o
}

// digits formats the numbers of an export: a few decimals for people (CSV), every digit
// for programs (JSON: -1, the shortest exact form).
type digits int

const (
	forPeople   digits = 4
	forPrograms digits = -1
)

func (d digits) num(v float64, people int) string {
	if d == forPrograms {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	s := strconv.FormatFloat(v, 'f', people, 64)
	if strings.Trim(s, "-0.") == "" { // no negative zero from rounding noise
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

func (d digits) opt(v *float64, people int) string {
	if v == nil {
		return ""
	}
	return d.num(*v, people)
}

func bridgeRecord(r report.BridgeRow, d digits) []string {
	var change *float64
	if r.Change != nil {
		c := 100 * *r.Change
		change = &c
	}
	return []string{strconv.Itoa(r.Rank), r.BridgeID, r.Name, r.Line, d.opt(r.ChainageKm, 3), r.TrussType,
		strconv.FormatFloat(r.SpanM, 'f', -1, 64), strconv.Itoa(r.Panels), r.WorstMember, d.opt(r.RFExisting, 4),
		d.opt(r.RFProposed, 4), d.opt(change, 1), d.num(100*r.DemandIncrease, 1),
		strings.Join(r.Flags, ";"), strconv.Itoa(r.Unrated), d.opt(r.Headroom, 4), r.GoverningTrain, r.GoverningSense, d.opt(r.GoverningHeadM, 3),
		r.GoverningDirection, d.opt(r.GoverningFromM, 3), d.opt(r.GoverningToM, 3), r.LastInspected, r.Status, r.Error}
}

func memberRecord(m store.FlaggedMember, d digits) []string {
	return []string{strconv.Itoa(m.BridgeRank), m.BridgeID, m.Name, m.Member, m.Kind, d.opt(m.RFExisting, 4),
		d.opt(m.RFProposed, 4), m.Sense, d.num(100*m.DemandIncrease, 1), strings.Join(m.Flags, ";"), d.num(m.DeadKN, 2),
		d.num(m.LiveMaxKN, 2), d.num(m.LiveMinKN, 2), d.num(m.Impact, 4), m.Train, d.opt(m.HeadM, 3),
		m.Direction, d.opt(m.FromM, 3), d.opt(m.ToM, 3)}
}

// writeCSV writes a caution line, a header and the records. Every cell of a column that is
// not numeric is text, much of it from the inventory, and goes through safetext.CSVCell so
// that a spreadsheet does not run it; numeric cells are written as they are.
func writeCSV(w io.Writer, header []string, records [][]string) error {
	if _, err := fmt.Fprintf(w, "# %s\n", caution); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	cells := make([]string, len(header))
	for _, rec := range records {
		for i, v := range rec {
			if !numericColumns[header[i]] {
				v = safetext.CSVCell(v)
			}
			cells[i] = v
		}
		if err := cw.Write(cells); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// writeFileAtomic writes through a temporary file in the same folder and renames it, so that
// a reader never sees half a file. The file gets os.Create's mode, 0666 less the umask
// (createOutput).
func writeFileAtomic(path string, write func(io.Writer) error) error {
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		return err
	}
	f, err := createOutput(filepath.Dir(path), "."+filepath.Base(path)+"-*")
	if err != nil {
		return err
	}
	defer os.Remove(f.Name())
	if err := write(f); err != nil {
		f.Close()
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	return os.Rename(f.Name(), path)
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
