package importers

import (
	"fmt"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/store"
)

// goodRow is a valid bridges.csv row under bridgeHeader, with its fields to be replaced.
var goodRow = []string{"NME-9", "Test span", "Main", "1", "pratt", "48", "8", "6", "through", "15"}

// rowWith gives goodRow with field i (0-based) set to v, as a line.
func rowWith(i int, v string) string {
	r := append([]string(nil), goodRow...)
	r[i] = v
	return strings.Join(r, ",") + "\n"
}

// TestInputLimits: values, lines, rows and headers beyond the documented limits are refused
// with the file, line and column, and every message quotes an excerpt of the input only.
func TestInputLimits(t *testing.T) {
	x := func(n int) string { return strings.Repeat("x", n) }
	cases := []struct {
		name         string
		text         string
		line, column int
		field, msg   string
	}{
		// docs/inventory.md, "Limits": ids and labels 64 characters, names 200, others 64.
		{"bridge_id of 3,000 characters", bridgeHeader + rowWith(0, x(3000)), 2, 1, "bridge_id", "3000 characters; bridge_id takes at most 64"},
		{"bridge_id of 65 characters", bridgeHeader + rowWith(0, x(65)), 2, 1, "bridge_id", "65 characters; bridge_id takes at most 64"},
		{"name of 201 characters", bridgeHeader + rowWith(1, x(201)), 2, 2, "name", "at most 200"},
		{"line of 201 characters", bridgeHeader + rowWith(2, x(201)), 2, 3, "line", "at most 200"},
		{"characters counted, not bytes", bridgeHeader + rowWith(0, strings.Repeat("ø", 65)), 2, 1, "bridge_id", "65 characters"},
		{"number of 65 characters", bridgeHeader + rowWith(5, "4"+strings.Repeat("0", 64)), 2, 6, "span_m", "at most 64"},
		{"bridge_id of 10 MB", bridgeHeader + rowWith(0, x(10<<20)), 2, 0, "", "a line longer than 64 KiB"},
		{"name of 10 MB", bridgeHeader + rowWith(1, x(10<<20)), 2, 0, "", "a line longer than 64 KiB"},
		{"header of 10 MB", x(10<<20) + "\n" + rowWith(0, "A"), 1, 0, "", "a line longer than 64 KiB"},
		{"10 MB of separators", bridgeHeader + strings.Repeat(",", 10<<20) + "\n", 2, 0, "", "a line longer than 64 KiB"},
		{"line too long after good rows", bridgeHeader + rowWith(0, "A") + rowWith(0, "B") + x(70<<10) + "\n", 4, 0, "", "a line longer than 64 KiB"},
		{"row of 1,001 fields", bridgeHeader + rowWith(9, "15"+strings.Repeat(",", 991)), 2, 0, "", "1001 fields; at most 1000"},
		{"1,001 separators", bridgeHeader + strings.Repeat(",", 1000) + "\n", 2, 0, "", "1001 fields; at most 1000"},
		{"header of 1,001 columns", bridgeHeader[:len(bridgeHeader)-1] + strings.Repeat(",c", 991) + "\n", 1, 0, "", "the header has 1001 columns"},
		{"a quote left open", bridgeHeader + rowWith(0, "A") + "NME-9,\"open" + strings.Repeat("\nmore text", 200<<10) + "\n", 3, 0, "", "the row that begins here (or after blank lines) runs on to line"},
		{"NUL byte in a value", bridgeHeader + rowWith(1, "Te\x00st"), 2, 2, "name", "a NUL byte (character 3 of the value)"},
		{"NUL byte in the header", strings.Replace(bridgeHeader, "name", "na\x00me", 1) + rowWith(0, "A"), 1, 2, "", "a NUL byte"},
		{"invalid UTF-8 is still called so", bridgeHeader + rowWith(1, "Te\xffst"), 2, 2, "name", "not valid UTF-8"},
		{"column named twice, at length", bridgeHeader[:len(bridgeHeader)-1] + "," + x(5000) + "," + x(5000) + "\n", 1, 12, "", "column named twice (also column 11)"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rows, _, err := parseB(t, tc.text)
			for _, r := range rows {
				if r.Row.BridgeID != "A" && r.Row.BridgeID != "B" {
					t.Errorf("a bad row was passed on: line %d", r.Line)
				}
			}
			e := fieldErrors(t, err)[0]
			if e.File != "bridges.csv" || e.Line != tc.line || e.Column != tc.column || e.Field != tc.field || !strings.Contains(e.Msg, tc.msg) {
				t.Errorf("got %.300q (line %d, column %d, field %q); want line %d, column %d, field %q, message with %q",
					e.Error(), e.Line, e.Column, e.Field, tc.line, tc.column, tc.field, tc.msg)
			}
			// excerpt.Chars (40) characters of a value at most, with the message around them.
			if n := len(err.Error()); n > 600 {
				t.Errorf("message of %d bytes: %.300q", n, err.Error())
			}
		})
	}
}

func TestMemberTextLimits(t *testing.T) {
	head := "bridge_id,member,capacity_tension_kn,rating_factor,reference_train,fatigue_category\n"
	x := func(n int) string { return strings.Repeat("x", n) }
	cases := []struct {
		name   string
		row    string
		column int
		field  string
		msg    string
	}{
		{"bridge_id of 65 characters", x(65) + ",L0-L1,100,,,", 1, "bridge_id", "at most 64"},
		{"member of 65 characters", "NME-1," + x(65) + ",100,,,", 2, "member", "at most 64"},
		{"reference_train of 201 characters", "NME-1,L0-L1,,1.2," + x(201) + ",", 5, "reference_train", "at most 200"},
		{"fatigue_category of 17 characters", "NME-1,L0-L1,100,,," + x(17), 6, "fatigue_category", "at most 16"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			n := 0
			_, err := ParseMembers("members.csv", strings.NewReader(head+tc.row+"\n"), geometryStub{}, func(store.Staged[store.Member]) bool { n++; return true })
			if n != 0 {
				t.Error("a bad row was passed on")
			}
			e := fieldErrors(t, err)[0]
			if e.Line != 2 || e.Column != tc.column || e.Field != tc.field || !strings.Contains(e.Msg, tc.msg) {
				t.Errorf("got %q (column %d, field %q); want line 2, column %d, field %q, message with %q", e.Error(), e.Column, e.Field, tc.column, tc.field, tc.msg)
			}
		})
	}
}

// TestHeaderNamesQuotedShort: a header's unknown or missing columns are named with excerpts.
func TestHeaderNamesQuotedShort(t *testing.T) {
	long := strings.Repeat("y", 20000)
	t.Run("unknown column", func(t *testing.T) {
		_, rep, err := parseB(t, bridgeHeader[:len(bridgeHeader)-1]+","+long+"\n"+strings.TrimSuffix(rowWith(0, "A"), "\n")+",v\n")
		if err != nil {
			t.Fatal(err)
		}
		want := strings.Repeat("y", 39) + "…" // excerpt.Chars characters
		if len(rep.Ignored) != 1 || rep.Ignored[0] != want {
			t.Errorf("ignored %.100q, want [%q]", rep.Ignored, want)
		}
	})
	t.Run("many unknown columns are counted", func(t *testing.T) {
		var extra []string
		for i := range 100 {
			extra = append(extra, "extra"+strconv.Itoa(i))
		}
		_, rep, err := parseB(t, bridgeHeader[:len(bridgeHeader)-1]+","+strings.Join(extra, ",")+"\n"+strings.TrimSuffix(rowWith(0, "A"), "\n")+strings.Repeat(",v", 100)+"\n")
		if err != nil {
			t.Fatal(err)
		}
		if len(rep.Ignored) != 31 || rep.Ignored[30] != "… and 70 more" {
			t.Errorf("ignored %d: %q", len(rep.Ignored), rep.Ignored[len(rep.Ignored)-1])
		}
	})
	t.Run("missing columns beside long names", func(t *testing.T) {
		head := long + "1," + long + "2," + long + "3,bridge_id\n"
		_, _, err := parseB(t, head+"A\n")
		e := fieldErrors(t, err)[0]
		if e.Line != 1 || !strings.Contains(e.Msg, "missing required column") || len(err.Error()) > 2000 {
			t.Errorf("error of %d bytes: %.300q", len(err.Error()), err)
		}
	})
}

func TestYearBuilt(t *testing.T) {
	head := strings.TrimSuffix(bridgeHeader, "\n") + ",year_built\n"
	next := time.Now().Year() + 1
	cases := []struct {
		name, year string
		want       int    // stored year, when accepted
		msg        string // error, when refused
	}{
		// docs/inventory.md: 1800 to next year.
		{"zero", "0", 0, "must be a year from 1800 to " + strconv.Itoa(next)},
		{"negative", "-5", 0, "must be a year from 1800"},
		{"before 1800", "1799", 0, "must be a year from 1800"},
		{"beyond next year", strconv.Itoa(next + 1), 0, "must be a year from 1800"},
		{"far future", "2200", 0, "must be a year from 1800"},
		{"not a whole number", "1898.5", 0, "not a whole number"},
		{"1800", "1800", 1800, ""},
		{"next year", strconv.Itoa(next), next, ""},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rows, _, err := parseB(t, head+strings.TrimSuffix(rowWith(0, "A"), "\n")+","+tc.year+"\n")
			if tc.msg == "" {
				if err != nil || len(rows) != 1 || rows[0].Row.YearBuilt == nil || *rows[0].Row.YearBuilt != tc.want {
					t.Fatalf("rows %+v, error %v", rows, err)
				}
				return
			}
			if len(rows) != 0 {
				t.Errorf("row passed on with year_built %v", rows[0].Row.YearBuilt)
			}
			e := fieldErrors(t, err)[0]
			if e.Line != 2 || e.Column != 11 || e.Field != "year_built" || e.Value != tc.year || !strings.Contains(e.Msg, tc.msg) {
				t.Errorf("got %q; want line 2, column 11 (year_built), value %q, message with %q", e.Error(), tc.year, tc.msg)
			}
		})
	}
}

// TestPlausibleQuantities: quantities beyond what a truss or member can be are refused at
// their column, as typing or unit errors, however finite.
func TestPlausibleQuantities(t *testing.T) {
	t.Run("bridges", func(t *testing.T) {
		cases := []struct {
			name, value string
			ok          bool
		}{
			// docs/inventory.md: dead load at most 1000 kN/m per truss
			{"dead load 1e308 kN/m", "1e308", false},
			{"dead load 1001 kN/m", "1001", false},
			{"dead load 1000 kN/m", "1000", true},
		}
		for _, c := range cases {
			t.Run(c.name, func(t *testing.T) {
				rows, _, err := parseB(t, bridgeHeader+rowWith(9, c.value))
				if c.ok {
					if err != nil || len(rows) != 1 {
						t.Fatalf("refused: %v", err)
					}
					return
				}
				e := fieldErrors(t, err)[0]
				if e.Line != 2 || e.Column != 10 || e.Field != "dead_load_kn_per_m" || !strings.Contains(e.Msg, "at most 1000 kN/m") {
					t.Errorf("got %q", e.Error())
				}
			})
		}
	})
	t.Run("members", func(t *testing.T) {
		head := "bridge_id,member,capacity_tension_kn,capacity_compression_kip,rating_factor,reference_train,area_in2\n"
		cases := []struct {
			name, row string
			column    int
			field     string
			msg       string
		}{
			// docs/inventory.md: capacities at most 1e6 kN, area 1e7 mm², rating factor 100
			{"tension capacity 1e300 kN", "NME-1,L0-L1,1e300,,,,", 3, "capacity_tension_kn", "at most 1e+06 kN"},
			// 1 kip = 4.4482216 kN (DOMAIN.md): 300,000 kip is 1.33e6 kN
			{"compression capacity 300,000 kip", "NME-1,L0-L1,,300000,,,", 4, "capacity_compression_kip", "at most 1e+06 kN"},
			{"rating factor 1e9", "NME-1,L0-L1,,,1e9,cooper,", 5, "rating_factor", "at most 100"},
			// 1 in² = 645.16 mm² exactly: 20,000 in² is 1.29e7 mm²
			{"area 20,000 in²", "NME-1,L0-L1,100,,,,20000", 7, "area_in2", "at most 1e+07 mm²"},
		}
		for _, c := range cases {
			t.Run(c.name, func(t *testing.T) {
				_, err := ParseMembers("members.csv", strings.NewReader(head+c.row+"\n"), geometryStub{}, func(store.Staged[store.Member]) bool { return true })
				e := fieldErrors(t, err)[0]
				if e.Line != 2 || e.Column != c.column || e.Field != c.field || !strings.Contains(e.Msg, c.msg) {
					t.Errorf("got %q; want column %d (%s), message with %q", e.Error(), c.column, c.field, c.msg)
				}
			})
		}
	})
}

func TestErrorValueExcerpt(t *testing.T) {
	_, _, err := parseB(t, bridgeHeader+rowWith(5, strings.Repeat("9", 60)+"x"))
	e := fieldErrors(t, err)[0]
	want := fmt.Sprintf("value %q", strings.Repeat("9", 39)+"…") // excerpt.Chars characters
	if !strings.Contains(e.Error(), want) {
		t.Errorf("%q lacks %s", e.Error(), want)
	}
}
