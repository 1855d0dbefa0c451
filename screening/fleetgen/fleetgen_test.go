package fleetgen_test

import (
	"bytes"
	"encoding/csv"
	"strconv"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

func generate(t *testing.T, n int, seed uint64) (bridges, members [][]string) {
	t.Helper()
	ref, err := traffic.ParseSpec("northmoor-freight-today", configs.Trains())
	if err != nil {
		t.Fatal(err)
	}
	opt := fleetgen.Defaults(n)
	opt.Seed, opt.Reference = seed, ref
	var b, m bytes.Buffer
	if err := fleetgen.Generate(opt, &b, &m); err != nil {
		t.Fatal(err)
	}
	br, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	mr, err := csv.NewReader(&m).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return br, mr
}

// TestFleet: the same seed gives the same fleet; every bridge builds; every member row holds
// capacities or a stored rating factor with its train, and names a member of its bridge.
func TestFleet(t *testing.T) {
	b1, m1 := generate(t, 60, 7)
	b2, m2 := generate(t, 60, 7)
	if len(b1) != 61 || len(b1) != len(b2) || len(m1) != len(m2) {
		t.Fatalf("sizes %d/%d bridges, %d/%d members", len(b1), len(b2), len(m1), len(m2))
	}
	for i := range m1 {
		for j := range m1[i] {
			if m1[i][j] != m2[i][j] {
				t.Fatalf("row %d differs between two runs with one seed", i)
			}
		}
	}
	labels := map[string]map[string]bool{}
	forms := map[string]bool{}
	types := map[string]bool{}
	floors := 0
	for _, r := range b1[1:] {
		span, _ := strconv.ParseFloat(r[5], 64)
		n, _ := strconv.Atoi(r[6])
		depth, _ := strconv.ParseFloat(r[7], 64)
		p := truss.Params{Type: r[4], SpanM: span, Panels: n, DepthM: depth, Deck: r[8], EndPosts: r[9]}
		for _, d := range strings.Fields(r[fleetgen.BridgeColumn("depths_m")]) {
			v, _ := strconv.ParseFloat(d, 64)
			p.DepthsM = append(p.DepthsM, v)
		}
		p.EndDepthM, _ = strconv.ParseFloat(r[fleetgen.BridgeColumn("end_depth_m")], 64)
		p.Spans, _ = strconv.Atoi(r[fleetgen.BridgeColumn("spans")])
		types[r[4]] = true
		forms["listed depths"] = forms["listed depths"] || len(p.DepthsM) > 0
		forms["parabolic chord"] = forms["parabolic chord"] || p.EndDepthM > 0
		forms["continuous"] = forms["continuous"] || p.Spans > 1
		forms["deck warren"] = forms["deck warren"] || (p.Type == "warren" && p.Deck == truss.DeckTop)
		if p.Type == truss.TableType {
			continue // generated only with a table output (TestFleetTables)
		}
		tr, err := truss.Build(p)
		if err != nil {
			t.Fatalf("bridge %s: %v", r[0], err)
		}
		labels[r[0]] = map[string]bool{}
		for _, l := range tr.Labels() {
			labels[r[0]][l] = true
		}
		tracks, _ := strconv.Atoi(r[12])
		if offsets := strings.Fields(r[fleetgen.BridgeColumn("track_offsets_m")]); len(offsets) > 0 {
			tracks = len(offsets) // a cross-section gives one offset per track
		}
		for _, l := range floor.Labels(len(tr.DeckJoints)-1, tracks) {
			labels[r[0]][l] = true
		}
		if r[fleetgen.BridgeColumn("stringer_spacing_m")] != "" {
			floors++
		}
	}
	if len(types) != len(truss.Types) {
		t.Errorf("types %v, want all %d", types, len(truss.Types))
	}
	if len(forms) != 4 || !forms["listed depths"] || !forms["parabolic chord"] || !forms["continuous"] || !forms["deck warren"] {
		t.Errorf("forms %v, want every one", forms)
	}
	stored, floorRows := 0, 0
	for _, r := range m1[1:] {
		if !labels[r[0]][r[1]] {
			t.Errorf("member %s of %s is not in its geometry", r[1], r[0])
		}
		switch {
		case r[2] != "" && r[3] != "" && r[4] == "":
		case r[2] == "" && r[3] == "" && r[4] != "" && r[5] == "Northmoor freight today":
			stored++
		case floor.IsLabel(r[1]) && r[2] == "" && r[3] == "" && r[4] == "" && r[9] != "" && r[10] != "":
			floorRows++
		default:
			t.Errorf("member row %v holds neither capacities nor a stored rating", r)
		}
	}
	if floors == 0 || floors == len(b1)-1 || floorRows == 0 {
		t.Errorf("%d of %d bridges with floor data, %d floor rows; want some", floors, len(b1)-1, floorRows)
	}
	if stored == 0 || stored == len(m1)-1 {
		t.Errorf("%d of %d members with stored ratings; want some of both kinds", stored, len(m1)-1)
	}
}
