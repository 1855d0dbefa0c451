package main

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"
)

// runCmd executes the trussfleet command line and returns what it printed.
func runCmd(t *testing.T, args ...string) (string, error) {
	t.Helper()
	root := newRootCmd()
	var out bytes.Buffer
	root.SetOut(&out)
	root.SetErr(&out)
	root.SetArgs(args)
	err := root.ExecuteContext(context.Background())
	return out.String(), err
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
	for _, c := range []struct {
		args []string
		want string
	}{
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
