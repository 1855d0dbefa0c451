// Package safetext keeps text that came from an inventory (bridge IDs and names, line names,
// member labels, train names, the reasons a bridge failed) from acting on whoever reads an
// output. Each kind of reader has its own rule, written once here.
//
// A spreadsheet runs a CSV cell that starts with =, +, -, @, a tab or a carriage return as a
// formula. CSVCell puts a single quote before such a text cell, which spreadsheets take as
// "this cell is text" (common practice: the OWASP guidance on CSV injection). Only text cells
// pass through it: a number the program writes, such as a compression force -123.4, is not
// text and must stay as it is.
//
// A terminal acts on control characters: ESC starts colour codes and the OSC sequences that
// set a window's title, BEL rings, backspace and carriage return write over what is shown.
// Terminal drops the C0 controls, DEL and the C1 controls (U+0080–U+009F), turns tab, line
// feed, vertical tab, form feed and carriage return into a space (they separate words but
// must not move the cursor), and writes a byte that is not UTF-8 as U+FFFD. Cell is Terminal
// for a cell of a terminal table: it also cuts the text to CellRunes runes, the last an
// ellipsis, so that one very long name does not widen every row. TerminalLines keeps the
// line breaks of a text of several lines (an error listing one problem a line).
//
// The bidirectional override, embedding and isolate characters U+202A–U+202E and
// U+2066–U+2069 reorder the text that follows them, in a terminal and in a browser alike:
// "Mill Lane \u202Eexe.1 FR" is shown as "Mill Lane RF 1.exe". ShowBidi writes each of them
// as a visible escape, ‹U+202E›, so that the text reads in the order it is stored. Terminal
// applies it; the HTML report applies it to its pages and isolates inventory text in <bdi>
// elements as well.
//
// Text with nothing to change is returned as it is; the functions keep no state and are safe
// for concurrent use.
//
//	safetext.CSVCell(`=HYPERLINK("http://x.invalid")`) // `'=HYPERLINK("http://x.invalid")`
//	safetext.Terminal("Tarn\x1b[31mbeck\x07")            // "Tarn[31mbeck"
//	safetext.ShowBidi("Mill Lane \u202Eexe.1 FR")        // "Mill Lane ‹U+202E›exe.1 FR"
package safetext
