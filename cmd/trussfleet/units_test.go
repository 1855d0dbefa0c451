package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestImperialOutputs imports an invented bridge given in ft and kip/ft, screens it, and reads
// the outputs for people in both systems of units: no floating-point noise from the
// conversion, and imperial values that are the SI ones divided by the exact factors.
func TestImperialOutputs(t *testing.T) {
	url := pgtest.URL(t)
	dir := t.TempDir()
	write := func(name, text string) string { return writeTestFile(t, dir, name, text) }
	write("trains/axle100.yaml", axleTrain("Test axle 100", 100))
	write("trains/axle400.yaml", axleTrain("Test axle 400", 400))
	// 150.3 ft x 0.3048 = 45.81144 m, a value a float holds only approximately.
	write("bridges.csv", "bridge_id,name,line,truss_type,span_ft,panels,depth_ft,deck,dead_load_kip_per_ft\n"+
		"U-1,Imperial span,Test line,pratt,150.3,8,20.1,through,0.7\n")
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 150.3 * units.MPerFt, Panels: 8, DepthM: 20.1 * units.MPerFt})
	if err != nil {
		t.Fatal(err)
	}
	var members strings.Builder
	members.WriteString("bridge_id,member,capacity_tension_kn,capacity_compression_kn\n")
	for _, l := range tr.Labels() {
		c := "100000"
		if l == "L2-L3" {
			c = "700" // flagged under the 400 kN axle
		}
		fmt.Fprintf(&members, "U-1,%s,%s,%s\n", l, c, c)
	}
	write("members.csv", members.String())
	cfg := write("trussfleet.yaml", "scenarios:\n  existing:\n    trains: [axle100]\n  proposed:\n    trains: [axle400]\ndynamic: none\n")
	run := func(args ...string) string {
		t.Helper()
		out, err := runCmd(t, append([]string{"--database-url", url, "--config", cfg}, args...)...)
		if err != nil {
			t.Fatalf("%v: %v\n%s", args, err, out)
		}
		return out
	}
	run("import", "trains", filepath.Join(dir, "trains"))
	run("import", "bridges", filepath.Join(dir, "bridges.csv"))
	run("import", "members", filepath.Join(dir, "members.csv"))

	noNoise := func(what, out string) {
		t.Helper()
		for _, noise := range []string{"00000000", "99999999"} {
			if strings.Contains(out, noise) {
				t.Errorf("%s shows floating-point noise:\n%s", what, out)
			}
		}
	}
	t.Run("bridges list", func(t *testing.T) {
		si := run("bridges", "list")
		noNoise("bridges list", si)
		// exact definition: 150.3 ft x 0.3048 = 45.81144 m, 20.1 ft = 6.12648 m; rounded to 0.01 m.
		if !strings.Contains(si, "span m") || !strings.Contains(si, "45.81") || !strings.Contains(si, "6.13") {
			t.Errorf("SI list:\n%s", si)
		}
		imp := run("bridges", "list", "--units", "imperial")
		noNoise("bridges list --units imperial", imp)
		// exact definitions: back to 150.3 ft, 20.1 ft, 0.70 kip/ft.
		for _, want := range []string{"span ft", "depth ft", "dead kip/ft/truss", "150.3", "20.1", "0.70", "CAUTION"} {
			if !strings.Contains(imp, want) {
				t.Errorf("imperial list lacks %q:\n%s", want, imp)
			}
		}
		csvOut := run("bridges", "list", "--format", "csv", "--units", "imperial")
		noNoise("bridges list --format csv --units imperial", csvOut)
		rows := parseExport(t, "bridges list csv", csvOut)
		// The importer's own imperial columns, with the values as imported.
		if len(rows) != 1 || rows[0]["span_ft"] != "150.3" || rows[0]["depth_ft"] != "20.1" || rows[0]["dead_load_kip_per_ft"] != "0.7" {
			t.Errorf("imperial CSV rows: %v", rows)
		}
		siRows := parseExport(t, "bridges list csv", run("bridges", "list", "--format", "csv"))
		// exact definition: 150.3 ft x 0.3048 = 45.81144 m.
		if len(siRows) != 1 || siRows[0]["span_m"] != "45.81144" {
			t.Errorf("SI CSV rows: %v", siRows)
		}
	})

	run("screen", "--workers", "1")

	t.Run("export", func(t *testing.T) {
		siDir, impDir := filepath.Join(dir, "si"), filepath.Join(dir, "imp")
		run("export", "--format", "json", "--out", siDir)
		run("export", "--format", "csv", "--units", "imperial", "--out", impDir)
		var bridges, members struct {
			Items []map[string]any `json:"items"`
		}
		readJSON(t, filepath.Join(siDir, "priority-bridges.json"), &bridges)
		readJSON(t, filepath.Join(siDir, "priority-members.json"), &members)
		if len(bridges.Items) != 1 || len(members.Items) == 0 {
			t.Fatalf("JSON export: %v, %v", bridges.Items, members.Items)
		}
		if _, ok := bridges.Items[0]["span_ft"]; ok {
			t.Errorf("JSON is SI always, got span_ft: %v", bridges.Items[0])
		}
		b := readExport(t, filepath.Join(impDir, "priority-bridges.csv"))
		m := readExport(t, filepath.Join(impDir, "priority-members.csv"))
		if len(b) != 1 || len(m) != len(members.Items) {
			t.Fatalf("imperial CSV: %v, %v", b, m)
		}
		if _, ok := b[0]["span_m"]; ok {
			t.Errorf("imperial CSV keeps span_m: %v", b[0])
		}
		// exact definitions: ft = m / 0.3048, kip = kN / 4.4482216; rounded to 0.1.
		checks := []struct {
			row        map[string]string
			json       map[string]any
			col, siCol string
			factor     float64
		}{
			{b[0], bridges.Items[0], "span_ft", "span_m", 0.3048},
			{b[0], bridges.Items[0], "governing_head_ft", "governing_head_m", 0.3048},
			{m[0], members.Items[0], "dead_kip", "dead_kn", 4.4482216},
			{m[0], members.Items[0], "live_max_kip", "live_max_kn", 4.4482216},
			{m[0], members.Items[0], "live_min_kip", "live_min_kn", 4.4482216},
			{m[0], members.Items[0], "head_ft", "head_m", 0.3048},
		}
		for _, c := range checks {
			si, ok := c.json[c.siCol].(float64)
			if !ok {
				t.Errorf("JSON %s = %v", c.siCol, c.json[c.siCol])
				continue
			}
			if want := units.Fixed(si/c.factor, 1); c.row[c.col] != want {
				t.Errorf("%s = %q, want %s (%s %v / %v)", c.col, c.row[c.col], want, c.siCol, si, c.factor)
			}
		}
	})

	t.Run("rank", func(t *testing.T) {
		var bridges struct {
			Items []map[string]any `json:"items"`
		}
		readJSON(t, filepath.Join(dir, "si", "priority-bridges.json"), &bridges)
		span := bridges.Items[0]["span_m"].(float64)
		head := bridges.Items[0]["governing_head_m"].(float64)
		out := run("rank", "--units", "imperial")
		noNoise("rank --units imperial", out)
		// exact definition: ft = m / 0.3048, rounded to 0.1 ft.
		for _, want := range []string{"span ft", units.Fixed(span/0.3048, 1), "head at " + units.Fixed(head/0.3048, 1) + " ft", "CAUTION"} {
			if !strings.Contains(out, want) {
				t.Errorf("rank --units imperial lacks %q:\n%s", want, out)
			}
		}
		si := run("rank")
		// rounded to 0.01 m.
		if !strings.Contains(si, "span m") || !strings.Contains(si, units.Fixed(span, 2)) {
			t.Errorf("rank lacks span %s m:\n%s", units.Fixed(span, 2), si)
		}
	})

	t.Run("bad units", func(t *testing.T) {
		out, err := runCmd(t, "--database-url", url, "--config", cfg, "rank", "--units", "metric")
		if err == nil || !strings.Contains(err.Error(), "configuration key units") {
			t.Errorf("rank --units metric: %v\n%s", err, out)
		}
	})
}

func readJSON(t *testing.T, path string, v any) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, v); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
}
