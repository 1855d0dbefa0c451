package safetext

import (
	"strings"
	"testing"
	"unicode/utf8"
)

func TestCSVCell(t *testing.T) {
	// Common practice: the OWASP guidance on CSV injection lists =, +, -, @, tab and
	// carriage return as the first characters that make a spreadsheet evaluate a cell.
	for _, c := range []struct{ name, in, want string }{
		{"hyperlink formula", `=HYPERLINK("http://x.invalid")`, `'=HYPERLINK("http://x.invalid")`},
		{"dde command", `+cmd|' /C calc'!A0`, `'+cmd|' /C calc'!A0`},
		{"at function", "@SUM(A1)", "'@SUM(A1)"},
		{"minus arithmetic", "-1+2", "'-1+2"},
		{"tab first", "\tTarnbeck", "'\tTarnbeck"},
		{"carriage return first", "\rTarnbeck", "'\rTarnbeck"},
		{"plain name", "Tarnbeck Viaduct", "Tarnbeck Viaduct"},
		{"formula character later", "Cold Sike = Bridge", "Cold Sike = Bridge"},
		{"quote first already", "'=1", "'=1"},
		{"empty", "", ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := CSVCell(c.in); got != c.want {
				t.Errorf("CSVCell(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

func TestTerminal(t *testing.T) {
	// Common practice (ECMA-48): ESC [ … m sets colours, ESC ] 0 ; … BEL sets the window
	// title, BS and CR move the cursor back, 0x9B is the one-byte CSI of the C1 set.
	for _, c := range []struct{ name, in, want string }{
		{"colour code", "Tarn\x1b[31mbeck", "Tarn[31mbeck"},
		{"title sequence", "Tarn\x1b]0;title\x07beck", "Tarn]0;titlebeck"},
		{"backspace and delete", "Tarn\b\bbeck\x7f", "Tarnbeck"},
		{"carriage return and tab", "Tarn\rbeck\tViaduct\n", "Tarn beck Viaduct "},
		{"C1 control as a rune", "Tarn\u009b2Jbeck", "Tarn2Jbeck"},
		{"C1 control as a lone byte", "Tarn\x9b2Jbeck", "Tarn\uFFFD2Jbeck"},
		{"right-to-left override", "Mill Lane \u202Eexe.1 FR", "Mill Lane ‹U+202E›exe.1 FR"},
		{"isolates", "\u2066a\u2069\u2067b\u2068", "‹U+2066›a‹U+2069›‹U+2067›b‹U+2068›"},
		{"embeddings and pop", "\u202Aa\u202Bb\u202Cc\u202D", "‹U+202A›a‹U+202B›b‹U+202C›c‹U+202D›"},
		{"letters of other scripts kept", "Мост № 3 · 橋 · Ħal", "Мост № 3 · 橋 · Ħal"},
	} {
		t.Run(c.name, func(t *testing.T) {
			if got := Terminal(c.in); got != c.want {
				t.Errorf("Terminal(%q) = %q, want %q", c.in, got, c.want)
			}
		})
	}
}

func TestTerminalLines(t *testing.T) {
	in := "bridges.csv: 2 errors\n  line 2: bridge \x1b[2JT-1\x07\n  line 3: \u202Eeman"
	want := "bridges.csv: 2 errors\n  line 2: bridge [2JT-1\n  line 3: ‹U+202E›eman"
	if got := TerminalLines(in); got != want {
		t.Errorf("TerminalLines = %q, want %q", got, want)
	}
}

func TestCell(t *testing.T) {
	long := strings.Repeat("Ä", 100)
	got := Cell(long)
	if n := utf8.RuneCountInString(got); n != CellRunes || !strings.HasSuffix(got, "…") || !strings.HasPrefix(got, strings.Repeat("Ä", CellRunes-1)) {
		t.Errorf("Cell of 100 runes = %q (%d runes), want %d runes ending in an ellipsis", got, n, CellRunes)
	}
	exact := strings.Repeat("x", CellRunes)
	if Cell(exact) != exact {
		t.Errorf("a text of exactly %d runes was cut", CellRunes)
	}
	if got := Cell("Tarn\x1b[31mbeck"); got != "Tarn[31mbeck" {
		t.Errorf("Cell does not clean: %q", got)
	}
}

// FuzzTerminal checks what Terminal and Cell promise for any input: valid UTF-8 holding no
// C0 control, DEL, C1 control or raw bidirectional control.
func FuzzTerminal(f *testing.F) {
	for _, s := range []string{"Tarn\x1b[31mbeck", "\x9b\xff", "Mill \u202Eexe", "\u2069\t\r\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, out := range []string{Terminal(s), Cell(s)} {
			if !utf8.ValidString(out) {
				t.Fatalf("Terminal(%q) = %q is not UTF-8", s, out)
			}
			for _, r := range out {
				if isControl(r) || IsBidi(r) {
					t.Fatalf("Terminal(%q) = %q holds %U", s, out, r)
				}
			}
		}
	})
}
