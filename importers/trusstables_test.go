package importers

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// tableCSV writes a parametric truss as a joint-table file for bridge id, with every
// member's area (mm²) when area > 0.
func tableCSV(t *testing.T, id string, p truss.Params, area float64) string {
	t.Helper()
	tr, err := truss.Build(p)
	if err != nil {
		t.Fatal(err)
	}
	tb := truss.TableOf(tr)
	var b strings.Builder
	b.WriteString("bridge_id,record,name,x_m,y_m,from,to,kind,area_mm2,support\n")
	for _, j := range tb.Joints {
		fmt.Fprintf(&b, "%s,joint,%s,%g,%g,,,,,\n", id, j.Name, j.X, j.Y)
	}
	for _, m := range tb.Members {
		a := ""
		if area > 0 {
			a = fmt.Sprint(area)
		}
		fmt.Fprintf(&b, "%s,member,%s,,,%s,%s,%s,%s,\n", id, m.Label, m.From, m.To, m.Kind, a)
	}
	for _, s := range tb.Supports {
		fmt.Fprintf(&b, "%s,support,%s,,,,,,,%s\n", id, s.Joint, s.Kind)
	}
	for _, d := range tb.Deck {
		fmt.Fprintf(&b, "%s,deck,%s,,,,,,,\n", id, d)
	}
	return b.String()
}

func parseT(t *testing.T, text string, kinds map[string]string) ([]store.Staged[store.TrussTable], []TableNote, error) {
	t.Helper()
	var rows []store.Staged[store.TrussTable]
	notes, _, err := ParseTrussTables("trusses.csv", strings.NewReader(text), kinds, func(s store.Staged[store.TrussTable]) bool {
		rows = append(rows, s)
		return true
	})
	return rows, notes, err
}

var twoSpans = truss.Params{Type: "pratt", SpanM: 48, Panels: 6, DepthM: 7, Spans: 2}

func TestParseTrussTables(t *testing.T) {
	kinds := map[string]string{"T1": "table"}
	rows, notes, err := parseT(t, tableCSV(t, "T1", twoSpans, 12000), kinds)
	if err != nil {
		t.Fatal(err)
	}
	// m + r - 2j for a Pratt continuous over two spans: one redundant reaction (common
	// practice).
	if len(rows) != 1 || len(notes) != 1 || notes[0].Degree != 1 || notes[0].Joints != 24 {
		t.Fatalf("rows %d, notes %+v", len(rows), notes)
	}
	good := tableCSV(t, "T1", twoSpans, 12000)
	lines := strings.Split(good, "\n")
	lineOf := func(prefix string) int {
		for i, l := range lines {
			if strings.HasPrefix(l, prefix) {
				return i + 1
			}
		}
		t.Fatalf("no line %q", prefix)
		return 0
	}
	tests := []struct {
		name       string
		text       string
		line, col  int
		value, msg string
	}{
		{"no areas for an indeterminate truss", tableCSV(t, "T1", twoSpans, 0), 2, 1, "T1", "indeterminate (m + r - 2j = 1)"},
		{"deck out of order", strings.Replace(good, "T1,deck,L3,", "T1,deck,L1,", 1), lineOf("T1,deck,L3,"), 3, "", "on the deck twice"},
		{"member label twice", strings.Replace(good, "T1,member,L1-L2,", "T1,member,L0-L1,", 1), lineOf("T1,member,L1-L2,"), 3, "", "used twice"},
		{"member to no joint", strings.Replace(good, ",L1,L2,bottom-chord,", ",L1,L99,bottom-chord,", 1), lineOf("T1,member,L1-L2,"), 7, "", "no joint"},
		{"bad support", strings.Replace(good, ",,roller", ",,rocker", 1), lineOf("T1,support,L12,"), 10, "rocker", "pin"},
		{"bad record", strings.Replace(good, "T1,deck,L3,", "T1,floor,L3,", 1), lineOf("T1,deck,L3,"), 2, "floor", "joint, member, support or deck"},
		{"x not a number", strings.Replace(good, "T1,joint,L1,8,", "T1,joint,L1,8m,", 1), lineOf("T1,joint,L1,"), 4, "8m", "not a number"},
		// Two diagonals of one span out: one more than the one redundant reaction.
		{"mechanism", dropLines(good, "T1,member,U1-L2,", "T1,member,U2-L3,"), 2, 1, "T1", "joints that move"},
		{"a pratt bridge", strings.ReplaceAll(good, "T1,", "P1,"), 2, 1, "P1", "truss_type \"table\""},
		{"unknown bridge", strings.ReplaceAll(good, "T1,", "X9,"), 2, 1, "X9", "no such bridge"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rows, _, err := parseT(t, tc.text, map[string]string{"T1": "table", "P1": "pratt"})
			if len(rows) != 0 {
				t.Errorf("a bad table was passed on")
			}
			var fe *FileErrors
			if !errors.As(err, &fe) {
				t.Fatalf("got %v, want *FileErrors", err)
			}
			e := fe.Errs[0]
			if e.Line != tc.line || e.Column != tc.col || e.Value != tc.value || !strings.Contains(e.Msg, tc.msg) || !strings.Contains(e.Error(), "trusses.csv") {
				t.Errorf("got %q (line %d, column %d, value %q); want line %d, column %d, value %q, message with %q", e.Error(), e.Line, e.Column, e.Value, tc.line, tc.col, tc.value, tc.msg)
			}
		})
	}
	// Imperial columns: 1 ft = 0.3048 m, 1 in² = 645.16 mm² (exact by definition).
	imp := strings.Replace(good, "x_m,y_m", "x_ft,y_ft", 1)
	imp = strings.Replace(imp, "area_mm2", "area_in2", 1)
	rows, _, err = parseT(t, imp, kinds)
	if err != nil {
		t.Fatal(err)
	}
	tb := decodeTable(t, rows[0].Row.Doc)
	if j := tb.Joints[1]; math.Abs(j.X-8*0.3048) > 1e-12 || math.Abs(tb.Members[0].AreaMM2-12000*645.16) > 1e-6 {
		t.Errorf("imperial joint %+v, area %g", j, tb.Members[0].AreaMM2)
	}
}

func TestImportTrussTables(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	bridges := bridgeHeader + "T1,Thraskholt Table Span,Main,1,table,96,12,7,through,20\nP1,Vellbrae Bridge,Main,2,pratt,48,8,6,through,15\n"
	if _, err := ImportBridges(ctx, db, "bridges.csv", strings.NewReader(bridges), Options{}); err != nil {
		t.Fatal(err)
	}
	text := tableCSV(t, "T1", twoSpans, 12000)
	res, err := ImportTrussTables(ctx, db, "trusses.csv", strings.NewReader(text), Options{Check: true})
	if err != nil {
		t.Fatal(err)
	}
	if res.Counts.Inserted != 1 || len(res.Notes) != 1 || !strings.Contains(res.Notes[0], "= 1") {
		t.Errorf("check: %+v", res)
	}
	if docs, _ := db.TrussTables(ctx, nil); len(docs) != 0 {
		t.Fatalf("--check wrote %d tables", len(docs))
	}
	if res, err = ImportTrussTables(ctx, db, "trusses.csv", strings.NewReader(text), Options{}); err != nil || res.Counts.Inserted != 1 {
		t.Fatalf("import: %+v, %v", res, err)
	}
	if res, err = ImportTrussTables(ctx, db, "trusses.csv", strings.NewReader(text), Options{}); err != nil || res.Counts.Unchanged != 1 {
		t.Fatalf("re-import: %+v, %v", res, err)
	}
	// A bad file writes nothing: the stored table stays as it was.
	bad := strings.Replace(text, ",,roller", ",,rocker", 1) + strings.ReplaceAll(text, "T1,", "T2,")
	if _, err := ImportTrussTables(ctx, db, "trusses.csv", strings.NewReader(bad), Options{}); err == nil {
		t.Fatal("a bad file was accepted")
	}
	docs, err := db.TrussTables(ctx, nil)
	if err != nil || len(docs) != 1 {
		t.Fatalf("tables %d, %v", len(docs), err)
	}
	// Members of a table bridge are checked against the table's labels.
	members := "bridge_id,member,capacity_tension_kn\nT1,U6-U7,2400\n"
	if _, err := ImportMembers(ctx, db, "members.csv", strings.NewReader(members), Options{}); err != nil {
		t.Fatalf("a member of the table: %v", err)
	}
	if _, err := ImportMembers(ctx, db, "members.csv", strings.NewReader("bridge_id,member,capacity_tension_kn\nT1,U1-U9,2400\n"), Options{}); err == nil {
		t.Fatal("a member not in the table was accepted")
	}
}

func decodeTable(t *testing.T, doc []byte) *truss.Table {
	t.Helper()
	var tb truss.Table
	if err := json.Unmarshal(doc, &tb); err != nil {
		t.Fatal(err)
	}
	return &tb
}

// dropLines removes the lines that start with any of the prefixes.
func dropLines(text string, prefixes ...string) string {
	var out []string
	for _, l := range strings.Split(text, "\n") {
		keep := true
		for _, p := range prefixes {
			keep = keep && !strings.HasPrefix(l, p)
		}
		if keep {
			out = append(out, l)
		}
	}
	return strings.Join(out, "\n")
}
