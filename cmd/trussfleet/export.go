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
	"github.com/trussfleet/trussfleet/internal/units"
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
folder (--out, default trussfleet-out). Columns are described in the README. CSV is for
people: rounded, and with --units imperial in ft and kip under unit-suffixed column names
(span_ft, dead_kip); JSON is for programs: full precision and SI always.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := outputFormat(format, "csv", "json"); err != nil {
				return err
			}
			ctx := cmd.Context()
			return a.withRun(ctx, runID, func(db *store.DB, run store.Run) error {
				paths, err := exportRun(ctx, db, run, a.cfg.Output, format, a.cfg.units())
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
	addUnitsFlag(cmd)
	return cmd
}

// bridgeExportHeader is the bridge export's columns, lengths suffixed with their unit in u
// (span_m, span_ft).
func bridgeExportHeader(u units.System) []string {
	l := u.Column(units.Length)
	return []string{"rank", "bridge_id", "name", "line", "chainage_km", "truss_type", "span_" + l, "panels",
		"worst_member", "worst_kind", "rf_existing", "rf_proposed", "rf_change_pct", "demand_increase_pct", "flags", "unrated_members",
		"headroom", "e_rating", "e_member", "categories", "governing_train", "governing_sense", "governing_head_" + l, "governing_direction", "loaded_from_" + l, "loaded_to_" + l,
		"last_inspected", "status", "error", "governing_case", "no_rocking_term", "rank_basis", "fatigue_life_years", "fatigue_member", "fatigue_no_data"}
}

// memberExportHeader is the member export's columns, forces and lengths suffixed with their
// unit in u (dead_kn, dead_kip).
func memberExportHeader(u units.System) []string {
	l, f := u.Column(units.Length), u.Column(units.Force)
	return []string{"bridge_rank", "bridge_id", "name", "member", "kind", "rf_existing", "rf_proposed",
		"sense", "demand_increase_pct", "flags", "dead_" + f, "live_max_" + f, "live_min_" + f, "impact", "governing_train",
		"head_" + l, "direction", "loaded_from_" + l, "loaded_to_" + l, "truss", "loading_case", "dynamic_allowance", "effect_unit",
		"fatigue_status", "fatigue_damage_existing_per_year", "fatigue_damage_proposed_per_year", "fatigue_damage_ratio",
		"fatigue_damage_to_date", "fatigue_remaining_years", "fatigue_end_year", "fatigue_range_proposed_mpa"}
}

// exportRun writes the bridge-level and member-level priority lists of a run: CSV for people
// in units u, rounded; JSON for programs in SI at full precision, whatever u.
func exportRun(ctx context.Context, db *store.DB, run store.Run, dir, format string, u units.System) ([]string, error) {
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
	d := digits{u: u}
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
		if err := writeFileAtomic(bPath, func(w io.Writer) error { return writeJSON(w, doc("bridges", bridgeExportHeader(units.SI), br)) }); err != nil {
			return nil, err
		}
		if err := writeFileAtomic(mPath, func(w io.Writer) error { return writeJSON(w, doc("members", memberExportHeader(units.SI), mr)) }); err != nil {
			return nil, err
		}
		return []string{bPath, mPath}, nil
	}
	if err := writeFileAtomic(bPath, func(w io.Writer) error { return writeCSV(w, bridgeExportHeader(u), br) }); err != nil {
		return nil, err
	}
	if err := writeFileAtomic(mPath, func(w io.Writer) error { return writeCSV(w, memberExportHeader(u), mr) }); err != nil {
		return nil, err
	}
	return []string{bPath, mPath}, nil
}

// numericColumns are the export columns that JSON writes as numbers (null when empty), in
// either system of units.
var numericColumns = map[string]bool{"rank": true, "bridge_rank": true, "chainage_km": true, "span_m": true,
	"panels": true, "rf_existing": true, "rf_proposed": true, "rf_change_pct": true, "demand_increase_pct": true,
	"unrated_members": true, "headroom": true, "e_rating": true, "governing_head_m": true, "loaded_from_m": true, "loaded_to_m": true, "dead_kn": true,
	"live_max_kn": true, "live_min_kn": true, "impact": true, "head_m": true,
	"span_ft": true, "governing_head_ft": true, "loaded_from_ft": true, "loaded_to_ft": true, "dead_kip": true,
	"live_max_kip": true, "live_min_kip": true, "head_ft": true,
	// fatigue (stresses in MPa in either system: the unit of EN 1993-1-9's detail categories)
	"fatigue_life_years": true, "fatigue_no_data": true, "fatigue_damage_existing_per_year": true,
	"fatigue_damage_proposed_per_year": true, "fatigue_damage_ratio": true, "fatigue_damage_to_date": true,
	"fatigue_remaining_years": true, "fatigue_end_year": true, "fatigue_range_proposed_mpa": true}

// recordObject turns an export record into a JSON object with the CSV's column names; flags
// become a list.
func recordObject(header, rec []string) map[string]any {
	o := make(map[string]any, len(header))
	for i, h := range header {
		v := rec[i]
		switch {
		case h == "flags" || h == "categories":
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

// digits formats the numbers of an export: for people (CSV) a few decimals, and lengths and
// forces in units u rounded by internal/units; for programs (JSON) every digit in SI (the
// shortest exact form).
type digits struct {
	programs bool
	u        units.System
}

var forPrograms = digits{programs: true}

func (d digits) num(v float64, people int) string {
	if d.programs {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	return units.Fixed(v, people)
}

func (d digits) opt(v *float64, people int) string {
	if v == nil {
		return ""
	}
	return d.num(*v, people)
}

// qty formats an SI value of quantity q: converted and rounded for people, exact for programs.
func (d digits) qty(q units.Quantity, v float64) string {
	if d.programs {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	return d.u.Format(q, v)
}

func (d digits) optQty(q units.Quantity, v *float64) string {
	if v == nil {
		return ""
	}
	return d.qty(q, *v)
}

func bridgeRecord(r report.BridgeRow, d digits) []string {
	var change *float64
	if r.Change != nil {
		c := 100 * *r.Change
		change = &c
	}
	return []string{strconv.Itoa(r.Rank), r.BridgeID, r.Name, r.Line, d.opt(r.ChainageKm, 3), r.TrussType,
		d.qty(units.Length, r.SpanM), strconv.Itoa(r.Panels), r.WorstMember, worstKind(r.WorstMember), d.opt(r.RFExisting, 4),
		d.opt(r.RFProposed, 4), d.opt(change, 1), d.num(100*r.DemandIncrease, 1),
		strings.Join(r.Flags, ";"), strconv.Itoa(r.Unrated), d.opt(r.Headroom, 4), d.opt(r.ERating, 1), r.EMember,
		strings.Join(r.Categories, ";"), r.GoverningTrain, r.GoverningSense, d.optQty(units.Length, r.GoverningHeadM),
		r.GoverningDirection, d.optQty(units.Length, r.GoverningFromM), d.optQty(units.Length, r.GoverningToM), r.LastInspected, r.Status, r.Error,
		r.GoverningCase, strconv.FormatBool(r.NoRocking),
		rankBasis(r), d.opt(r.Fatigue.LifeYears, 1), r.Fatigue.Member, optInt(r.Fatigue.NoData)}
}

func memberRecord(m store.FlaggedMember, d digits) []string {
	f := effectQuantity(m.Member)
	return append([]string{strconv.Itoa(m.BridgeRank), m.BridgeID, m.Name, m.Member, m.Kind, d.opt(m.RFExisting, 4),
		d.opt(m.RFProposed, 4), m.Sense, d.num(100*m.DemandIncrease, 1), strings.Join(m.Flags, ";"), d.qty(f, m.DeadKN),
		d.qty(f, m.LiveMaxKN), d.qty(f, m.LiveMinKN), d.num(m.Impact, 4), m.Train, d.optQty(units.Length, m.HeadM),
		m.Direction, d.optQty(units.Length, m.FromM), d.optQty(units.Length, m.ToM), m.Truss, m.Case, m.Dynamic, d.u.Name(f)}, fatigueRecord(m.Fatigue, d)...)
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
