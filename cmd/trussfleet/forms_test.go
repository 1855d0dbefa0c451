package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// TestLinesOfForms: the lines command takes the forms' flags and a joint-table file; a
// two-span continuous truss typed in as a table gives the same lines as the one the flags
// describe, when all its areas are equal (one structure, two descriptions).
func TestLinesOfForms(t *testing.T) {
	type doc struct {
		Caution string `json:"caution"`
		Members []struct {
			Label     string    `json:"label"`
			Ordinates []float64 `json:"ordinates"`
		} `json:"members"`
	}
	read := func(args ...string) doc {
		t.Helper()
		out, err := runCmd(t, append([]string{"lines", "--format", "json"}, args...)...)
		if err != nil {
			t.Fatal(err, out)
		}
		var d doc
		if err := json.Unmarshal([]byte(out), &d); err != nil {
			t.Fatal(err, out)
		}
		if !strings.Contains(d.Caution, "not a load rating") || len(d.Members) == 0 {
			t.Fatalf("doc %+v", d)
		}
		return d
	}
	param := read("--type", "pratt", "--span", "48", "--panels", "6", "--depth", "7", "--spans", "2")
	var b strings.Builder
	b.WriteString("bridge_id,record,name,x_m,y_m,from,to,kind,area_mm2,support\n")
	joint := func(name string, x, y float64) {
		b.WriteString("T1,joint," + name + "," + ftoa(x) + "," + ftoa(y) + ",,,,,\n")
	}
	for i := 0; i <= 12; i++ {
		joint("L"+itoa(i), 8*float64(i), 0)
	}
	for i := 1; i <= 11; i++ {
		joint("U"+itoa(i), 8*float64(i), 7)
	}
	member := func(a, c, kind string) { b.WriteString("T1,member,,,," + a + "," + c + "," + kind + ",9000,\n") }
	for i := 0; i < 12; i++ {
		member("L"+itoa(i), "L"+itoa(i+1), "bottom-chord")
	}
	for i := 1; i < 11; i++ {
		member("U"+itoa(i), "U"+itoa(i+1), "top-chord")
	}
	for i := 1; i <= 11; i++ {
		member("L"+itoa(i), "U"+itoa(i), "vertical")
	}
	member("L0", "U1", "end-post")
	member("U11", "L12", "end-post")
	// each span's diagonals slope down toward its own midspan (Pratt), the pier panels too
	for _, d := range [][2]string{{"U1", "L2"}, {"U2", "L3"}, {"L3", "U4"}, {"L4", "U5"}, {"L5", "U6"},
		{"U6", "L7"}, {"U7", "L8"}, {"U8", "L9"}, {"L9", "U10"}, {"L10", "U11"}} {
		member(d[0], d[1], "diagonal")
	}
	b.WriteString("T1,support,L0,,,,,,,pin\nT1,support,L6,,,,,,,roller\nT1,support,L12,,,,,,,roller\n")
	for i := 0; i <= 12; i++ {
		b.WriteString("T1,deck,L" + itoa(i) + ",,,,,,,\n")
	}
	file := filepath.Join(t.TempDir(), "trusses.csv")
	if err := os.WriteFile(file, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	table := read("--table", file)
	byLabel := map[string][]float64{}
	for _, m := range table.Members {
		byLabel[m.Label] = m.Ordinates
	}
	for _, m := range param.Members {
		o, ok := byLabel[m.Label]
		if !ok {
			t.Fatalf("member %s not in the table's lines", m.Label)
		}
		for k := range o {
			if math.Abs(o[k]-m.Ordinates[k]) > 1e-9 {
				t.Errorf("%s at %d: table %g, flags %g", m.Label, k, o[k], m.Ordinates[k])
			}
		}
	}
	// Without areas the continuous table is refused, naming its degree.
	noAreas := strings.ReplaceAll(b.String(), ",9000,", ",,")
	if err := os.WriteFile(file, []byte(noAreas), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := runCmd(t, "lines", "--table", file); err == nil || !strings.Contains(err.Error(), "m + r - 2j = 1") {
		t.Errorf("a table without areas: %v", err)
	}
}

func itoa(i int) string     { return strconv.Itoa(i) }
func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
