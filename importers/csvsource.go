package importers

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"sync/atomic"
	"unicode/utf8"

	"github.com/gocarina/gocsv"
	"github.com/trussfleet/trussfleet/internal/excerpt"
)

// lineColumn is a column the source adds to every record so that gocsv, which decodes in a
// goroutine of its own, hands each decoded row over with the line it started on.
const lineColumn = "__line"

// column says how a CSV column is used.
type column struct {
	name     string
	required bool
	// alt is the imperial column that may stand in for this one; factor converts its value.
	alt    string
	factor float64
	// maxChars bounds the length of a value, in characters; 0 means maxValueChars.
	maxChars int
}

// limit is the longest value the column takes, in characters.
func (c column) limit() int {
	if c.maxChars > 0 {
		return c.maxChars
	}
	return maxValueChars
}

// csvSource reads a CSV file for gocsv: it strips a byte-order mark, normalises the header
// (trimmed, lower case), trims every field, skips blank rows, checks UTF-8, NUL bytes, field
// counts and the length of every known column's values, records every problem, and appends
// each record's line number. Rows with a problem of that kind are skipped, after the error
// is recorded, so that the rest is still checked. A line or a row longer than the limits
// (limits.go) ends the reading, with its error: the memory a file needs is bounded by them.
//
// gocsv calls Read from a goroutine of its own while rows are handled in the caller's, so
// the source keeps its errors apart (errs, read once decode has returned) and the stop flag
// is atomic.
type csvSource struct {
	r       records
	in      *boundedReader // nil for a workbook's sheet
	input   *input
	errs    *errorList
	header  []string       // normalised names
	index   map[string]int // name -> 0-based position
	limits  []int          // longest value of each header position, in characters; 0: not checked
	nextRow int            // the line after the last row read, where the next row begins or after
	sent    bool           // header handed to gocsv
	stopped atomic.Bool
}

// newCSVSource opens the file (openInput: text of any of the encodings and separators
// recognised, or a sheet of a workbook, the first when sheet is ""), reads and checks the
// header against the known columns, recording problems in errs. It returns nil when the
// file or its header is unusable; otherwise the caller closes it.
func newCSVSource(file string, r io.Reader, sheet string, errs *errorList, known []column) *csvSource {
	in := openInput(r, sheet, errs)
	if in == nil {
		return nil
	}
	errs.sheet = in.sheet
	s := &csvSource{r: in.recs, in: in.bounded, input: in, errs: errs, index: map[string]int{}, nextRow: 1}
	// From here on the source's errors go in a list of its own (see csvSource).
	defer func() { s.errs = &errorList{file: file, sheet: in.sheet} }()
	ok := s.readHeader(errs, known)
	if !ok {
		if len(in.otherSheets) > 0 {
			errs.add(&FieldError{Msg: fmt.Sprintf("the first sheet, %q, was read; the workbook's other sheets: %s (name the one to read)",
				in.sheet, excerpt.List(in.otherSheets, 20))})
			errs.sort()
		}
		in.close()
		return nil
	}
	return s
}

// close releases what the source holds open (a workbook's parts).
func (s *csvSource) close() { s.input.close() }

// readHeader reads the header and checks it against the known columns.
func (s *csvSource) readHeader(errs *errorList, known []column) bool {
	head, err := s.read()
	if errors.Is(err, io.EOF) {
		errs.add(&FieldError{Line: 1, Msg: "the file is empty: a header row naming the columns is needed"})
		return false
	}
	if err != nil {
		s.parseError(err) // s.errs is still errs
		return false
	}
	hl, _ := s.r.FieldPos(0) // the header's line: blank lines and notes may come before it
	if len(head) > maxFields {
		errs.add(&FieldError{Line: hl, Msg: fmt.Sprintf("the header has %d columns; at most %d are read", len(head), maxFields)})
		return false
	}
	if len(head) > 0 {
		head[0] = strings.TrimPrefix(head[0], "\ufeff")
	}
	bad := false
	for i, h := range head {
		name := strings.ToLower(strings.TrimSpace(h))
		s.header = append(s.header, name)
		switch {
		case strings.IndexByte(h, 0) >= 0:
			errs.add(&FieldError{Line: hl, Column: i + 1, Value: strings.ToValidUTF8(h, "\uFFFD"), Msg: nulMsg(h)})
			bad = true
		case !utf8.ValidString(h):
			errs.add(&FieldError{Line: hl, Column: i + 1, Value: strings.ToValidUTF8(h, "\uFFFD"), Msg: "header is not valid UTF-8 text (is this a CSV file?)"})
			bad = true
		case name == "":
			// A trailing separator gives an empty name; a column without a name is ignored.
		case name == lineColumn:
			errs.add(&FieldError{Line: hl, Column: i + 1, Value: h, Msg: "reserved column name"})
			bad = true
		default:
			if j, dup := s.index[name]; dup {
				errs.add(&FieldError{Line: hl, Column: i + 1, Value: h, Msg: fmt.Sprintf("column named twice (also column %d)", j+1)})
				bad = true
				continue
			}
			s.index[name] = i
		}
	}
	for _, c := range known {
		_, has := s.index[c.name]
		_, hasAlt := s.index[c.alt]
		switch {
		case has && hasAlt:
			errs.add(&FieldError{Line: hl, Column: s.index[c.alt] + 1, Value: c.alt,
				Msg: fmt.Sprintf("give %s or %s, not both", c.name, c.alt)})
			bad = true
		case c.required && !has && !hasAlt:
			msg := "missing required column " + c.name
			if c.alt != "" {
				msg += " (or " + c.alt + ")"
			}
			errs.add(&FieldError{Line: hl, Msg: msg + "; the header has: " + excerpt.List(s.named(), 30)})
			bad = true
		}
	}
	if bad {
		return false
	}
	s.limits = make([]int, len(s.header))
	for _, c := range known {
		for _, name := range []string{c.name, c.alt} {
			if i, ok := s.index[name]; ok && name != "" {
				s.limits[i] = c.limit()
			}
		}
	}
	return true
}

// read reads one record and notes where it ended: the offset, for the row limit of the
// bounded reader, and the line, for its message.
func (s *csvSource) read() ([]string, error) {
	rec, err := s.r.Read()
	if cr, ok := s.r.(*csv.Reader); ok && s.in != nil {
		s.in.rowStart = cr.InputOffset()
	}
	var pe *csv.ParseError
	var se *sheetError
	switch {
	case err == nil && len(rec) > 0:
		// The last field may be quoted over several lines; the CSV reader makes each line
		// end in one '\n'.
		line, _ := s.r.FieldPos(len(rec) - 1)
		s.nextRow = line + strings.Count(rec[len(rec)-1], "\n") + 1
	case errors.As(err, &pe):
		s.nextRow = pe.Line + 1
	case errors.As(err, &se):
		s.nextRow = se.row + 1
	}
	return rec, err
}

// nulMsg says where in a value its first NUL byte is.
func nulMsg(v string) string {
	at := utf8.RuneCountInString(v[:strings.IndexByte(v, 0)]) + 1
	return fmt.Sprintf("a NUL byte (character %d of the value): a text file has none; is this a binary or UTF-16 file?", at)
}

// named lists the header's non-empty names.
func (s *csvSource) named() []string {
	var out []string
	for _, h := range s.header {
		if h != "" {
			out = append(out, h)
		}
	}
	if len(out) == 0 {
		return []string{"(nothing)"}
	}
	return out
}

// unknown lists the header's columns that are not in known (they are ignored), as excerpts
// and at most maxIgnoredListed of them, the last entry then counting the rest.
func (s *csvSource) unknown(known []column) []string {
	var out []string
	n := 0
	for _, h := range s.named() {
		if !slices.ContainsFunc(known, func(c column) bool { return c.name == h || c.alt == h }) && h != "(nothing)" {
			if n < maxIgnoredListed {
				out = append(out, excerpt.Cut(h))
			}
			n++
		}
	}
	if n > maxIgnoredListed {
		out = append(out, fmt.Sprintf("… and %d more", n-maxIgnoredListed))
	}
	return out
}

// maxIgnoredListed bounds the list of ignored columns a report gives.
const maxIgnoredListed = 30

// has reports whether the header names a column.
func (s *csvSource) has(name string) bool { _, ok := s.index[name]; return ok }

// col is the 1-based position of a column, 0 when absent.
func (s *csvSource) col(name string) int {
	if i, ok := s.index[name]; ok {
		return i + 1
	}
	return 0
}

// Read implements gocsv.CSVReader.
func (s *csvSource) Read() ([]string, error) {
	if !s.sent {
		s.sent = true
		return append(slices.Clone(s.header), lineColumn), nil
	}
	for !s.stopped.Load() {
		rec, err := s.read()
		if errors.Is(err, io.EOF) {
			return nil, io.EOF
		}
		var le *limitError
		if errors.As(err, &le) {
			s.parseError(err)
			return nil, io.EOF // what follows cannot be read as rows
		}
		if err != nil {
			var pe *csv.ParseError
			var se *sheetError
			if !errors.As(err, &pe) && !errors.As(err, &se) {
				return nil, err // the file could not be read
			}
			s.parseError(err)
			continue
		}
		line, _ := s.r.FieldPos(0)
		if s.checkRecord(rec, line) {
			// Empty fields beyond the header are dropped, so the line lands under its name.
			return append(rec[:len(s.header)], strconv.Itoa(line)), nil
		}
	}
	return nil, io.EOF
}

// ReadAll implements gocsv.CSVReader; gocsv's streaming decoders do not call it.
func (s *csvSource) ReadAll() ([][]string, error) {
	var all [][]string
	for {
		rec, err := s.Read()
		if errors.Is(err, io.EOF) {
			return all, nil
		}
		if err != nil {
			return all, err
		}
		all = append(all, rec)
	}
}

// checkRecord trims the fields in place and reports whether the row is to be decoded.
func (s *csvSource) checkRecord(rec []string, line int) bool {
	if len(rec) > maxFields {
		s.errs.add(&FieldError{Line: line, Msg: fmt.Sprintf("%d fields; at most %d are read (the header has %d columns)", len(rec), maxFields, len(s.header))})
		return false
	}
	blank := true
	for i, f := range rec {
		rec[i] = strings.TrimSpace(f)
		if rec[i] != "" {
			blank = false
		}
	}
	if blank {
		return false // a blank line, or one of separators only
	}
	ok := true
	for i, f := range rec {
		switch {
		case strings.IndexByte(f, 0) >= 0:
			s.errs.add(&FieldError{Line: line, Column: i + 1, Field: s.nameAt(i), Value: strings.ToValidUTF8(f, "\uFFFD"), Msg: nulMsg(f)})
			ok = false
		case !utf8.ValidString(f):
			s.errs.add(&FieldError{Line: line, Column: i + 1, Field: s.nameAt(i), Value: strings.ToValidUTF8(f, "\uFFFD"),
				Msg: "not valid UTF-8 text"})
			ok = false
		case i < len(s.limits) && s.limits[i] > 0 && len(f) > s.limits[i]:
			if n := utf8.RuneCountInString(f); n > s.limits[i] {
				s.errs.add(&FieldError{Line: line, Column: i + 1, Field: s.nameAt(i), Value: f,
					Msg: fmt.Sprintf("%d characters; %s takes at most %d", n, s.nameAt(i), s.limits[i])})
				ok = false
			}
		}
	}
	if len(rec) < len(s.header) {
		s.errs.add(&FieldError{Line: line, Msg: fmt.Sprintf("%d fields, but the header has %d columns", len(rec), len(s.header))})
		return false
	}
	for i := len(s.header); i < len(rec); i++ {
		if rec[i] != "" {
			s.errs.add(&FieldError{Line: line, Column: i + 1, Value: rec[i], Msg: fmt.Sprintf("a value beyond the header's %d columns (a decimal comma, or a comma in a text that is not quoted?)", len(s.header))})
			return false
		}
	}
	return ok
}

func (s *csvSource) nameAt(i int) string {
	if i < len(s.header) {
		return s.header[i]
	}
	return ""
}

func (s *csvSource) parseError(err error) {
	var pe *csv.ParseError
	var le *limitError
	if errors.As(err, &le) {
		if le.row {
			s.errs.add(&FieldError{Line: s.nextRow, Msg: fmt.Sprintf(
				"the row that begins here (or after blank lines) runs on to line %d, more than %d MiB: is a closing quote missing?", le.line, maxRowBytes>>20)})
			return
		}
		s.errs.add(&FieldError{Line: le.line, Msg: le.msg()})
		return
	}
	var se *sheetError
	if errors.As(err, &se) {
		s.errs.add(&FieldError{Line: se.row, Msg: se.msg})
		return
	}
	if errors.As(err, &pe) {
		// pe.Column counts characters, not fields: say so rather than call it a column.
		s.errs.add(&FieldError{Line: pe.Line, Msg: fmt.Sprintf("malformed CSV at character %d: %v", pe.Column, pe.Err)})
		return
	}
	s.errs.add(&FieldError{Msg: err.Error()})
}

// decode streams the rows as values of T (a struct with csv tags, all fields strings, one
// of them tagged __line) to f, until f returns false or the file ends.
func decode[T any](s *csvSource, f func(T) bool) error {
	return gocsv.UnmarshalDecoderToCallback(gocsv.NewSimpleDecoderFromCSVReader(s), func(rec T) {
		if !s.stopped.Load() && !f(rec) {
			s.stopped.Store(true)
		}
	})
}
