package importers

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/trussfleet/trussfleet/internal/bridgegeom"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// tableRecord is a row of a joint-table file (docs/inventory.md, "Joint tables") as text.
type tableRecord struct {
	SrcLine  string `csv:"__line"`
	BridgeID string `csv:"bridge_id"`
	Record   string `csv:"record"`
	Name     string `csv:"name"`
	XM       string `csv:"x_m"`
	XFt      string `csv:"x_ft"`
	YM       string `csv:"y_m"`
	YFt      string `csv:"y_ft"`
	From     string `csv:"from"`
	To       string `csv:"to"`
	Kind     string `csv:"kind"`
	AreaMM2  string `csv:"area_mm2"`
	AreaIn2  string `csv:"area_in2"`
	Support  string `csv:"support"`
}

func (r tableRecord) srcLine() string { return r.SrcLine }

var (
	colX = column{name: "x_m", alt: "x_ft", factor: metresPerFoot}
	colY = column{name: "y_m", alt: "y_ft", factor: metresPerFoot}

	// tableColumns are the columns of a joint-table file.
	tableColumns = []column{
		{name: "bridge_id", required: true, maxChars: maxIDChars}, {name: "record", required: true},
		{name: "name", maxChars: maxIDChars}, colX, colY, {name: "from", maxChars: maxIDChars}, {name: "to", maxChars: maxIDChars},
		{name: "kind"}, colArea, {name: "support"},
	}
)

// maxTableRows bounds one bridge's table: far more than any truss of the fleet has.
const maxTableRows = 5000

// TableNote is what an import found of one bridge's table.
type TableNote struct {
	BridgeID                string
	Joints, Members, Degree int
}

func (n TableNote) String() string {
	return fmt.Sprintf("bridge %s: %d joints, %d members, degree of indeterminacy m + r - 2j = %d", n.BridgeID, n.Joints, n.Members, n.Degree)
}

// tableRows gathers one bridge's records with their lines.
type tableRows struct {
	id    string
	table truss.Table
	// lines of each record by kind, in order
	lines map[string][]int
	first int
}

// ParseTrussTables reads a joint-table file: it checks every row, then every bridge's
// table as a whole (structure, areas where the truss is indeterminate, stability), and
// emits one row per bridge. kinds gives each stored bridge's truss_type; a table is accepted
// only for a bridge whose type is "table" (nil kinds: any bridge id, for a file read on its
// own). The error, if any, is a *FileErrors.
func ParseTrussTables(file string, r io.Reader, kinds map[string]string, emit func(store.Staged[store.TrussTable]) bool) ([]TableNote, Report, error) {
	var order []*tableRows
	byID := map[string]*tableRows{}
	rep, err := parseRows(file, r, "", tableColumns, func(rec tableRecord, p *row) bool {
		id := p.text("bridge_id", rec.BridgeID, true)
		g := byID[id]
		if g == nil && id != "" {
			g = &tableRows{id: id, lines: map[string][]int{}, first: p.line}
			byID[id] = g
			order = append(order, g)
		}
		if g != nil && len(g.lines["joint"])+len(g.lines["member"]) > maxTableRows {
			p.fail("bridge_id", id, "more than %d rows for one bridge", maxTableRows)
			return true
		}
		parseTableRow(rec, p, g)
		return true
	})
	if err != nil {
		return nil, rep, err
	}
	errs := &errorList{file: file}
	fail := func(line int, name, value, format string, args ...any) {
		errs.add(&FieldError{Line: line, Column: rep.columns[name], Field: name, Value: value, Msg: fmt.Sprintf(format, args...)})
	}
	var notes []TableNote
	var good []store.Staged[store.TrussTable]
	for _, g := range order {
		switch kind, ok := kinds[g.id]; {
		case kinds == nil: // a file read on its own (trussfleet lines --table)
		case !ok:
			fail(g.first, "bridge_id", g.id, "no such bridge: import bridges.csv first")
			continue
		case kind != truss.TableType:
			fail(g.first, "bridge_id", g.id, "bridge %s is a %s truss in bridges.csv; give it truss_type %q to use a joint table", g.id, kind, truss.TableType)
			continue
		}
		t, aopt, degree, err := analysis.TableTruss(&g.table)
		if err == nil {
			err = analysis.Stable(t, aopt)
		}
		var te *truss.TableError
		var me *analysis.MechanismError
		switch {
		case errors.As(err, &te) && te.Record != "":
			line := g.lines[te.Record][te.Index]
			fail(line, tableField(te.Field), "", "%s", te.Msg)
			continue
		case errors.As(err, &me):
			fail(g.first, "bridge_id", g.id, "the truss of bridge %s is a mechanism (m + r - 2j = %d): %s", g.id, degree, err)
			continue
		case err != nil:
			fail(g.first, "bridge_id", g.id, "the truss of bridge %s: %v", g.id, err)
			continue
		}
		doc, err := json.Marshal(&g.table)
		if err != nil {
			return nil, rep, err
		}
		notes = append(notes, TableNote{BridgeID: g.id, Joints: len(t.Joints), Members: len(t.Members), Degree: degree})
		good = append(good, store.Staged[store.TrussTable]{Line: g.first, Row: store.TrussTable{BridgeID: g.id, Doc: doc}})
	}
	if err := errs.err(); err != nil {
		return notes, rep, err
	}
	for _, s := range good {
		if !emit(s) {
			break
		}
	}
	return notes, rep, nil
}

// tableField maps a TableError's field to its column.
func tableField(f string) string {
	switch f {
	case "x":
		return "x_m"
	case "area":
		return "area_mm2"
	}
	return f
}

// parseTableRow checks one row and adds it to its bridge's table.
func parseTableRow(r tableRecord, p *row, g *tableRows) {
	kind := strings.ToLower(p.text("record", r.Record, true))
	name := r.Name
	need := func(col, v string) string { return p.text(col, v, true) }
	add := func() {
		if g != nil && p.ok {
			g.lines[kind] = append(g.lines[kind], p.line)
		}
	}
	switch kind {
	case "joint":
		need("name", name)
		c := colX
		c.required = true
		x := p.quantity(c, r.XM, r.XFt)
		c = colY
		c.required = true
		y := p.quantity(c, r.YM, r.YFt)
		if g != nil && p.ok && x != nil && y != nil {
			g.table.Joints = append(g.table.Joints, truss.TableJoint{Name: name, X: *x, Y: *y})
			add()
		}
	case "member":
		from, to := need("from", r.From), need("to", r.To)
		k := truss.Kind(strings.ToLower(need("kind", r.Kind)))
		area := p.quantity(colArea, r.AreaMM2, r.AreaIn2)
		p.positive(p.pick(colArea), pickRaw(p, colArea, r.AreaMM2, r.AreaIn2), area)
		if g != nil && p.ok {
			m := truss.TableMember{Label: name, Kind: k, From: from, To: to}
			if area != nil {
				m.AreaMM2 = *area
			}
			g.table.Members = append(g.table.Members, m)
			add()
		}
	case "support":
		need("name", name)
		s := strings.ToLower(need("support", r.Support))
		if s != "" && s != truss.Pin && s != truss.Roller {
			p.fail("support", r.Support, "must be %q or %q", truss.Pin, truss.Roller)
		}
		if g != nil && p.ok {
			g.table.Supports = append(g.table.Supports, truss.TableSupport{Joint: name, Kind: s})
			add()
		}
	case "deck":
		need("name", name)
		if g != nil && p.ok {
			g.table.Deck = append(g.table.Deck, name)
			add()
		}
	case "":
	default:
		p.fail("record", r.Record, "must be joint, member, support or deck")
	}
}

// ImportTrussTablesFile imports a joint-table file from disk.
func ImportTrussTablesFile(ctx context.Context, db *store.DB, path string, opts Options) (Result, error) {
	file, err := os.Open(path)
	if err != nil {
		return Result{File: path}, err
	}
	defer file.Close()
	return ImportTrussTables(ctx, db, path, file, opts)
}

// ImportTrussTables checks and loads a joint-table file read from r against the bridges
// stored in db: one stored table per bridge, replaced whole. On any error nothing is
// written.
func ImportTrussTables(ctx context.Context, db *store.DB, file string, r io.Reader, opts Options) (Result, error) {
	bridges, err := db.Bridges(ctx)
	if err != nil {
		return Result{File: file}, err
	}
	kinds := make(map[string]string, len(bridges))
	for _, b := range bridges {
		kinds[b.BridgeID] = b.TrussType
	}
	var notes []TableNote
	res, err := load(ctx, db, store.KindTrusses, file, r, opts, []string{"bridge_id"},
		func(r io.Reader, emit func(store.Staged[store.TrussTable]) bool) (Report, error) {
			n, rep, err := ParseTrussTables(file, r, kinds, emit)
			notes = n
			return rep, err
		})
	for _, n := range notes {
		res.Notes = append(res.Notes, n.String())
	}
	return res, err
}

// withTables reads the joint tables of the stored "table" bridges, so that their members'
// labels are known.
func (g *StoredGeometry) withTables(ctx context.Context, db *store.DB) error {
	var ids []string
	for id, b := range g.bridges {
		if b.TrussType == truss.TableType {
			ids = append(ids, id)
		}
	}
	if len(ids) == 0 {
		return nil
	}
	docs, err := db.TrussTables(ctx, ids)
	if err != nil {
		return err
	}
	g.tables = map[string]*truss.Table{}
	for id, doc := range docs {
		g.tables[id] = bridgegeom.Table(doc)
	}
	return nil
}
