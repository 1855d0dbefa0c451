// Package excerpt cuts input quoted in a message to a few words, so that no input, however
// long, can make a message long: the file or the command line is there to read in full.
package excerpt

import (
	"fmt"
	"strings"
	"unicode/utf8"
)

// Chars is how many characters of an input value a message quotes.
const Chars = 40

// Cut gives s, or, when s is longer than Chars characters, its first Chars-1 characters and
// "…". A cut string is its own cut.
func Cut(s string) string {
	if len(s) <= Chars || utf8.RuneCountInString(s) <= Chars {
		return s
	}
	n := 0
	for i := range s {
		if n == Chars-1 {
			return s[:i] + "…"
		}
		n++
	}
	return s
}

// List joins values for a message: each cut, at most limit of them, then a count of the
// rest.
func List(values []string, limit int) string {
	var b strings.Builder
	for i, v := range values {
		if i == limit {
			fmt.Fprintf(&b, " … and %d more", len(values)-limit)
			break
		}
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(Cut(v))
	}
	return b.String()
}
