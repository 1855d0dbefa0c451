package traffic

import (
	"strings"
	"testing"
)

// TestTrainFileShapeErrors checks the whole message of a misspelt key or a value of the
// wrong kind: the file once, the line and column, the key's path, what was expected or the
// nearest valid key, and no Go type name.
func TestTrainFileShapeErrors(t *testing.T) {
	base := baseTrainFile
	cases := []struct {
		name, old, new string
		want           string
	}{
		{"misspelt key in a vehicle", "    length: 14", "    lenght: 14",
			`x.yaml line 4, column 5: vehicles[0]: unknown key "lenght" (did you mean "length"?)`},
		{"misspelt top-level key", "consist:", "consits:",
			`x.yaml line 8, column 1: unknown key "consits" (did you mean "consist"?)`},
		{"key far from any", "    length: 14", "    colour: red",
			`x.yaml line 4, column 5: vehicles[0]: unknown key "colour" (the keys are listed in docs/trains.md)`},
		{"capitalised key", "name: T", "Name: T",
			`x.yaml line 1, column 1: unknown key "Name" (did you mean "name"?)`},
		{"misspelt key in an axle", "{at: 12.5, load: 200}", "{at: 12.5, laod: 200}",
			`x.yaml line 7, column 20: vehicles[0].axles[1]: unknown key "laod" (did you mean "load"?)`},
		{"text for a number", "length: 14", "length: long",
			`x.yaml line 4, column 13: vehicles[0].length: expected a number, got "long"`},
		{"decimal for a whole number", "min: 1,", "min: 1.5,",
			`x.yaml line 9, column 23: consist[0].min: expected a whole number, got "1.5"`},
		{"list for text", "name: T", "name: [a, b]",
			`x.yaml line 1, column 7: name: expected text, got a list`},
		{"text for a list", "    axles:\n      - {at: 1.5, load: 200}\n      - {at: 12.5, load: 200}", "    axles: none",
			`x.yaml line 5, column 12: vehicles[0].axles: expected a list (lines starting with "- "), got "none"`},
		{"list for keys", "  - {vehicle: w, min: 1, max: 3}", "  - [w, 1, 3]",
			`x.yaml line 9, column 5: consist[0]: expected keys with values (key: value on lines of their own), got a list`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := strings.Replace(base, c.old, c.new, 1)
			if src == base {
				t.Fatalf("replacement %q did not apply", c.old)
			}
			_, err := ParseTrainFile("x.yaml", []byte(src))
			if err == nil {
				t.Fatal("no error")
			}
			if err.Error() != c.want {
				t.Errorf("error:\n got %s\nwant %s", err, c.want)
			}
		})
	}
}

// TestTrainFileAnchors checks that anchors, aliases and merged keys pass the shape check,
// and that a misspelt key in a merged mapping is still found.
func TestTrainFileAnchors(t *testing.T) {
	good := `name: T
vehicles:
  - &wagon
    id: w
    length: 14
    axles: [{at: 1.5, load: 200}, {at: 12.5, load: 200}]
  - <<: *wagon
    id: v
consist:
  - {vehicle: w, count: 1}
  - {vehicle: v, count: 1}
`
	if _, err := ParseTrainFile("x.yaml", []byte(good)); err != nil {
		t.Errorf("good file: %v", err)
	}
	bad := strings.Replace(good, "    length: 14", "    lenth: 14", 1)
	_, err := ParseTrainFile("x.yaml", []byte(bad))
	want := `x.yaml line 5, column 5: vehicles[0]: unknown key "lenth" (did you mean "length"?)`
	if err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("error:\n got %v\nwant %s", err, want)
	}
}

func TestEditDistance(t *testing.T) {
	cases := []struct {
		name, a, b string
		want       int
	}{
		{"same", "length", "length", 0},
		{"swap of neighbours", "lenght", "length", 1}, // one transposition (optimal string alignment)
		{"one deleted", "lngth", "length", 1},
		{"one changed", "laod", "load", 1},
		{"nothing in common", "abc", "xyz", 3},
		{"empty", "", "to", 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := editDistance(c.a, c.b); got != c.want {
				t.Errorf("editDistance(%q, %q) = %d, want %d", c.a, c.b, got, c.want)
			}
		})
	}
}
