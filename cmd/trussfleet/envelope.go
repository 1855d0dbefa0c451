package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

func init() { commands = append(commands, newEnvelopeCmd) }

func newEnvelopeCmd(a *app) *cobra.Command {
	var g geometryFlags
	var specs []string
	var share float64
	var dynamic, format string
	var bridgeID string
	var sf sectionFlags
	var fl floorFlags
	cmd := &cobra.Command{
		Use:   "envelope",
		Short: "Print every member's largest tension and compression under one or more trains",
		Example: "  trussfleet envelope --type pratt --span 60 --panels 12 --depth 7.5 --train lm71:alpha=1.33\n" +
			"  trussfleet envelope --type pratt --span 60 --panels 12 --depth 7.5 --train northmoor-freight-proposed --train uniform:q=80,min=12,max=48 --dynamic phi3 --format json\n" +
			"  trussfleet envelope --bridge NER-00002 --train cooper:e=80",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx := cmd.Context()
			if err := outputFormat(format, "table", "csv", "json"); err != nil {
				return err
			}
			if len(specs) == 0 {
				return fmt.Errorf("--train: give at least one train; built-in: %s; named trains are train files in configs/trains or stored trains", strings.Join(traffic.BuiltinNames(), "; "))
			}
			dyn, err := traffic.ParseDynamic(dynamic)
			if err != nil {
				return fmt.Errorf("--dynamic: %w", err)
			}
			// The database is opened only for a stored bridge or train.
			look := fleetrun.Lookup{Examples: configs.Trains(), Open: a.openDatabase}
			defer look.Close()
			t, aopt, share, err := envelopeTruss(ctx, cmd, &look, &g, bridgeID, share)
			if err != nil {
				return err
			}
			var stored screening.Bridge
			if bridgeID != "" {
				if stored, err = look.Bridge(ctx, bridgeID); err != nil {
					return fmt.Errorf("--bridge: %w", err)
				}
			}
			sec, rule, hasSec, err := sf.bridge(cmd, stored, bridgeID != "")
			if err != nil {
				return err
			}
			if hasSec {
				share = 1 // each track's full load; the shares come with the tracks
			}
			// A continuous truss's dynamic allowance takes its determinant length.
			dyn = traffic.DynamicFor(dyn, t.SpanLengthsM())
			il, err := analysis.InfluenceLines(t, aopt)
			if err != nil {
				return err
			}
			ord := make([][]float64, len(il.Members))
			for i, m := range il.Members {
				ord[i] = m.Ordinates
			}
			lines, err := envelope.NewLines(il.X, ord)
			if err != nil {
				return err
			}
			opt := envelope.Options{Share: share, Dynamic: dyn}
			var calc envelope.Calculator
			var all, one []envelope.Extremes
			var names []string
			var loads []*envelope.Load
			for _, spec := range specs {
				tr, err := look.Train(ctx, spec)
				if err != nil {
					return fmt.Errorf("--train: %w", err)
				}
				ld, err := envelope.Prepare(tr)
				if err != nil {
					return fmt.Errorf("--train %s: %w", spec, err)
				}
				names = append(names, tr.Name)
				loads = append(loads, ld)
				one, err = calc.Envelope(lines, ld, opt, one)
				if err != nil {
					return fmt.Errorf("--train %s: %w", spec, err)
				}
				if all == nil {
					all = append([]envelope.Extremes(nil), one...)
				} else {
					envelope.Merge(all, one)
				}
			}
			doc := envelopeDoc{
				Caution: caution, Bridge: bridgeID, Trains: names, Share: share, Dynamic: dyn.String(),
				DynamicFactor: dyn.Factor(lines.SpanM()),
			}
			var cases []screening.Envelope
			if hasSec {
				doc.Share, doc.Truss, doc.TrackShares = 0, sf.truss, sec.TrackShares(sf.truss)
				cases = screening.CombineTracks(sf.truss, doc.TrackShares, all, rule)
				for i := range all {
					all[i].Max, all[i].Min = cases[i].Max, cases[i].Min
				}
			}
			for i, m := range il.Members {
				me := memberEnvelope{Label: m.Label, Kind: string(m.Kind), Unit: "kN", Max: extremeDoc(all[i].Max), Min: extremeDoc(all[i].Min)}
				if cases != nil {
					me.MaxCase, me.MinCase = cases[i].MaxCase.String(), cases[i].MinCase.String()
				}
				doc.Members = append(doc.Members, me)
			}
			fl.trussSpacing = sf.spacing
			fs, err := fl.system(ctx, &look, bridgeID, t)
			if err != nil {
				return err
			}
			if doc.Members, err = floorEnvelopes(doc.Members, fs, loads, dyn); err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			switch format {
			case "json":
				enc := json.NewEncoder(w)
				enc.SetIndent("", "  ")
				return enc.Encode(doc)
			case "csv":
				// The caution goes to standard error so that the CSV stays machine-readable.
				printCaution(cmd.ErrOrStderr())
				return envelopeCSV(w, doc)
			}
			return envelopeTable(w, t.Params.Type, lines.SpanM(), doc)
		},
	}
	g.add(cmd, false)
	sf.add(cmd)
	f := cmd.Flags()
	f.StringVar(&bridgeID, "bridge", "", "a stored bridge's id: its geometry and live-load share (truss share × tracks) instead of the geometry flags and --share")
	f.StringArrayVar(&specs, "train", nil, "train: a built-in model (lm71:alpha=1, sw0, sw2, unloaded, cooper:e=80, cooper-alt:e=80, uniform:q=Q,min=M,max=M), a train file, a shipped example train or a stored train by name; repeat for several")
	f.Float64Var(&share, "share", 0.5, "share of the track load carried by one truss (0.5: one track centred between two trusses)")
	f.StringVar(&dynamic, "dynamic", "none", "dynamic allowance: none, fixed:0.2, phi2, phi3, arema (optionally :l=M determinant length, arema :s=M truss spacing)")
	f.StringVar(&format, "format", "table", "output: table, csv or json")
	fl.add(cmd)
	return cmd
}

// envelopeTruss lays out the truss and gives the share of a track's load it carries: the
// stored bridge's (screening.Bridge.LiveShare) with --bridge, else the flags'.
func envelopeTruss(ctx context.Context, cmd *cobra.Command, look *fleetrun.Lookup, g *geometryFlags, bridgeID string, share float64) (*truss.Truss, analysis.Options, float64, error) {
	var none analysis.Options
	if bridgeID == "" {
		if miss := g.missing(cmd); len(miss) > 0 {
			return nil, none, 0, fmt.Errorf("%s not set: give the truss geometry (--type, --span, --panels, --depth, --deck, --end-posts) or a stored bridge (--bridge ID)", strings.Join(miss, ", "))
		}
		if !(share > 0) || share > 1 {
			return nil, none, 0, fmt.Errorf("--share: must lie in (0, 1], got %v", share)
		}
		t, aopt, err := g.build()
		return t, aopt, share, err
	}
	given := g.given(cmd)
	if cmd.Flags().Changed("share") {
		given = append(given, "--share")
	}
	if len(given) > 0 {
		return nil, none, 0, fmt.Errorf("--bridge %s and %s: the stored bridge gives the geometry and the share; give either --bridge or the flags",
			safetext.Terminal(bridgeID), strings.Join(given, ", "))
	}
	b, err := look.Bridge(ctx, bridgeID)
	if err != nil {
		if db, derr := look.DB(ctx); derr == nil {
			err = withBridgeHint(ctx, db, bridgeID, err)
		}
		return nil, none, 0, fmt.Errorf("--bridge: %w", err)
	}
	t, aopt, err := b.Geometry()
	if err != nil {
		return nil, none, 0, fmt.Errorf("--bridge %s: truss geometry: %w", safetext.Terminal(bridgeID), err)
	}
	if !(b.LiveShare() > 0) {
		return nil, none, 0, fmt.Errorf("--bridge %s: truss share %v × tracks %d: must be positive", safetext.Terminal(bridgeID), b.TrussShare, b.Tracks)
	}
	return t, aopt, b.LiveShare(), nil
}

type envelopeDoc struct {
	Caution       string           `json:"caution"`
	Bridge        string           `json:"bridge,omitempty"`
	Trains        []string         `json:"trains"`
	Share         float64          `json:"share"`
	Dynamic       string           `json:"dynamic"`
	DynamicFactor float64          `json:"dynamic_factor"`
	Members       []memberEnvelope `json:"members"`

	// Truss and TrackShares: with a cross-section, the truss shown and its share of each
	// track's load (Share is then 0).
	Truss       string    `json:"truss,omitempty"`
	TrackShares []float64 `json:"track_shares,omitempty"`
}

type memberEnvelope struct {
	Label string `json:"label"`
	Kind  string `json:"kind"`
	// Unit is the values' unit: kN for a truss member's force and a floor element's shear,
	// kN·m for a floor element's moment.
	Unit string      `json:"unit"`
	Max  extremeJSON `json:"max"`
	Min  extremeJSON `json:"min"`
	// The loading cases of the extremes, with a cross-section.
	MaxCase string `json:"max_case,omitempty"`
	MinCase string `json:"min_case,omitempty"`
}

// extremeJSON is one extreme; the placement fields are absent when no train is on the bridge.
type extremeJSON struct {
	Value       float64  `json:"value"`
	Train       string   `json:"train,omitempty"`
	HeadM       *float64 `json:"head_m,omitempty"`
	Direction   string   `json:"direction,omitempty"`
	Count       int      `json:"count,omitempty"`
	LengthM     *float64 `json:"length_m,omitempty"`
	LoadedFromM *float64 `json:"loaded_from_m,omitempty"`
	LoadedToM   *float64 `json:"loaded_to_m,omitempty"`
	TrailingM   *float64 `json:"trailing_m,omitempty"`
}

func extremeDoc(e envelope.Extreme) extremeJSON {
	out := extremeJSON{Value: clean(e.Value)}
	if !e.Loaded {
		return out
	}
	ptr := func(v float64) *float64 {
		if math.IsInf(v, 0) || math.IsNaN(v) {
			return nil
		}
		return &v
	}
	out.Train, out.Direction, out.Count = e.Train, e.Direction.String(), e.Count
	out.HeadM, out.LengthM = ptr(e.HeadM), ptr(e.LengthM)
	out.LoadedFromM, out.LoadedToM = ptr(e.LoadedFromM), ptr(e.LoadedToM)
	if e.TrailingM > 0 {
		out.TrailingM = ptr(e.TrailingM)
	}
	return out
}

func (e extremeJSON) cells() []string {
	if e.Direction == "" {
		return []string{"0", "—", "", "", "", ""}
	}
	f := func(p *float64, prec int) string {
		if p == nil {
			return "—"
		}
		return strconv.FormatFloat(*p, 'f', prec, 64)
	}
	count := ""
	if e.Count > 0 {
		count = strconv.Itoa(e.Count)
	}
	dir := "→"
	if e.Direction == envelope.RightToLeft.String() {
		dir = "←"
	}
	return []string{fmt.Sprintf("%.1f", e.Value), safetext.Cell(e.Train), f(e.HeadM, 2) + " " + dir, count, f(e.LoadedFromM, 2) + "–" + f(e.LoadedToM, 2), ""}
}

func envelopeTable(w io.Writer, typ string, span float64, doc envelopeDoc) error {
	if doc.Bridge != "" {
		fmt.Fprintf(w, "Bridge %s: ", safetext.Terminal(doc.Bridge))
	}
	share := strconv.FormatFloat(doc.Share, 'g', -1, 64)
	if doc.Truss != "" {
		s := make([]string, len(doc.TrackShares))
		for i, v := range doc.TrackShares {
			s[i] = fmt.Sprintf("track %d × %.3f", i+1, v)
		}
		share = "truss " + doc.Truss + " carrying " + strings.Join(s, ", ") + " (lever rule; trains on each track placed independently)"
	}
	fmt.Fprintf(w, "%s truss, span %g m. Member forces in kN (tension +), share %s, dynamic %s (factor %.3f).\n", typ, span, share, doc.Dynamic, doc.DynamicFactor)
	floorNote(w, doc)
	fmt.Fprintf(w, "Trains: %s. Head: position of the train's front (m), arrow: direction of travel.\n\n", safetext.Terminal(strings.Join(doc.Trains, "; ")))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "member\tmax\ttrain\thead\tcount\tloaded\t\tmin\ttrain\thead\tcount\tloaded\t")
	for _, m := range doc.Members {
		fmt.Fprintln(tw, safetext.Cell(m.Label)+"\t"+strings.Join(m.Max.cells(), "\t")+"\t"+strings.Join(m.Min.cells(), "\t"))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	printCaution(w)
	return nil
}

func envelopeCSV(w io.Writer, doc envelopeDoc) error {
	cw := csv.NewWriter(w)
	_ = cw.Write([]string{"member", "kind", "sense", "value_kn", "train", "head_m", "direction", "count", "loaded_from_m", "loaded_to_m", "trailing_m", "unit"})
	num := func(p *float64) string {
		if p == nil {
			return ""
		}
		return strconv.FormatFloat(*p, 'g', 10, 64)
	}
	// Train names come from train files: text cells, kept from a spreadsheet's formulas.
	text := safetext.CSVCell
	for _, m := range doc.Members {
		for _, s := range []struct {
			sense string
			e     extremeJSON
		}{{"max", m.Max}, {"min", m.Min}} {
			count := ""
			if s.e.Count > 0 {
				count = strconv.Itoa(s.e.Count)
			}
			_ = cw.Write([]string{text(m.Label), text(m.Kind), s.sense, strconv.FormatFloat(s.e.Value, 'g', 10, 64), text(s.e.Train), num(s.e.HeadM), text(s.e.Direction), count, num(s.e.LoadedFromM), num(s.e.LoadedToM), num(s.e.TrailingM), text(m.Unit)})
		}
	}
	cw.Flush()
	return cw.Error()
}
