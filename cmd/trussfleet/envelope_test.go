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
		{[]string{"--train", "lm99"}, "lm71:alpha=1"},
		{[]string{"--train", "lm71:beta=1"}, "alpha"},
		{[]string{"--train", "lm71", "--dynamic", "phi9"}, "phi2"},
		{[]string{}, "at least one train"},
		{[]string{"--train", "sw2", "--share", "2"}, "--share"},
	} {
		_, err := runCmd(t, append(geo, c.args...)...)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: error %v, want %q", c.args, err, c.want)
		}
	}
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
