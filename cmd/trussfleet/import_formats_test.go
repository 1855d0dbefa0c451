package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store/pgtest"
	"github.com/xuri/excelize/v2"
)

// TestImportSaysHowItRead imports the forms spreadsheets save and reads what the command
// says; a workbook with a bad row writes nothing.
func TestImportSaysHowItRead(t *testing.T) {
	url := pgtest.URL(t)
	dir := t.TempDir()
	semi := filepath.Join(dir, "bridges.csv")
	os.WriteFile(semi, []byte("bridge_id;truss_type;span_m;panels;depth_m;deck;dead_load_kn_per_m\r\n"+
		"NME-9;pratt;48,5;8;6;through;17,5\r\nNME-10;warren;36;6;4,6;through;12\r\n"), 0o644)
	book := func(name string, span any) string {
		f := excelize.NewFile()
		defer f.Close()
		f.SetSheetName("Sheet1", "Notes")
		f.NewSheet("Bridges")
		for i, r := range [][]any{
			{"bridge_id", "truss_type", "span_m", "panels", "depth_m", "deck", "dead_load_kn_per_m"},
			{"NME-9", "pratt", 50, 8, 6, "through", 17.5},
			{"NME-10", "warren", span, 6, 4.6, "through", 12},
		} {
			cell, _ := excelize.CoordinatesToCellName(1, i+1)
			f.SetSheetRow("Bridges", cell, &r)
		}
		path := filepath.Join(dir, name)
		if err := f.SaveAs(path); err != nil {
			t.Fatal(err)
		}
		return path
	}
	bad := book("bad.xlsx", "36 m")
	good := book("good.xlsx", 36)
	cases := []struct {
		name    string
		args    []string
		want    string
		wantErr bool
	}{
		{"semicolons", []string{"import", "bridges", semi}, "2 inserted, 0 updated, 0 unchanged", false},
		{"semicolons, said", []string{"import", "bridges", "--check", semi}, "  read as semicolon-separated, decimal comma\n", false},
		{"a bad workbook", []string{"import", "bridges", "--sheet", "Bridges", bad},
			bad + ` sheet "Bridges" row 3, column C (span_m), value "36 m": not a number`, true},
		{"nothing of it written", []string{"import", "bridges", semi}, "0 inserted, 0 updated, 2 unchanged", false},
		{"the workbook's sheet", []string{"import", "bridges", "--sheet", "Bridges", good}, "0 inserted, 1 updated, 1 unchanged", false},
		{"the sheet, said", []string{"import", "bridges", "--check", "--sheet", "Bridges", good}, `  read as sheet "Bridges" of an .xlsx workbook`, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, err := runCmd(t, append([]string{"--database-url", url}, c.args...)...)
			if (err != nil) != c.wantErr {
				t.Fatalf("error %v, want one: %v\n%s", err, c.wantErr, out)
			}
			got := out
			if err != nil {
				got = err.Error()
			}
			if !strings.Contains(got, c.want) {
				t.Errorf("got:\n%s\nwant it to hold %q", got, c.want)
			}
		})
	}
}
