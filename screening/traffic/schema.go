package traffic

import (
	"fmt"
	"reflect"
	"slices"
	"strings"

	"github.com/trussfleet/trussfleet/internal/excerpt"
	"gopkg.in/yaml.v3"
)

// checkShape compares a train file's tree of nodes with the format of docs/trains.md before
// it is decoded, so that a misspelt key or a value of the wrong kind is told in the file's
// own words: the line and column, the key's path, what was expected and the nearest valid
// key, and never the name of a Go type. It returns every problem it finds.
func checkShape(filename string, root *yaml.Node) []*FileError {
	var errs []*FileError
	n := root
	if n.Kind == yaml.DocumentNode && len(n.Content) > 0 {
		n = n.Content[0]
	}
	shapeOf(n, reflect.TypeFor[trainFile](), "", func(at *yaml.Node, field, msg string) {
		errs = append(errs, &FileError{File: filename, Line: at.Line, Column: at.Column, Field: field, Msg: msg})
	})
	return errs
}

// maxAliasDepth bounds the aliases followed in a row, as a guard against a cycle.
const maxAliasDepth = 100

// shapeOf checks node n against the Go type t that decodes it; path names n in the file.
func shapeOf(n *yaml.Node, t reflect.Type, path string, fail func(at *yaml.Node, field, msg string)) {
	for i := 0; n.Kind == yaml.AliasNode && n.Alias != nil && i < maxAliasDepth; i++ {
		n = n.Alias
	}
	if t.Kind() == reflect.Pointer {
		if n.Kind == yaml.ScalarNode && n.ShortTag() == "!!null" {
			return // an empty value: the field is absent
		}
		t = t.Elem()
	}
	switch t.Kind() {
	case reflect.Struct:
		if n.Kind != yaml.MappingNode {
			fail(n, path, "expected keys with values (key: value on lines of their own), got "+describe(n))
			return
		}
		keys := yamlKeys(t)
		for i := 0; i+1 < len(n.Content); i += 2 {
			k, v := n.Content[i], n.Content[i+1]
			if k.Kind == yaml.ScalarNode && k.ShortTag() == "!!merge" {
				// "<<: *base" merges another mapping's keys, or a list of mappings'.
				for j := 0; v.Kind == yaml.AliasNode && v.Alias != nil && j < maxAliasDepth; j++ {
					v = v.Alias
				}
				if v.Kind == yaml.SequenceNode {
					for _, m := range v.Content {
						shapeOf(m, t, path, fail)
					}
				} else {
					shapeOf(v, t, path, fail)
				}
				continue
			}
			f, ok := keys[k.Value]
			if !ok || k.Kind != yaml.ScalarNode {
				msg := fmt.Sprintf("unknown key %q", excerpt.Cut(k.Value))
				if s := nearest(k.Value, t); s != "" {
					msg += fmt.Sprintf(" (did you mean %q?)", s)
				} else {
					msg += " (the keys are listed in docs/trains.md)"
				}
				fail(k, path, msg)
				continue
			}
			shapeOf(v, f.Type, join(path, k.Value), fail)
		}
	case reflect.Slice:
		if n.Kind != yaml.SequenceNode {
			fail(n, path, "expected a list (lines starting with \"- \"), got "+describe(n))
			return
		}
		for i, item := range n.Content {
			shapeOf(item, t.Elem(), fmt.Sprintf("%s[%d]", path, i), fail)
		}
	case reflect.String:
		if n.Kind != yaml.ScalarNode {
			fail(n, path, "expected text, got "+describe(n))
		}
	case reflect.Float64:
		var f float64
		if n.Kind != yaml.ScalarNode || n.Decode(&f) != nil {
			fail(n, path, "expected a number, got "+describe(n))
		}
	case reflect.Int:
		var k int
		// The decoder would cut 1.5 down to 1: a whole number must be written as one.
		if n.Kind != yaml.ScalarNode || n.ShortTag() != "!!int" || n.Decode(&k) != nil {
			fail(n, path, "expected a whole number, got "+describe(n))
		}
	}
}

// describe says what a node holds, for a message.
func describe(n *yaml.Node) string {
	switch n.Kind {
	case yaml.MappingNode:
		return "keys with values"
	case yaml.SequenceNode:
		return "a list"
	case yaml.ScalarNode:
		if n.ShortTag() == "!!null" {
			return "nothing"
		}
		return fmt.Sprintf("%q", excerpt.Cut(n.Value))
	}
	return "something else"
}

func join(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

// yamlKeys maps the keys of a struct decoded from YAML to its fields.
func yamlKeys(t reflect.Type) map[string]reflect.StructField {
	out := map[string]reflect.StructField{}
	for f := range t.Fields() {
		name, _, _ := strings.Cut(f.Tag.Get("yaml"), ",")
		if name != "" && name != "-" {
			out[name] = f
		}
	}
	return out
}

// nearest is the valid key of t closest to key in edit distance, when it is close enough to
// be the key meant (at most 2 edits, and fewer than half the key's letters); "" otherwise.
func nearest(key string, t reflect.Type) string {
	key = strings.ToLower(key)
	names := make([]string, 0, len(yamlKeys(t)))
	for name := range yamlKeys(t) {
		names = append(names, name)
	}
	slices.Sort(names) // ties go to the first name in order, the same every time
	best, bestD := "", 3
	for _, name := range names {
		if d := editDistance(key, name); d < bestD && 2*d < max(len([]rune(key)), len(name)) {
			best, bestD = name, d
		}
	}
	return best
}

// editDistance is the optimal string alignment distance between a and b: insertions,
// deletions, substitutions and swaps of neighbouring letters each count one.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	if len(ra) > 64 {
		return len(ra) // far longer than any key
	}
	d := make([][]int, len(ra)+1)
	for i := range d {
		d[i] = make([]int, len(rb)+1)
		d[i][0] = i
	}
	for j := range d[0] {
		d[0][j] = j
	}
	for i := 1; i <= len(ra); i++ {
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			d[i][j] = min(d[i-1][j]+1, d[i][j-1]+1, d[i-1][j-1]+cost)
			if i > 1 && j > 1 && ra[i-1] == rb[j-2] && ra[i-2] == rb[j-1] {
				d[i][j] = min(d[i][j], d[i-2][j-2]+1)
			}
		}
	}
	return d[len(ra)][len(rb)]
}
