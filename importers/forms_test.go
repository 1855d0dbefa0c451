package importers

import (
	"math"
	"strings"
	"testing"
)

const formsHeader = "bridge_id,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m,depths_m,end_depth_m,spans\n"

func TestFormColumns(t *testing.T) {
	text := formsHeader +
		"P1,pratt,72,8,,through,20,6.5 8.2 9.1 9.4 9.1 8.0 6.4,,\n" +
		"P2,pratt,80,10,11,through,20,,7.5,\n" +
		"P3,pratt,48,6,7,through,20,,,2\n" +
		"P4,k-truss,96,8,14,through,20,,,\n" +
		"P5,table,96,12,7,through,20,,,\n"
	rows, _, err := parseB(t, text)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 5 {
		t.Fatalf("%d rows", len(rows))
	}
	// The largest listed depth becomes the depth (docs/inventory.md).
	if b := rows[0].Row; len(b.DepthsM) != 7 || b.DepthM != 9.4 || b.DepthsM[6] != 6.4 {
		t.Errorf("listed depths read as %v, depth %g", b.DepthsM, b.DepthM)
	}
	if b := rows[1].Row; b.EndDepthM != 7.5 || b.Spans != 1 {
		t.Errorf("end depth %g, spans %d", b.EndDepthM, b.Spans)
	}
	if rows[2].Row.Spans != 2 {
		t.Errorf("spans %d", rows[2].Row.Spans)
	}
	// 1 ft = 0.3048 m (international yard and pound agreement, 1959).
	imp := "bridge_id,truss_type,span_ft,panels,depth_ft,deck,dead_load_kip_per_ft,depths_ft\nI1,pratt,200,8,,through,1.2,20 25 28 30 28 25 20\n"
	rows, _, err = parseB(t, imp)
	if err != nil {
		t.Fatal(err)
	}
	if b := rows[0].Row; math.Abs(b.DepthsM[3]-30*0.3048) > 1e-12 || math.Abs(b.DepthM-30*0.3048) > 1e-12 {
		t.Errorf("imperial depths read as %v, depth %g", b.DepthsM, b.DepthM)
	}
}

func TestBadForms(t *testing.T) {
	tests := []struct {
		name       string
		row        string
		column     int
		value, msg string
	}{
		{"too few depths", "P,pratt,72,8,,through,20,6 7 6,,", 8, "6 7 6", "has 7 top-chord joints"},
		{"depth not a number", "P,pratt,72,8,,through,20,6 x7 6 7 6 7 6,,", 8, "x7", "not a number"},
		{"negative depth", "P,pratt,72,8,,through,20,6 -7 6 7 6 7 6,,", 8, "6 -7 6 7 6 7 6", "greater than zero"},
		{"end depth above midspan", "P,pratt,72,8,9,through,20,,10,", 9, "10", "at most"},
		{"deck truss polygonal", "P,pratt,72,8,9,deck,20,,6,", 9, "6", "through"},
		{"four spans", "P,pratt,40,8,5,through,20,,,4", 10, "4", "1 to 3"},
		{"continuous k-truss", "P,k-truss,40,8,5,through,20,,,2", 10, "2", "one span"},
		{"sub-panels not of four", "P,pratt-sub-ties,72,10,9,through,20,,,", 4, "10", "multiple of 4"},
		{"a table with spans", "P,table,96,12,7,through,20,,,2", 10, "2", "joint table"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rows, _, err := parseB(t, formsHeader+tc.row+"\n")
			if len(rows) != 0 {
				t.Errorf("a bad row was passed on: %+v", rows)
			}
			e := fieldErrors(t, err)[0]
			if e.Line != 2 || e.Column != tc.column || e.Value != tc.value || !strings.Contains(e.Msg, tc.msg) {
				t.Errorf("got %q (column %d, value %q); want column %d, value %q, message with %q", e.Error(), e.Column, e.Value, tc.column, tc.value, tc.msg)
			}
		})
	}
}
