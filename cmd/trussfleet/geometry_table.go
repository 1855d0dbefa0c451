package main

import (
	"fmt"
	"os"
	"sort"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/importers"
	"github.com/trussfleet/trussfleet/internal/bridgegeom"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// addForms defines the flags of the truss forms of older fleets and of joint tables.
func (g *geometryFlags) addForms(cmd *cobra.Command) {
	f := cmd.Flags()
	f.StringVar(&g.depths, "depths", "", `polygonal top chord: the depth at every top-chord joint, left to right, m ("6.5 8.2 9.1 ...")`)
	f.Float64Var(&g.p.EndDepthM, "end-depth", 0, "parabolic top chord: the depth at the first and last top-chord joints, m (--depth at midspan)")
	f.IntVar(&g.p.Spans, "spans", 0, "continuous over this many equal spans of --span each (2 or 3; pratt, howe, warren-verticals)")
	f.StringVar(&g.table, "table", "", "a joint-table file (docs/inventory.md, Joint tables) instead of the parametric flags")
	f.StringVar(&g.tableBridge, "table-bridge", "", "the bridge_id of the table to read from --table (needed when the file holds several)")
}

// parseDepths reads --depths: numbers separated by spaces or commas.
func (g *geometryFlags) parseDepths() error {
	g.p.DepthsM = nil
	for _, v := range strings.FieldsFunc(g.depths, func(r rune) bool { return r == ' ' || r == ',' }) {
		d, err := strconv.ParseFloat(v, 64)
		if err != nil {
			return fmt.Errorf("--depths %q: %q is not a number", g.depths, v)
		}
		g.p.DepthsM = append(g.p.DepthsM, d)
	}
	return nil
}

// fromTable reads the joint-table file of --table, with the importer's checks, and lays
// out the truss of one of its bridges.
func (g *geometryFlags) fromTable() (*truss.Truss, analysis.Options, error) {
	var none analysis.Options
	f, err := os.Open(g.table)
	if err != nil {
		return nil, none, fmt.Errorf("--table: %w", err)
	}
	defer f.Close()
	docs := map[string]store.TrussTable{}
	if _, _, err := importers.ParseTrussTables(g.table, f, nil, func(s store.Staged[store.TrussTable]) bool {
		docs[s.Row.BridgeID] = s.Row
		return true
	}); err != nil {
		return nil, none, err
	}
	id := g.tableBridge
	if id == "" {
		if len(docs) != 1 {
			ids := make([]string, 0, len(docs))
			for k := range docs {
				ids = append(ids, k)
			}
			sort.Strings(ids)
			return nil, none, fmt.Errorf("--table %s holds %d tables (%s): name one with --table-bridge", g.table, len(docs), safetext.Terminal(strings.Join(ids, ", ")))
		}
		for k := range docs {
			id = k
		}
	}
	doc, ok := docs[id]
	if !ok {
		return nil, none, fmt.Errorf("--table-bridge %s: no table for it in %s", safetext.Terminal(id), g.table)
	}
	t, opt, _, err := analysis.TableTruss(bridgegeom.Table(doc.Doc))
	if err == nil {
		err = analysis.Stable(t, opt)
	}
	if err != nil {
		return nil, none, fmt.Errorf("--table %s, bridge %s: %w", g.table, safetext.Terminal(id), err)
	}
	return t, opt, nil
}

// depthsCell writes a polygonal top chord's depths as bridges.csv takes them.
func depthsCell(ds []float64, u units.System) string {
	s := make([]string, len(ds))
	for i, d := range ds {
		s[i] = u.Exact(units.Length, d)
	}
	return strings.Join(s, " ")
}

// endDepthCell writes a parabolic chord's end depth; "" for none.
func endDepthCell(d float64, u units.System) string {
	if d == 0 {
		return ""
	}
	return u.Exact(units.Length, d)
}
