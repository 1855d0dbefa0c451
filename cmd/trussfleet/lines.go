package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

func init() { commands = append(commands, newLinesCmd) }

func newLinesCmd(a *app) *cobra.Command {
	var g geometryFlags
	var format string
	var sf sectionFlags
	var withFloor bool
	cmd := &cobra.Command{
		Use:   "lines",
		Short: "Print every member's influence line for one parametric truss or joint table",
		Example: "  trussfleet lines --type pratt --span 48 --panels 8 --depth 6\n" +
			"  trussfleet lines --type howe --span 40 --panels 8 --depth 5 --deck deck --format json\n" +
			"  trussfleet lines --type pratt --span 80 --panels 10 --depth 11 --end-depth 7.5\n" +
			"  trussfleet lines --type pratt --span 48 --panels 6 --depth 7 --spans 2\n" +
			"  trussfleet lines --table testdata/demo/trusses.csv --table-bridge NER-00015",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := outputFormat(format, "table", "csv", "json"); err != nil {
				return err
			}
			if miss := g.missing(cmd); len(miss) > 0 {
				return fmt.Errorf("%s not set: give the truss geometry (--type, --span, --panels, --depth, ...) or a joint table (--table FILE)", strings.Join(miss, ", "))
			}
			t, aopt, err := g.build()
			if err != nil {
				return err
			}
			l, err := analysis.InfluenceLines(t, aopt)
			if err != nil {
				return err
			}
			sec, _, hasSec, err := sf.bridge(cmd, screening.Bridge{}, false)
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			if hasSec {
				// The lines are per unit load; the shares say how much of each track's load
				// reaches each truss. On standard error for csv and json, which stay as they are.
				sw := w
				if format != "table" {
					sw = cmd.ErrOrStderr()
				}
				printShares(sw, sec)
			}
			switch format {
			case "json":
				return linesJSON(w, t, l, withFloor)
			case "csv":
				// The caution goes to standard error so that the CSV stays machine-readable.
				printCaution(cmd.ErrOrStderr())
				return linesCSV(w, l)
			}
			return linesTable(w, t, l)
		},
	}
	g.add(cmd, false)
	sf.add(cmd)
	cmd.Flags().StringVar(&format, "format", "table", "output: table, csv or json")
	cmd.Flags().BoolVar(&withFloor, "floor", false, "with --format json: add the floor system's lines along the track (one track; stringer moments at mid-span)")
	return cmd
}

// kindOrder groups the members in the table the way an engineer reads a truss.
var kindOrder = []truss.Kind{truss.TopChord, truss.BottomChord, truss.EndPost, truss.Vertical, truss.Diagonal}

func linesTable(w io.Writer, t *truss.Truss, l *analysis.Lines) error {
	p := t.Params
	fmt.Fprintf(w, "%s truss, %s, span %g m, %d panels, depth %g m", p.Type, p.Deck, p.SpanM, p.Panels, p.DepthM)
	if p.EndPosts != "" {
		fmt.Fprintf(w, ", %s end posts", p.EndPosts)
	}
	fmt.Fprintf(w, "\nInfluence lines: member force (kN, tension +) per kN of downward load at each deck panel point.\n")
	fmt.Fprintf(w, "Areas in kN·m per kN/m of uniform load.\n\n")
	head := []string{"member"}
	for _, x := range l.X {
		head = append(head, "x="+strconv.FormatFloat(x, 'f', -1, 64))
	}
	head = append(head, "area+", "area-", "changes sign at x (m)")
	for _, kind := range kindOrder {
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		rows := 0
		for _, m := range l.Members {
			if m.Kind != kind {
				continue
			}
			if rows == 0 {
				fmt.Fprintf(w, "%s\n", kind)
				fmt.Fprintln(tw, strings.Join(head, "\t")+"\t")
			}
			rows++
			cells := []string{m.Label}
			for _, o := range m.Ordinates {
				cells = append(cells, fmt.Sprintf("%.3f", clean(o)))
			}
			pos, neg := analysis.Areas(l.X, m.Ordinates)
			cells = append(cells, fmt.Sprintf("%.3f", clean(pos)), fmt.Sprintf("%.3f", clean(neg)), joinFloats(analysis.SignChanges(l.X, m.Ordinates)))
			fmt.Fprintln(tw, strings.Join(cells, "\t")+"\t")
		}
		if err := tw.Flush(); err != nil {
			return err
		}
		if rows > 0 {
			fmt.Fprintln(w)
		}
	}
	printCaution(w)
	return nil
}

// clean turns the rounding residue of the solver (−0.000) into zero for display.
func clean(v float64) float64 {
	if v > -5e-10 && v < 5e-10 {
		return 0
	}
	return v
}

func joinFloats(xs []float64) string {
	if len(xs) == 0 {
		return "—"
	}
	s := make([]string, len(xs))
	for i, x := range xs {
		s[i] = strconv.FormatFloat(x, 'f', 2, 64)
	}
	return strings.Join(s, ", ")
}

type linesDoc struct {
	Truss   truss.Params `json:"truss"`
	Caution string       `json:"caution"`
	DeckX   []float64    `json:"deck_x"`
	Members []memberLine `json:"members"`
}

type memberLine struct {
	Label string     `json:"label"`
	Kind  truss.Kind `json:"kind"`
	// Unit is the effect's unit per kN of load: kN for a force, kN·m for a floor moment.
	Unit string `json:"unit"`
	// X are a floor element's own points along the track (m); a member's ordinates stand at
	// deck_x.
	X           []float64 `json:"x_m,omitempty"`
	Ordinates   []float64 `json:"ordinates"`
	AreaPos     float64   `json:"area_positive"`
	AreaNeg     float64   `json:"area_negative"`
	SignChanges []float64 `json:"sign_changes_m"`
}

func linesJSON(w io.Writer, t *truss.Truss, l *analysis.Lines, withFloor bool) error {
	doc := linesDoc{Truss: t.Params, Caution: caution, DeckX: l.X}
	for _, m := range l.Members {
		ord := make([]float64, len(m.Ordinates))
		for i, o := range m.Ordinates {
			ord[i] = clean(o)
		}
		pos, neg := analysis.Areas(l.X, m.Ordinates)
		sc := analysis.SignChanges(l.X, m.Ordinates)
		if sc == nil {
			sc = []float64{}
		}
		doc.Members = append(doc.Members, memberLine{Label: m.Label, Kind: m.Kind, Unit: "kN", Ordinates: ord, AreaPos: clean(pos), AreaNeg: clean(neg), SignChanges: sc})
	}
	if withFloor {
		fl, err := floorLines(t)
		if err != nil {
			return err
		}
		doc.Members = append(doc.Members, fl...)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(doc)
}

func linesCSV(w io.Writer, l *analysis.Lines) error {
	cw := csv.NewWriter(w)
	_ = cw.Write([]string{"member", "kind", "x_m", "ordinate"})
	for _, m := range l.Members {
		for i, o := range m.Ordinates {
			_ = cw.Write([]string{safetext.CSVCell(m.Label), safetext.CSVCell(string(m.Kind)), strconv.FormatFloat(l.X[i], 'g', -1, 64), strconv.FormatFloat(clean(o), 'g', 10, 64)})
		}
	}
	cw.Flush()
	return cw.Error()
}
