package safetext

import (
	"fmt"
	"strings"
	"unicode/utf8"
)

// CSVCell returns a text cell for a CSV file: s as it is, or s after a single quote when it
// starts with a character that makes a spreadsheet read it as a formula.
func CSVCell(s string) string {
	if s == "" {
		return s
	}
	switch s[0] {
	case '=', '+', '-', '@', '\t', '\r':
		return "'" + s
	}
	return s
}

// IsBidi reports whether r is a bidirectional override, embedding or isolate character
// (U+202A–U+202E, U+2066–U+2069).
func IsBidi(r rune) bool {
	return r >= 0x202a && r <= 0x202e || r >= 0x2066 && r <= 0x2069
}

// ShowBidi writes every bidirectional override, embedding and isolate character of s as a
// visible escape such as ‹U+202E›.
func ShowBidi(s string) string {
	if !strings.ContainsFunc(s, IsBidi) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s) + 16)
	for _, r := range s {
		if IsBidi(r) {
			writeEscape(&b, r)
		} else {
			b.WriteRune(r)
		}
	}
	return b.String()
}

func writeEscape(b *strings.Builder, r rune) {
	fmt.Fprintf(b, "‹U+%04X›", r)
}

// Terminal returns s fit to be written to a terminal: control characters dropped (the
// spacing ones become a space), bidirectional controls escaped, bytes that are not UTF-8
// written as U+FFFD.
func Terminal(s string) string {
	if !strings.ContainsFunc(s, needsWork) {
		return s
	}
	var b strings.Builder
	b.Grow(len(s))
	// Ranging over a string yields utf8.RuneError for each byte that is not UTF-8; written
	// back it is the replacement character, never the raw byte (0x9B alone is a C1 CSI).
	for _, r := range s {
		switch {
		case r == '\t' || r == '\n' || r == '\v' || r == '\f' || r == '\r':
			b.WriteByte(' ')
		case isControl(r):
		case IsBidi(r):
			writeEscape(&b, r)
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// TerminalLines is Terminal for a text of several lines: each line on its own, the line
// feeds between them kept.
func TerminalLines(s string) string {
	if !strings.ContainsFunc(s, needsWork) {
		return s
	}
	lines := strings.Split(s, "\n")
	for i, l := range lines {
		lines[i] = Terminal(l)
	}
	return strings.Join(lines, "\n")
}

// CellRunes is the most runes Cell shows of one text.
const CellRunes = 60

// Cell is Terminal for a cell of a terminal table: a text longer than CellRunes runes is cut
// to CellRunes − 1 of them and an ellipsis.
func Cell(s string) string {
	s = Terminal(s)
	if utf8.RuneCountInString(s) <= CellRunes {
		return s
	}
	n := 0
	for i := range s {
		if n == CellRunes-1 {
			return s[:i] + "…"
		}
		n++
	}
	return s
}

// isControl reports the C0 controls, DEL and the C1 controls.
func isControl(r rune) bool {
	return r < 0x20 || r == 0x7f || r >= 0x80 && r < 0xa0
}

// needsWork reports a rune Terminal changes; utf8.RuneError stands for a byte that is not
// UTF-8 (a U+FFFD written as such is rewritten as itself).
func needsWork(r rune) bool {
	return isControl(r) || IsBidi(r) || r == utf8.RuneError
}
