package main

import (
	"context"
	"fmt"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestImportMembersReplace: a bridge re-imported with another panel count keeps its member
// rows of the older geometry, and screening it fails with the hint to replace; "import members
// --replace" removes them (with --check it only counts them), and the bridge then screens.
// The count expected is the set difference of the two geometries' labels, computed here from
// truss.Build independently of the SQL that removes the rows.
func TestImportMembersReplace(t *testing.T) {
	url := pgtest.URL(t)
	dir := t.TempDir()
	write := func(name, text string) string { return writeTestFile(t, dir, name, text) }
	write("trains/axle100.yaml", axleTrain("Test axle 100", 100))
	write("trains/axle200.yaml", axleTrain("Test axle 200", 200))
	cfg := write("trussfleet.yaml", "scenarios:\n  existing:\n    trains: [axle100]\n  proposed:\n    trains: [axle200]\ndynamic: none\n")
	bridges := func(panels int) string {
		return write("bridges.csv", "bridge_id,name,line,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m\n"+
			fmt.Sprintf("R-1,Replaced span,Test line,pratt,48,%d,6,through,15\n", panels)+
			"R-2,Kept span,Test line,pratt,48,8,6,through,15\n")
	}
	labelsOf := func(panels int) []string {
		tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: panels, DepthM: 6})
		if err != nil {
			t.Fatal(err)
		}
		return tr.Labels()
	}
	members := func(r1 []string, withR2 bool) string {
		var b strings.Builder
		b.WriteString("bridge_id,member,capacity_tension_kn,capacity_compression_kn\n")
		for _, l := range r1 {
			fmt.Fprintf(&b, "R-1,%s,100000,100000\n", l)
		}
		if withR2 {
			for _, l := range labelsOf(8) {
				fmt.Fprintf(&b, "R-2,%s,100000,100000\n", l)
			}
		}
		return write("members.csv", b.String())
	}
	run := func(wantErr bool, args ...string) string {
		t.Helper()
		out, err := runCmd(t, append([]string{"--database-url", url, "--config", cfg}, args...)...)
		if (err != nil) != wantErr {
			t.Fatalf("%v: error %v\n%s", args, err, out)
		}
		if err != nil {
			out += err.Error()
		}
		return out
	}
	run(false, "import", "trains", filepath.Join(dir, "trains"))
	run(false, "import", "bridges", bridges(8))
	run(false, "import", "members", members(labelsOf(8), true))

	// The bridge now has 6 panels: labels of the 8-panel truss it no longer has.
	old, now := labelsOf(8), labelsOf(6)
	inNow := map[string]bool{}
	for _, l := range now {
		inNow[l] = true
	}
	dropped := 0
	for _, l := range old {
		if !inNow[l] {
			dropped++
		}
	}
	if dropped == 0 {
		t.Fatal("the 6-panel truss has every label of the 8-panel one: the test would check nothing")
	}
	run(false, "import", "bridges", bridges(6))
	out := run(false, "import", "members", members(now, false))
	if strings.Contains(out, "removed") {
		t.Errorf("an import without --replace speaks of removed rows:\n%s", out)
	}
	screened := run(true, "screen")
	if !strings.Contains(screened, "(import members.csv with --replace to drop rows of an older geometry)") {
		t.Errorf("screening with rows of the older geometry:\n%s", screened)
	}

	out = run(false, "import", "members", "--check", "--replace", filepath.Join(dir, "members.csv"))
	if !strings.Contains(out, fmt.Sprintf("leave %d unchanged, remove %d.", len(now), dropped)) {
		t.Errorf("--check --replace, want %d to remove:\n%s", dropped, out)
	}
	out = run(false, "import", "members", "--replace", filepath.Join(dir, "members.csv"))
	if !regexp.MustCompile(fmt.Sprintf(`, %d unchanged, %d removed \(import \d+`, len(now), dropped)).MatchString(out) {
		t.Errorf("--replace, want %d removed:\n%s", dropped, out)
	}
	// R-2, in the first file only, keeps its rows: the count removed is R-1's alone, and both
	// bridges now screen.
	run(false, "screen")
}

// TestDemoReplacesOlderMembers: a database that holds a demo bridge's member row of another
// geometry (as one made by an older demo fleet does) screens the whole demo fleet again:
// the demo's members.csv replaces the rows of the bridges it lists.
func TestDemoReplacesOlderMembers(t *testing.T) {
	if testing.Short() {
		t.Skip("screens the whole demo fleet")
	}
	ctx := context.Background()
	url := pgtest.URL(t)
	root := filepath.Join("..", "..")
	base := []string{"--database-url", url}
	if out, err := runCmd(t, append(base, "import", "bridges", filepath.Join(root, "testdata", "demo", "bridges.csv"))...); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	db, err := store.Open(ctx, store.Options{URL: url})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	// A label no demo geometry has: written past the importer, which checks labels against
	// the bridge's present geometry, as the rows of an older geometry were once checked.
	if _, err := db.Pool.Exec(ctx, `INSERT INTO members (bridge_id, member, truss, capacity_tension_kn, condition_factor)
		VALUES ('NER-00001', 'L98-L99', '', 1000, 1)`); err != nil {
		t.Fatal(err)
	}
	out, err := runCmd(t, append(base, "demo", "--from", filepath.Join(root, "testdata", "demo"),
		"--trains", filepath.Join(root, "configs", "trains"), "--traffic", filepath.Join(root, "testdata", "demo", "traffic.yaml"),
		"--out", t.TempDir())...)
	if err != nil {
		t.Fatalf("demo over an older member row: %v\n%s", err, out)
	}
	if !regexp.MustCompile(`Imported members .*, 1 removed\n`).MatchString(out) {
		t.Errorf("demo output, want the older row removed:\n%s", out)
	}
	ms, err := db.Members(ctx, "NER-00001")
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range ms {
		if m.Member == "L98-L99" {
			t.Errorf("the older row is still stored")
		}
	}
}
