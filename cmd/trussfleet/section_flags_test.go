package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// TestEnvelopeCrossSection: one track 1.5 m towards truss A between trusses 5 m apart puts
// 1/2 + 1.5/5 = 0.8 of its load on A and 0.2 on B (lever rule), so the envelope of truss A
// equals the one of --share 0.8, member by member, and B's the one of --share 0.2.
func TestEnvelopeCrossSection(t *testing.T) {
	geo := []string{"envelope", "--type", "pratt", "--span", "48", "--panels", "8", "--depth", "6", "--train", "lm71", "--format", "json"}
	values := func(args ...string) map[string][2]float64 {
		t.Helper()
		out, err := runCmd(t, append(append([]string{}, geo...), args...)...)
		if err != nil {
			t.Fatal(err, out)
		}
		var doc struct {
			Members []struct {
				Label    string
				Max, Min struct{ Value float64 }
			}
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		m := map[string][2]float64{}
		for _, x := range doc.Members {
			m[x.Label] = [2]float64{x.Max.Value, x.Min.Value}
		}
		return m
	}
	for _, tc := range []struct{ truss, share string }{{"A", "0.8"}, {"B", "0.2"}} {
		got, want := values("--truss-spacing", "5", "--track-offsets", "1.5", "--truss", tc.truss), values("--share", tc.share)
		for label, w := range want {
			g := got[label]
			if math.Abs(g[0]-w[0]) > 1e-6*(1+math.Abs(w[0])) || math.Abs(g[1]-w[1]) > 1e-6*(1+math.Abs(w[1])) {
				t.Errorf("truss %s, %s: %v, want %v (--share %s)", tc.truss, label, g, w, tc.share)
			}
		}
	}
	for _, bad := range []struct {
		args []string
		msg  string
	}{
		{[]string{"--truss-spacing", "5", "--track-offsets", "1.5", "--share", "0.5"}, "give either"},
		{[]string{"--truss-spacing", "5", "--track-offsets", "x"}, "not a number"},
		{[]string{"--truss-spacing", "0.2", "--track-offsets", "0"}, "1 to 50 m"},
		{[]string{"--truss", "C", "--truss-spacing", "5", "--track-offsets", "0"}, "A or B"},
		{[]string{"--truss", "B"}, "needs --truss-spacing"},
	} {
		_, err := runCmd(t, append(append([]string{}, geo...), bad.args...)...)
		if err == nil || !strings.Contains(err.Error(), bad.msg) {
			t.Errorf("%v: error %v, want one with %q", bad.args, err, bad.msg)
		}
	}
}
