package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/geojson"
	"github.com/trussfleet/trussfleet/screening/network"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// TestNetworkCommands screens three invented bridges of one line and reads the network view
// back through corridors (JSON) and map: the bridges in chainage order; for each category the
// weakest links exactly the bridges whose highest categories dominate none that covers it
// (brute force over EN 15528's partial order, values from memory); the map with a point at
// [longitude, latitude] for each bridge with coordinates (RFC 7946 section 3.1.1, read by a
// general-purpose GeoJSON reader) and the one without left out and counted.
func TestNetworkCommands(t *testing.T) {
	url := pgtest.URL(t)
	dir := t.TempDir()
	write := func(name, text string) string { return writeTestFile(t, dir, name, text) }
	write("trains/axle100.yaml", axleTrain("Test axle 100", 100))
	write("bridges.csv", "bridge_id,name,line,chainage_km,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m,latitude,longitude\n"+
		"N-1,Strong bridge,Test line,5.0,pratt,48,8,6,through,10,-33.5,-70.25\n"+
		"N-2,Weak hanger,Test line,2.0,pratt,48,8,6,through,10,57.25,12.5\n"+
		"N-3,No position,Test line,8.0,pratt,48,8,6,through,10,,\n")
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	if err != nil {
		t.Fatal(err)
	}
	var members strings.Builder
	members.WriteString("bridge_id,member,capacity_tension_kn,capacity_compression_kn\n")
	for _, l := range tr.Labels() {
		fmt.Fprintf(&members, "N-1,%s,100000,100000\n", l)
		c := "100000"
		if l == "L1-U1" {
			c = "300" // the hanger: short of the heavier categories' axle loads
		}
		fmt.Fprintf(&members, "N-2,%s,%s,100000\n", l, c)
		fmt.Fprintf(&members, "N-3,%s,100000,100000\n", l)
	}
	write("members.csv", members.String())
	cfg := write("trussfleet.yaml", "scenarios:\n  existing:\n    trains: [axle100]\n  proposed:\n    trains: [axle100]\ndynamic: none\n")
	for _, args := range [][]string{{"import", "trains", filepath.Join(dir, "trains")}, {"import", "bridges", filepath.Join(dir, "bridges.csv")},
		{"import", "members", filepath.Join(dir, "members.csv")}, {"screen", "--workers", "2"}} {
		if out, err := runCmd(t, append([]string{"--database-url", url, "--config", cfg}, args...)...); err != nil {
			t.Fatalf("%v: %v\n%s", args, err, out)
		}
	}

	out, err := runCmd(t, "--database-url", url, "--config", cfg, "corridors", "--format", "json")
	if err != nil {
		t.Fatalf("corridors: %v\n%s", err, out)
	}
	var doc struct {
		Caution string `json:"caution"`
		Lines   []struct {
			Line    string `json:"line"`
			Bridges []struct {
				BridgeID   string   `json:"bridge_id"`
				Categories []string `json:"categories"`
			} `json:"bridges"`
			Categories []struct {
				Category string `json:"category"`
				Open     bool   `json:"open"`
				Weakest  []struct {
					BridgeID string `json:"bridge_id"`
				} `json:"weakest_links"`
			} `json:"categories"`
		} `json:"lines"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatalf("corridors JSON: %v\n%s", err, out)
	}
	if len(doc.Lines) != 1 || doc.Caution == "" {
		t.Fatalf("corridors: %s", out)
	}
	l := doc.Lines[0]
	var order []string
	carries := map[string][]string{}
	for _, b := range l.Bridges {
		order = append(order, b.BridgeID)
		carries[b.BridgeID] = b.Categories
	}
	if strings.Join(order, " ") != "N-2 N-1 N-3" {
		t.Errorf("chainage order %v, want N-2 N-1 N-3 (km 2, 5, 8)", order)
	}
	covers := func(id string, c network.Category) bool {
		for _, h := range carries[id] {
			if top, ok := network.ByName(h); ok && top.Dominates(c) {
				return true
			}
		}
		return false
	}
	e5Weak := false
	for _, k := range l.Categories {
		c, _ := network.ByName(k.Category)
		var want, got []string
		for _, id := range order {
			if !covers(id, c) {
				want = append(want, id)
			}
		}
		for _, w := range k.Weakest {
			got = append(got, w.BridgeID)
		}
		if strings.Join(got, " ") != strings.Join(want, " ") || k.Open != (len(want) == 0) {
			t.Errorf("%s: weakest links %v (open %v), want %v", k.Category, got, k.Open, want)
		}
		if k.Category == "E5" && strings.Join(got, " ") == "N-2" {
			e5Weak = true
		}
	}
	if !e5Weak || len(carries["N-1"]) != 1 || carries["N-1"][0] != "E5" {
		t.Errorf("N-1 carries %v (want E5); E5's weakest link N-2: %v", carries["N-1"], e5Weak)
	}

	outDir := filepath.Join(dir, "out")
	stdout, stderr, err := runCmdErr(t, "--database-url", url, "--config", cfg, "map", "--out", outDir)
	if err != nil || !strings.Contains(stderr, "1 bridge without valid coordinates") {
		t.Fatalf("map: %v\n%s\n%s", err, stdout, stderr)
	}
	data, err := os.ReadFile(filepath.Join(outDir, "bridges-map.geojson"))
	if err != nil {
		t.Fatal(err)
	}
	fc, err := geojson.UnmarshalFeatureCollection(data)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]orb.Point{"N-1": {-70.25, -33.5}, "N-2": {12.5, 57.25}} // [lon, lat]
	if len(fc.Features) != 2 {
		t.Fatalf("%d features, want 2", len(fc.Features))
	}
	for _, f := range fc.Features {
		id := f.Properties.MustString("bridge_id")
		if p, ok := f.Geometry.(orb.Point); !ok || p != want[id] {
			t.Errorf("%s at %v, want %v", id, f.Geometry, want[id])
		}
	}
}
