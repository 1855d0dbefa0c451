package importers

import (
	"archive/zip"
	"bytes"
	"math"
	"strings"
	"testing"
	"time"
	"unicode/utf16"

	"github.com/trussfleet/trussfleet/store"
	"github.com/xuri/excelize/v2"
)

// semicolonFile is bridges.csv as a spreadsheet with a decimal comma saves it: semicolons
// between fields, commas in numbers, CRLF line ends.
var semicolonFile = []byte("bridge_id;name;truss_type;span_m;panels;depth_m;deck;dead_load_kn_per_m;latitude;longitude\r\n" +
	"NME-9;Brackwater span 1;pratt;48,5;8;6;through;17,5;-47,2113;-128,417\r\n" +
	"NME-10;\"Fenwold; east span\";warren;36;6;4,6;through;12;;\r\n")

// utf16File encodes text as UTF-16 with its byte-order mark, as a spreadsheet's "Unicode
// text" is saved (unicode/utf16 of the standard library, not the reader's decoder).
func utf16File(text string, bigEndian bool) []byte {
	out := []byte{0xFF, 0xFE}
	if bigEndian {
		out = []byte{0xFE, 0xFF}
	}
	for _, u := range utf16.Encode([]rune(text)) {
		if bigEndian {
			out = append(out, byte(u>>8), byte(u))
		} else {
			out = append(out, byte(u), byte(u>>8))
		}
	}
	return out
}

func parseBytes(t *testing.T, file string, data []byte, sheet string) ([]store.Staged[store.Bridge], Report, error) {
	t.Helper()
	var rows []store.Staged[store.Bridge]
	rep, err := parseBridges(file, bytes.NewReader(data), sheet, func(r store.Staged[store.Bridge]) bool {
		rows = append(rows, r)
		return true
	})
	return rows, rep, err
}

// TestFilesAsOwnersHaveThem reads the same two bridges from the forms spreadsheets save.
func TestFilesAsOwnersHaveThem(t *testing.T) {
	tabs := bytes.ReplaceAll(semicolonFile, []byte(";"), []byte("\t"))
	tabs = bytes.Replace(tabs, []byte("Fenwold\t east"), []byte("Fenwold; east"), 1)
	cases := []struct {
		name   string
		data   []byte
		format string
	}{
		{"semicolons and decimal commas", semicolonFile, "semicolon-separated, decimal comma"},
		{"tabs and decimal commas", tabs, "tab-separated, decimal comma"},
		{"UTF-16 LE with BOM", utf16File(string(semicolonFile), false), "semicolon-separated, decimal comma, UTF-16 LE"},
		{"UTF-16 BE with BOM", utf16File(string(semicolonFile), true), "semicolon-separated, decimal comma, UTF-16 BE"},
		{"UTF-8 with BOM, commas", []byte("\xEF\xBB\xBFbridge_id,name,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m,latitude,longitude\n" +
			"NME-9,Brackwater span 1,pratt,48.5,8,6,through,17.5,-47.2113,-128.417\nNME-10,\"Fenwold; east span\",warren,36,6,4.6,through,12,,\n"),
			"UTF-8 with a byte-order mark"},
		{"UTF-16 LE, commas", utf16File("bridge_id,name,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m,latitude,longitude\n"+
			"NME-9,Brackwater span 1,pratt,48.5,8,6,through,17.5,-47.2113,-128.417\nNME-10,\"Fenwold; east span\",warren,36,6,4.6,through,12,,\n", false),
			"UTF-16 LE"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rows, rep, err := parseBytes(t, "bridges.csv", c.data, "")
			if err != nil {
				t.Fatal(err)
			}
			if rep.Format != c.format {
				t.Errorf("format %q, want %q", rep.Format, c.format)
			}
			if len(rows) != 2 {
				t.Fatalf("%d rows, want 2", len(rows))
			}
			b, b2 := rows[0].Row, rows[1].Row
			// The values as typed in the file, read exactly (no arithmetic: tolerance 1e-12).
			for _, v := range []struct {
				what      string
				got, want float64
			}{{"span", b.SpanM, 48.5}, {"dead load", b.DeadLoadKNPerM, 17.5}, {"latitude", *b.Latitude, -47.2113}, {"depth", b2.DepthM, 4.6}} {
				if math.Abs(v.got-v.want) > 1e-12 {
					t.Errorf("%s %v, want %v", v.what, v.got, v.want)
				}
			}
			if b2.Name != "Fenwold; east span" || rows[1].Line != 3 {
				t.Errorf("second row %q on line %d, want %q on line 3", b2.Name, rows[1].Line, "Fenwold; east span")
			}
		})
	}
}

// TestDecimalCommaErrors checks that a number a thousands separator makes ambiguous is
// refused at its line and column, in every encoding.
func TestDecimalCommaErrors(t *testing.T) {
	head := "bridge_id;truss_type;span_m;panels;depth_m;deck;dead_load_kn_per_m\n"
	cases := []struct {
		name, row    string
		utf16        bool
		line, column int
		field, msg   string
	}{
		{"point and comma", "NME-9;pratt;1.048,5;8;6;through;15\n", false, 2, 3, "span_m", "both a point and a comma"},
		{"two commas", "NME-9;pratt;48;8;6;through;1,500,0\n", false, 2, 7, "dead_load_kn_per_m", "more than one comma"},
		{"point between thousands", "NME-9;pratt;48;8;6;through;12.500\n", false, 2, 7, "dead_load_kn_per_m", "ambiguous"},
		{"space between thousands", "NME-9;pratt;1 048,5;8;6;through;15\n", false, 2, 3, "span_m", "use a decimal comma or point"},
		{"in UTF-16, on the third line", "NME-8;pratt;48;8;6;through;15\nNME-9;pratt;48;8;6,0,0;through;15\n", true, 3, 5, "depth_m", "more than one comma"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			data := []byte(head + c.row)
			if c.utf16 {
				data = utf16File(head+c.row, false)
			}
			rows, _, err := parseBytes(t, "bridges.csv", data, "")
			if err == nil {
				t.Fatalf("no error; rows %+v", rows)
			}
			e := fieldErrors(t, err)[0]
			if e.File != "bridges.csv" || e.Line != c.line || e.Column != c.column || e.Field != c.field || !strings.Contains(e.Msg, c.msg) {
				t.Errorf("got %q; want line %d, column %d (%s), message with %q", e.Error(), c.line, c.column, c.field, c.msg)
			}
		})
	}
	t.Run("a point is still a decimal point", func(t *testing.T) {
		rows, _, err := parseBytes(t, "bridges.csv", []byte(head+"NME-9;pratt;48.25;8;6;through;0.125\n"), "")
		if err != nil || len(rows) != 1 || rows[0].Row.SpanM != 48.25 || rows[0].Row.DeadLoadKNPerM != 0.125 {
			t.Errorf("rows %+v, error %v", rows, err)
		}
	})
}

// workbook builds an .xlsx file with a sheet of notes first and the bridges second.
func workbook(t *testing.T, rows [][]any) []byte {
	t.Helper()
	f := excelize.NewFile()
	defer f.Close()
	f.SetCellValue("Sheet1", "A1", "Inventory of the Northmoor & Eastern Railway (invented)")
	f.SetSheetName("Sheet1", "Notes")
	if _, err := f.NewSheet("Bridges"); err != nil {
		t.Fatal(err)
	}
	for i, r := range rows {
		cell, _ := excelize.CoordinatesToCellName(1, i+1)
		if err := f.SetSheetRow("Bridges", cell, &r); err != nil {
			t.Fatal(err)
		}
	}
	dateStyle, _ := f.NewStyle(&excelize.Style{NumFmt: 14}) // a date as the spreadsheet shows it
	f.SetCellStyle("Bridges", "I2", "I3", dateStyle)
	var buf bytes.Buffer
	if _, err := f.WriteTo(&buf); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func TestWorkbook(t *testing.T) {
	head := []any{"bridge_id", "truss_type", "span_m", "panels", "depth_m", "deck", "dead_load_kn_per_m", "name", "last_inspected"}
	inspected := time.Date(2025, 5, 14, 0, 0, 0, 0, time.UTC)
	good := workbook(t, [][]any{head,
		{"NME-9", "pratt", 48.5, 8, 6, "through", 17.5, "Brackwater span 1", inspected},
		{"NME-10", "warren", 36, 6, 4.6, "through", 12, "Fenwold", nil},
	})
	t.Run("the sheet named", func(t *testing.T) {
		rows, rep, err := parseBytes(t, "bridges.xlsx", good, "Bridges")
		if err != nil {
			t.Fatal(err)
		}
		if rep.Format != `sheet "Bridges" of an .xlsx workbook` || len(rows) != 2 {
			t.Fatalf("format %q, %d rows", rep.Format, len(rows))
		}
		b := rows[0].Row
		if b.SpanM != 48.5 || b.DeadLoadKNPerM != 17.5 || rows[1].Row.DepthM != 4.6 || rows[1].Line != 3 {
			t.Errorf("rows %+v", rows)
		}
		if b.LastInspected == nil || !b.LastInspected.Equal(inspected) {
			t.Errorf("last inspected %v, want %v", b.LastInspected, inspected)
		}
	})
	bad := workbook(t, [][]any{head,
		{"NME-9", "pratt", 48.5, 8, 6, "through", 17.5},
		{"NME-10", "warren", -36, 6, 4.6, "through", "twelve"},
	})
	cases := []struct {
		name, sheet string
		data        []byte
		want        []string
	}{
		{"located errors name sheet, row and column", "Bridges", bad, []string{
			`bridges.xlsx sheet "Bridges" row 3, column C (span_m), value "-36": must be greater than zero`,
			`bridges.xlsx sheet "Bridges" row 3, column G (dead_load_kn_per_m), value "twelve": not a number (use a decimal point, no thousands separators or units)`}},
		{"the first sheet by default", "", good, []string{
			`bridges.xlsx sheet "Notes": the first sheet, "Notes", was read; the workbook's other sheets: Bridges (name the one to read)`,
			`bridges.xlsx sheet "Notes" row 1: missing required column bridge_id`,
			`bridges.xlsx sheet "Notes" row 1: missing required column truss_type`,
			`bridges.xlsx sheet "Notes" row 1: missing required column span_m (or span_ft)`,
			`bridges.xlsx sheet "Notes" row 1: missing required column panels`,
			`bridges.xlsx sheet "Notes" row 1: missing required column depth_m (or depth_ft)`,
			`bridges.xlsx sheet "Notes" row 1: missing required column deck`,
			`bridges.xlsx sheet "Notes" row 1: missing required column dead_load_kn_per_m (or dead_load_kip_per_ft)`}},
		{"a sheet that is not there", "Brdges", good, []string{
			`bridges.xlsx: the workbook has no sheet "Brdges"; its sheets: Notes, Bridges`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rows, _, err := parseBytes(t, "bridges.xlsx", c.data, c.sheet)
			if err == nil {
				t.Fatalf("no error; rows %+v", rows)
			}
			errs := fieldErrors(t, err)
			if len(errs) != len(c.want) {
				t.Fatalf("%d errors, want %d: %v", len(errs), len(c.want), err)
			}
			for i, w := range c.want {
				if got := errs[i].Error(); !strings.HasPrefix(got, w) {
					t.Errorf("error %d:\n got %s\nwant %s", i, got, w)
				}
			}
		})
	}
}

// TestNotACSV checks that files given by mistake are named for what they are.
func TestNotACSV(t *testing.T) {
	var zipped bytes.Buffer
	z := zip.NewWriter(&zipped)
	w, _ := z.Create("bridges.csv")
	w.Write([]byte(bridgeHeader))
	z.Close()
	cases := []struct {
		name, sheet string
		data        []byte
		want        string
	}{
		{"legacy .xls", "", []byte("\xD0\xCF\x11\xE0\xA1\xB1\x1A\xE1\x00\x00"), "bridges.csv: not a CSV file: this is a legacy Excel .xls workbook"},
		{"PDF", "", []byte("%PDF-1.7\n%\xE2\xE3\xCF\xD3\n"), "bridges.csv: not a CSV file: this is a PDF document"},
		{"gzip", "", []byte("\x1F\x8B\x08\x00\x00\x00\x00\x00"), "bridges.csv: not a CSV file: this is a gzip-compressed file"},
		{"ZIP that is not a workbook", "", zipped.Bytes(), "bridges.csv: not a CSV file: this is a ZIP archive that is not an .xlsx workbook"},
		{"sheet named for a text file", "Bridges", []byte(bridgeHeader), `bridges.csv: a sheet ("Bridges") is named, but this is a text file`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, _, err := parseBytes(t, "bridges.csv", c.data, c.sheet)
			if err == nil {
				t.Fatal("no error")
			}
			if got := fieldErrors(t, err)[0].Error(); !strings.HasPrefix(got, c.want) {
				t.Errorf("got  %s\nwant %s", got, c.want)
			}
		})
	}
}

// TestWorkbookMembersAndLimits reads members from a workbook's first sheet, and holds a
// sheet to the bounds of a CSV file.
func TestWorkbookMembersAndLimits(t *testing.T) {
	book := func(rows [][]any) []byte {
		f := excelize.NewFile()
		defer f.Close()
		for i, r := range rows {
			cell, _ := excelize.CoordinatesToCellName(1, i+1)
			if err := f.SetSheetRow("Sheet1", cell, &r); err != nil {
				t.Fatal(err)
			}
		}
		var buf bytes.Buffer
		if _, err := f.WriteTo(&buf); err != nil {
			t.Fatal(err)
		}
		return buf.Bytes()
	}
	head := []any{"bridge_id", "member", "capacity_tension_kn", "capacity_compression_kn", "condition_factor"}
	wide := make([]any, maxFields+1)
	for i := range wide {
		wide[i] = "x"
	}
	long := []any{"NME-1", strings.Repeat("L", maxIDChars+1), 100, 100, 1}
	cases := []struct {
		name string
		rows [][]any
		want string // the first error; "" for none
		n    int    // rows passed on
	}{
		{"good rows, a note and an empty row skipped", [][]any{{"# stored capacities, invented"}, head, {"NME-1", "L0-L1", 1500.5, 1200, 0.9}, {}, {"NME-1", "U1-U2", 900, 850}}, "", 2},
		{"a label beyond its length", [][]any{head, long}, `members.xlsx sheet "Sheet1" row 2, column B (member), value "` + strings.Repeat("L", 39) + `…": 65 characters; member takes at most 64`, 0},
		{"a row of too many cells", [][]any{head, wide}, `members.xlsx sheet "Sheet1" row 2: 1001 cells; at most 1000 are read`, 0},
		{"a bad value", [][]any{head, {"NME-1", "L0-L1", "lots", 100, 1}}, `members.xlsx sheet "Sheet1" row 2, column C (capacity_tension_kn), value "lots": not a number`, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			n := 0
			_, err := parseMembers("members.xlsx", bytes.NewReader(book(c.rows)), "", geometryStub{}, func(store.Staged[store.Member]) bool { n++; return true })
			if n != c.n {
				t.Errorf("%d rows passed on, want %d", n, c.n)
			}
			if c.want == "" {
				if err != nil {
					t.Fatal(err)
				}
				return
			}
			if err == nil {
				t.Fatal("no error")
			}
			if got := fieldErrors(t, err)[0].Error(); !strings.HasPrefix(got, c.want) {
				t.Errorf("got  %s\nwant %s", got, c.want)
			}
		})
	}
}
