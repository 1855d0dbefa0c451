package main

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/importers"
	"github.com/trussfleet/trussfleet/internal/csvtest"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestEndToEnd imports a small fleet, screens it and reads the priority list, against values
// worked by hand. Every bridge is a Pratt truss, span 48 m, 8 panels, depth 6 m. For its
// bottom chord L2-L3 the moment centre is U2 at x = 12 m (method of sections), so
//   - a single axle P gives at most P·12·36/48/6 = 1.5 P, times the truss share 0.5;
//   - a dead load q per truss gives q·12·(48 − 12)/2/6 = 36 q (simple beam, M = q·x(L − x)/2).
//
// With q = 10 kN/m, the existing axle 100 kN and the proposed 400 kN, no dynamic allowance:
// D = 360 kN, L = 75 kN existing, 300 kN proposed; RF = (C − D)/L (working stress).
func TestEndToEnd(t *testing.T) {
	url := pgtest.URL(t)
	dir := t.TempDir()
	write := func(name, text string) string { return writeTestFile(t, dir, name, text) }
	write("trains/axle100.yaml", axleTrain("Test axle 100", 100))
	write("trains/axle400.yaml", axleTrain("Test axle 400", 400))
	write("bridges.csv", "bridge_id,name,line,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m\n"+
		"T-1,Capacity short,Test line,pratt,48,8,6,through,10\n"+
		"T-2,Capacity ample,Test line,pratt,48,8,6,through,10\n"+
		"T-3,Stored rating,Test line,pratt,48,8,6,through,10\n")
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	if err != nil {
		t.Fatal(err)
	}
	var members strings.Builder
	members.WriteString("bridge_id,member,capacity_tension_kn,capacity_compression_kn,rating_factor,reference_train\n")
	for _, l := range tr.Labels() {
		c1, c2, rf := "100000", "100000", "50"
		if l == "L2-L3" {
			c1, c2, rf = "600", "600", "2.0"
		}
		fmt.Fprintf(&members, "T-1,%s,%s,%s,,\n", l, c1, c2)
		if l == "L2-L3" {
			c1, c2 = "900", "900"
		}
		fmt.Fprintf(&members, "T-2,%s,%s,%s,,\n", l, c1, c2)
		fmt.Fprintf(&members, "T-3,%s,,,%s,Test axle 100\n", l, rf)
	}
	write("members.csv", members.String())
	cfg := write("trussfleet.yaml", "scenarios:\n  existing:\n    trains: [axle100]\n  proposed:\n    trains: [axle400]\ndynamic: none\n")

	ctx := context.Background()
	db, err := (&app{cfg: Config{Database: DatabaseConfig{URL: url}}}).openDatabase(ctx)
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	for _, step := range []func() (importers.Result, error){
		func() (importers.Result, error) {
			return importers.ImportTrains(ctx, db, filepath.Join(dir, "trains"), importers.Options{})
		},
		func() (importers.Result, error) {
			return importers.ImportBridgesFile(ctx, db, filepath.Join(dir, "bridges.csv"), importers.Options{})
		},
		func() (importers.Result, error) {
			return importers.ImportMembersFile(ctx, db, filepath.Join(dir, "members.csv"), importers.Options{})
		},
	} {
		if _, err := step(); err != nil {
			t.Fatal(err)
		}
	}
	out, err := runCmd(t, "--database-url", url, "--config", cfg, "screen", "--workers", "2")
	if err != nil {
		t.Fatalf("screen: %v\n%s", err, out)
	}
	if !strings.Contains(out, "completed: 3 bridges") || !strings.Contains(out, "CAUTION") {
		t.Errorf("summary:\n%s", out)
	}
	outDir := filepath.Join(dir, "out")
	if out, err := runCmd(t, "--database-url", url, "--config", cfg, "export", "--format", "csv", "--out", outDir); err != nil {
		t.Fatalf("export: %v\n%s", err, out)
	}
	rows := readExport(t, filepath.Join(outDir, "priority-bridges.csv"))
	const dead, lEx, lPr = 360.0, 75.0, 300.0
	want := []struct {
		id, flags  string
		rfEx, rfPr float64
	}{
		// Load-effect ratio: RF = 2.0 · 75/300 (DOMAIN.md), the existing axle being the reference.
		// Every bridge also has a new reversal: the vertical L3-U3 carries the shear of panel
		// 3–4 (method of sections), influence ordinates 0.125, 0.25, 0.375 at L1..L3 and
		// −0.5, −0.375, −0.25, −0.125 at L4..L7, so D = 10·6·(0.75 − 1.25) = −30 kN while the
		// largest live tension is 0.5·P·0.375: 18.75 kN existing (D + L < 0), 75 kN proposed
		// (D + L > 0).
		{"T-3", "exceeds;worse;new-reversal", 2.0, 2.0 * lEx / lPr},
		{"T-1", "exceeds;worse;new-reversal", (600 - dead) / lEx, (600 - dead) / lPr},
		{"T-2", "worse;new-reversal", (900 - dead) / lEx, (900 - dead) / lPr},
	}
	if len(rows) != len(want) {
		t.Fatalf("%d rows: %v", len(rows), rows)
	}
	for i, w := range want {
		r := rows[i]
		if r["bridge_id"] != w.id || r["rank"] != strconv.Itoa(i+1) || r["worst_member"] != "L2-L3" || r["flags"] != w.flags {
			t.Errorf("rank %d: %v, want %s worst L2-L3 flags %s", i+1, r, w.id, w.flags)
		}
		for col, v := range map[string]float64{"rf_existing": w.rfEx, "rf_proposed": w.rfPr} {
			got, err := strconv.ParseFloat(r[col], 64)
			if err != nil || math.Abs(got-v) > 1e-4 {
				t.Errorf("%s %s = %q, want %.4f", w.id, col, r[col], v)
			}
		}
		// The proposed axle stood over L2 (x = 12 m) for the worst member: its front 1 m
		// ahead of it in the direction of travel.
		head, _ := strconv.ParseFloat(r["governing_head_m"], 64)
		ahead := 1.0
		if r["governing_direction"] == "right-to-left" {
			ahead = -1.0
		}
		if r["governing_train"] != "Test axle 400" || r["governing_sense"] != "tension" || math.Abs(head-ahead-12) > 1e-4 {
			t.Errorf("%s governing %q %q head %v", w.id, r["governing_train"], r["governing_sense"], head)
		}
	}
	// The member-level list holds L3-U3 of each bridge with its reversal.
	ms := readExport(t, filepath.Join(outDir, "priority-members.csv"))
	reversals := 0
	for _, m := range ms {
		if m["member"] == "L3-U3" && strings.Contains(m["flags"], "new-reversal") {
			reversals++
			if d, _ := strconv.ParseFloat(m["dead_kn"], 64); math.Abs(d+30) > 1e-3 {
				t.Errorf("%s L3-U3 dead %v, want -30", m["bridge_id"], d)
			}
		}
	}
	if reversals != 3 {
		t.Errorf("%d L3-U3 reversals in the member list, want 3", reversals)
	}
	// Every member of T-1 and T-2 holds both capacities: none is unrated. T-3 has at least
	// L3-U3 unrated (below), and no-capacity is not among its flags (flag_unrated is off).
	for _, r := range rows {
		n, err := strconv.Atoi(r["unrated_members"])
		if err != nil || (r["bridge_id"] == "T-3") != (n > 0) {
			t.Errorf("%s unrated_members %q", r["bridge_id"], r["unrated_members"])
		}
	}
	// T-3's L3-U3 holds only a stored RF (50) for the existing axle. Under that axle
	// D + L_t = −30 + 18.75 = −11.25 kN and D − L_c = −30 − 0.5·100·0.5 = −55 kN: compression
	// governs, so the stored RF rates compression only, 50·25/100 = 12.5 under the proposed
	// axle; the proposed tension (75 kN, D + L = +45) is unrated, not rated from a factor
	// that says nothing of tension.
	out, err = runCmd(t, "--database-url", url, "--config", cfg, "explain", "T-3", "L3-U3")
	if err != nil || !strings.Contains(out, "rated in compression (not given in the inventory") || !strings.Contains(out, "unrated in tension") ||
		!strings.Contains(out, "12.50") || !strings.Contains(out, "CAUTION") {
		t.Errorf("explain T-3 L3-U3: %v\n%s", err, out)
	}
	// explain shows the hand-worked arithmetic of T-1's L2-L3: D = 360, L = 300, RF = 0.80.
	out, err = runCmd(t, "--database-url", url, "--config", cfg, "explain", "T-1", "L2-L3")
	if err != nil || !strings.Contains(out, "+360.0") || !strings.Contains(out, "300.0") || !strings.Contains(out, "0.80") || !strings.Contains(out, "CAUTION") {
		t.Errorf("explain: %v\n%s", err, out)
	}
	// Member labels regardless of case; bridge ids exactly, with a hint at the id meant.
	if out2, err := runCmd(t, "--database-url", url, "--config", cfg, "explain", "T-1", "l2-l3"); err != nil || out2 != out {
		t.Errorf("explain T-1 l2-l3: %v; same as L2-L3: %v", err, out2 == out)
	}
	if _, err := runCmd(t, "--database-url", url, "--config", cfg, "explain", "t-1", "L2-L3"); err == nil || !strings.Contains(err.Error(), "did you mean T-1?") {
		t.Errorf("explain t-1: got %v, want not found with a hint at T-1", err)
	}
	site := filepath.Join(dir, "report")
	if out, err := runCmd(t, "--database-url", url, "--config", cfg, "report", "--out", site); err != nil {
		t.Errorf("report: %v\n%s", err, out)
	}
	for _, id := range []string{"T-1", "T-2", "T-3"} {
		if _, err := os.Stat(filepath.Join(site, "bridge-"+id+".html")); err != nil {
			t.Errorf("report page of %s: %v", id, err)
		}
	}
	out, err = runCmd(t, "--database-url", url, "--config", cfg, "rank")
	if err != nil || strings.Index(out, "T-3") > strings.Index(out, "T-1") || strings.Index(out, "T-1") > strings.Index(out, "T-2") {
		t.Errorf("rank: %v\n%s", err, out)
	}
}

// writeTestFile writes text to dir/name, making the folders on the way, and returns the path.
func writeTestFile(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, []byte(text), 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// axleTrain is the text of a train file of one axle of p kN.
func axleTrain(name string, p float64) string {
	return fmt.Sprintf("name: %q\nunits: si\nvehicles:\n  - id: a\n    length: 2\n    axles:\n      - {at: 1, load: %g}\nconsist:\n  - {vehicle: a, count: 1}\n", name, p)
}

// readExport reads an export CSV (after its caution line) into maps by column.
func readExport(t *testing.T, path string) []map[string]string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return parseExport(t, path, string(data))
}

// parseExport reads the text of an export CSV, named what, into maps by column.
func parseExport(t *testing.T, what, data string) []map[string]string {
	t.Helper()
	first, rest, _ := strings.Cut(data, "\n")
	if !strings.HasPrefix(first, "# CAUTION") {
		t.Errorf("%s starts %q, want the caution", what, first)
	}
	return csvtest.Rows(t, strings.NewReader(rest))
}
