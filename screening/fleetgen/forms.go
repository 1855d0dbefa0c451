package fleetgen

import (
	"encoding/csv"
	"io"
	"math/rand/v2"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// TableHeader is the header of the joint tables written (docs/inventory.md, "Joint tables").
var TableHeader = []string{"bridge_id", "record", "name", "x_m", "y_m", "from", "to", "kind", "area_mm2", "support"}

// Row positions of the bridge columns inventForm changes.
var (
	colType, colSpan, colPanels, colDepth, colDeck = BridgeColumn("truss_type"), BridgeColumn("span_m"), BridgeColumn("panels"), BridgeColumn("depth_m"), BridgeColumn("deck")
	colDepths, colEndDepth, colSpans               = BridgeColumn("depths_m"), BridgeColumn("end_depth_m"), BridgeColumn("spans")
)

// BridgeColumn is the position of a column in BridgeHeader; it panics on a name the header
// does not have (a programming error).
func BridgeColumn(name string) int {
	for i, c := range BridgeHeader {
		if c == name {
			return i
		}
	}
	panic("fleetgen: no bridge column " + name)
}

// inventForm turns some of the parallel-chord bridges into the forms of older fleets:
// subdivided and polygonal Pratts, continuous spans, Howes with listed depths, deck Warrens,
// K-trusses, and (when tables are written) trusses given as joint tables. A form the fleet
// does not have yet is given to the first bridge that can take it, so that even a small
// fleet shows every form; after that the forms are drawn at random.
func inventForm(r *rand.Rand, b *screening.Bridge, row []string, tw *tableWriter) error {
	p := &b.Truss
	k := r.Float64()
	var cands []string
	switch {
	case p.Type == "pratt" && p.Deck == truss.Through:
		cands = []string{"sub-ties", "sub-struts", "parabolic", "spans", "table"}
	case p.Type == "pratt":
		cands = []string{"spans", "table"}
	case p.Type == "howe" && p.Deck == truss.Through:
		cands = []string{"listed", "spans"}
	case p.Type == "howe":
		cands = []string{"spans"}
	case p.Type == "warren":
		cands = []string{"deck"}
	case p.Type == "warren-verticals":
		cands = []string{"k"}
	}
	if !tw.on() && len(cands) > 0 && cands[len(cands)-1] == "table" {
		cands = cands[:len(cands)-1]
	}
	form := ""
	for _, c := range cands {
		if !tw.seen[c+p.Type] {
			form = c
			break
		}
	}
	if form == "" && len(cands) > 0 && k < 0.4 {
		form = cands[int(k/0.4*float64(len(cands)))]
	}
	if form != "" {
		tw.seen[form+p.Type] = true
	}
	switch form {
	case "sub-ties", "sub-struts":
		p.Type = "pratt-" + form
		p.Panels = max(8, p.Panels-p.Panels%4)
	case "parabolic":
		p.EndDepthM = round(p.DepthM*0.7, 0.1)
	case "spans":
		p.Spans = 2
		if p.Type == "howe" {
			p.Spans = 3
		}
	case "table":
		// A two-span continuous Pratt typed in joint by joint, with member areas (its forces
		// depend on them): chords heavier than the web.
		p.Spans = 2
		t, err := truss.Build(*p)
		if err != nil {
			return err
		}
		tb := truss.TableOf(t)
		for i := range tb.Members {
			tb.Members[i].AreaMM2 = 9000
			if tb.Members[i].Kind == truss.TopChord || tb.Members[i].Kind == truss.BottomChord {
				tb.Members[i].AreaMM2 = 16000
			}
		}
		b.Table = tb
		tw.add(b.ID, tb)
		*p = truss.Params{Type: truss.TableType, SpanM: t.SpanM(), Panels: len(t.DeckJoints) - 1, DepthM: p.DepthM, Deck: p.Deck}
	case "listed":
		t, err := truss.Build(truss.Params{Type: p.Type, SpanM: p.SpanM, Panels: p.Panels, DepthM: p.DepthM, EndDepthM: round(p.DepthM*0.75, 0.1)})
		if err != nil {
			return err
		}
		for _, j := range t.Joints {
			if j.Name[0] == 'U' {
				p.DepthsM = append(p.DepthsM, round(j.Y, 0.1))
			}
		}
	case "deck":
		p.Deck = truss.DeckTop
	case "k":
		p.Type = "k-truss"
	}
	row[colType], row[colPanels], row[colDeck] = p.Type, strconv.Itoa(p.Panels), p.Deck
	row[colSpan], row[colDepth] = f(p.SpanM), f(p.DepthM)
	if len(p.DepthsM) > 0 {
		ds := make([]string, len(p.DepthsM))
		for i, d := range p.DepthsM {
			ds[i] = f(d)
		}
		row[colDepths] = strings.Join(ds, " ")
	}
	if p.EndDepthM > 0 {
		row[colEndDepth] = f(p.EndDepthM)
	}
	if p.Spans > 1 {
		row[colSpans] = strconv.Itoa(p.Spans)
	}
	return nil
}

// tableWriter writes joint tables; without an output it writes nothing.
type tableWriter struct {
	w      *csv.Writer
	header bool
	seen   map[string]bool // forms given so far, by form and original type
}

func newTableWriter(out io.Writer) *tableWriter {
	if out == nil {
		return &tableWriter{seen: map[string]bool{}}
	}
	return &tableWriter{w: csv.NewWriter(out), seen: map[string]bool{}}
}

func (tw *tableWriter) on() bool { return tw.w != nil }

func (tw *tableWriter) add(id string, tb *truss.Table) {
	if !tw.header {
		_ = tw.w.Write(TableHeader)
		tw.header = true
	}
	for _, j := range tb.Joints {
		_ = tw.w.Write([]string{id, "joint", j.Name, f(round(j.X, 0.001)), f(round(j.Y, 0.001)), "", "", "", "", ""})
	}
	for _, m := range tb.Members {
		_ = tw.w.Write([]string{id, "member", m.Label, "", "", m.From, m.To, string(m.Kind), f(m.AreaMM2), ""})
	}
	for _, s := range tb.Supports {
		_ = tw.w.Write([]string{id, "support", s.Joint, "", "", "", "", "", "", s.Kind})
	}
	for _, d := range tb.Deck {
		_ = tw.w.Write([]string{id, "deck", d, "", "", "", "", "", "", ""})
	}
}

func (tw *tableWriter) flush() error {
	if tw.w == nil {
		return nil
	}
	if !tw.header {
		_ = tw.w.Write(TableHeader)
	}
	tw.w.Flush()
	return tw.w.Error()
}
