package excerpt

import (
	"strings"
	"testing"
	"unicode/utf8"
)

func TestCut(t *testing.T) {
	long := strings.Repeat("x", 10<<20)
	cases := []struct {
		name, in, want string
	}{
		{"short value kept", "NME-0101", "NME-0101"},
		{"exactly the limit kept", strings.Repeat("a", Chars), strings.Repeat("a", Chars)},
		{"one beyond the limit cut", strings.Repeat("a", Chars+1), strings.Repeat("a", Chars-1) + "…"},
		{"10 MB cut", long, strings.Repeat("x", Chars-1) + "…"},
		// characters, not bytes: 40 two-byte letters are kept whole
		{"multi-byte characters counted as characters", strings.Repeat("ø", Chars), strings.Repeat("ø", Chars)},
		{"multi-byte characters cut on a character", strings.Repeat("ø", Chars+5), strings.Repeat("ø", Chars-1) + "…"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got := Cut(c.in)
			if got != c.want {
				t.Errorf("Cut gave %d characters %q…, want %q", utf8.RuneCountInString(got), got[:min(len(got), 50)], c.want)
			}
			if again := Cut(got); again != got {
				t.Errorf("a cut string is cut again: %q -> %q", got, again)
			}
		})
	}
}

func TestList(t *testing.T) {
	cases := []struct {
		name  string
		in    []string
		limit int
		want  string
	}{
		{"all listed", []string{"a", "b"}, 5, "a, b"},
		{"the rest counted", []string{"a", "b", "c", "d"}, 2, "a, b … and 2 more"},
		{"each value cut", []string{strings.Repeat("n", 100)}, 5, strings.Repeat("n", Chars-1) + "…"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := List(c.in, c.limit); got != c.want {
				t.Errorf("List = %q, want %q", got, c.want)
			}
		})
	}
}
