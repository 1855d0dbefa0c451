package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store/pgtest"
)

// runCmd executes the trussfleet command line and returns what it printed on standard
// output.
func runCmd(t *testing.T, args ...string) (string, error) {
	t.Helper()
	stdout, _, err := runCmdErr(t, args...)
	return stdout, err
}

// runCmdErr executes the trussfleet command line and returns what it printed on standard
// output and on standard error.
func runCmdErr(t *testing.T, args ...string) (stdout, stderr string, err error) {
	t.Helper()
	root := newRootCmd()
	var out, errOut bytes.Buffer
	root.SetOut(&out)
	root.SetErr(&errOut)
	root.SetArgs(args)
	err = root.ExecuteContext(context.Background())
	return out.String(), errOut.String(), err
}

func TestEnvelopeCommandJSON(t *testing.T) {
	out, err := runCmd(t, "envelope", "--type", "pratt", "--span", "48", "--panels", "8", "--depth", "6",
		"--train", "lm71", "--train", "northmoor-freight-proposed", "--share", "0.5", "--dynamic", "fixed:0.2", "--format", "json")
	if err != nil {
		t.Fatal(err, out)
	}
	var doc struct {
		Caution string `json:"caution"`
		Members []struct {
			Label string `json:"label"`
			Max   struct {
				Value     float64  `json:"value"`
				Train     string   `json:"train"`
				HeadM     *float64 `json:"head_m"`
				Direction string   `json:"direction"`
				From      *float64 `json:"loaded_from_m"`
				To        *float64 `json:"loaded_to_m"`
			} `json:"max"`
			Min struct {
				Value float64 `json:"value"`
			} `json:"min"`
		} `json:"members"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(doc.Caution, "not a load rating") || len(doc.Members) == 0 {
		t.Fatalf("doc %+v", doc)
	}
	for _, m := range doc.Members {
		if m.Max.Value < 0 || m.Min.Value > 0 {
			t.Errorf("%s: max %v, min %v", m.Label, m.Max.Value, m.Min.Value)
		}
		if m.Max.Value > 0 && (m.Max.Train == "" || m.Max.HeadM == nil || m.Max.From == nil || m.Max.To == nil || m.Max.Direction == "") {
			t.Errorf("%s: incomplete placement %+v", m.Label, m.Max)
		}
	}
}

func TestEnvelopeCommandErrors(t *testing.T) {
	geo := []string{"envelope", "--type", "pratt", "--span", "48", "--panels", "8", "--depth", "6"}
	tiny := filepath.Join(t.TempDir(), "tiny.yaml")
	if err := os.WriteFile(tiny, []byte("name: Tiny\nvehicles:\n  - id: t\n    length: 0.01\n    axles: [{at: 0, load: 10}]\nconsist:\n  - {vehicle: t, count: 100000}\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		// Values beyond the limits of a train (docs/trains.md) name the parameter or the
		// file, line, column and field.
		{[]string{"--train", "uniform:q=1e308", "--format", "json"}, "parameter q must be greater than 0 and at most 1000 kN/m"},
		{[]string{"--train", "uniform:q=10,max=1e300", "--format", "json"}, "parameter max"},
		{[]string{"--train", "cooper:e=1e308", "--format", "json"}, "parameter e"},
		{[]string{"--train", "lm71", "--dynamic", "arema:s=1e-300", "--format", "json"}, "at least 1 m"},
		{[]string{"--train", tiny}, "tiny.yaml line 4, column 13: vehicles[0].length: 0.01 m; a vehicle is at least 2 m long"},
		{[]string{"--train", tiny}, "tiny.yaml line 7, column 25: consist[0].count: 100000 vehicles"},
		{[]string{"--train", "lm71:beta=1"}, "alpha"},
		{[]string{"--train", "lm71", "--dynamic", "phi9"}, "phi2"},
		{[]string{}, "at least one train"},
		{[]string{"--train", "sw2", "--share", "2"}, "--share"},
		// Without the database: geometry flags beside --bridge, and no geometry at all.
		{[]string{"--bridge", "NME-1", "--train", "sw2"}, "--bridge NME-1 and --type, --span, --panels, --depth"},
	} {
		_, err := runCmd(t, append(geo, c.args...)...)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: error %v, want %q", c.args, err, c.want)
		}
	}
}

func TestEnvelopeNeedsGeometry(t *testing.T) {
	_, err := runCmd(t, "envelope", "--span", "48", "--train", "sw2")
	if err == nil || !strings.Contains(err.Error(), "--panels, --depth not set") || !strings.Contains(err.Error(), "--bridge ID") {
		t.Errorf("error %v", err)
	}
	_, err = runCmd(t, "envelope", "--bridge", "NME-1", "--share", "0.5", "--train", "sw2")
	if err == nil || !strings.Contains(err.Error(), "--bridge NME-1 and --share") {
		t.Errorf("error %v", err)
	}
}

// TestEnvelopeStored: a stored train named by its name, and a stored bridge, give the same
// envelope as the train's file and the bridge's geometry given as flags.
func TestEnvelopeStored(t *testing.T) {
	url := pgtest.URL(t)
	dir := t.TempDir()
	// An invented two-axle wagon of 4 x 200 kN (demo data).
	trainFile := filepath.Join(dir, "stored-wagons.yaml")
	if err := os.WriteFile(trainFile, []byte("name: Stored wagons\nvehicles:\n  - id: w\n    length: 12\n    axles: [{at: 2, load: 200}, {at: 4, load: 200}, {at: 8, load: 200}, {at: 10, load: 200}]\nconsist:\n  - {vehicle: w, min: 1, max: 4}\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	// An invented double-track span: each truss carries 0.5 of each track, live share 1.0.
	bridges := filepath.Join(dir, "bridges.csv")
	if err := os.WriteFile(bridges, []byte("bridge_id,truss_type,span_m,panels,depth_m,deck,end_posts,trusses,truss_share,tracks,dead_load_kn_per_m\n"+
		"NME-7,howe,42,8,6.5,deck,vertical,2,0.5,2,14\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	db := []string{"--database-url", url}
	for _, args := range [][]string{{"import", "trains", trainFile}, {"import", "bridges", bridges}} {
		if out, err := runCmd(t, append(db, args...)...); err != nil {
			t.Fatal(args, err, out)
		}
	}
	// The file itself goes away: the name can only be found among the stored trains.
	byFlags, err := runCmd(t, "envelope", "--type", "howe", "--span", "42", "--panels", "8", "--depth", "6.5", "--deck", "deck",
		"--end-posts", "vertical", "--share", "1", "--train", trainFile, "--train", "lm71", "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	if err := os.Remove(trainFile); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		args []string
	}{
		{"stored train by name", []string{"--type", "howe", "--span", "42", "--panels", "8", "--depth", "6.5", "--deck", "deck",
			"--end-posts", "vertical", "--share", "1", "--train", "Stored wagons", "--train", "lm71"}},
		{"stored train by file name", []string{"--type", "howe", "--span", "42", "--panels", "8", "--depth", "6.5", "--deck", "deck",
			"--end-posts", "vertical", "--share", "1", "--train", "stored-wagons", "--train", "lm71"}},
		{"stored bridge", []string{"--bridge", "NME-7", "--train", "Stored wagons", "--train", "lm71"}},
	} {
		out, err := runCmd(t, append(append(append([]string{}, db...), "envelope", "--format", "json"), c.args...)...)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		// The same inputs give the same numbers, digit for digit (same code path; no source needed).
		if got, want := withoutBridge(t, out), withoutBridge(t, byFlags); got != want {
			t.Errorf("%s: envelope differs from the one of the file and flags:\n%.400s\nwant\n%.400s", c.name, got, want)
		}
	}
	for _, c := range []struct {
		name string
		args []string
		want []string
	}{
		{"unknown train", []string{"--bridge", "NME-7", "--train", "lm99"},
			[]string{`train "lm99"`, "lm71:alpha=1", "named trains: eastfell-multiple-unit", "no stored train of that name"}},
		{"unknown bridge", []string{"--bridge", "NME-8", "--train", "lm71"}, []string{`--bridge: bridge "NME-8": not found`}},
		{"bridge id in other case", []string{"--bridge", "nme-7", "--train", "lm71"}, []string{"did you mean NME-7?"}},
		{"bridge and geometry", []string{"--bridge", "NME-7", "--depth", "6", "--train", "lm71"}, []string{"--bridge NME-7 and --depth"}},
	} {
		_, err := runCmd(t, append(append(append([]string{}, db...), "envelope"), c.args...)...)
		for _, w := range c.want {
			if err == nil || !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %v, want %q", c.name, err, w)
			}
		}
	}
}

// withoutBridge is an envelope's JSON without its bridge field, re-encoded.
func withoutBridge(t *testing.T, doc string) string {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal([]byte(doc), &m); err != nil {
		t.Fatalf("%v: %.200s", err, doc)
	}
	delete(m, "bridge")
	b, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestEnvelopeJSONAtTheLimits: the heaviest loads a train may carry, on the longest truss the
// geometry admits, give finite forces that JSON can hold.
func TestEnvelopeJSONAtTheLimits(t *testing.T) {
	out, err := runCmd(t, "envelope", "--type", "pratt", "--span", "400", "--panels", "80", "--depth", "20",
		"--train", "uniform:q=1000", "--train", "cooper:e=200", "--dynamic", "fixed:2", "--share", "1", "--format", "json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Members []struct {
			Max, Min struct {
				Value float64 `json:"value"`
			}
		} `json:"members"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Members) == 0 {
		t.Fatalf("%v: %.200s", err, out)
	}
	for i, m := range doc.Members {
		// 1000 kN/m over 400 m, three times (dynamic), under ordinates of a few units at
		// most (span/depth 20): forces below 1e8 kN (common practice: order of magnitude).
		if math.Abs(m.Max.Value) > 1e8 || math.Abs(m.Min.Value) > 1e8 || m.Max.Value <= 0 && m.Min.Value >= 0 {
			t.Errorf("member %d: max %v, min %v", i, m.Max.Value, m.Min.Value)
		}
	}
}
