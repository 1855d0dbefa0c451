package importers

import (
	"bufio"
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
}

// csvSource reads a CSV file for gocsv: it strips a byte-order mark, normalises the header
// (trimmed, lower case), trims every field, skips blank rows, checks UTF-8 and field counts,
// records every problem, and appends each record's line number. Rows with a problem of
// that kind are skipped, after the error is recorded, so that the rest is still checked.
//
// gocsv calls Read from a goroutine of its own while rows are handled in the caller's, so
// the source keeps its errors apart (errs, read once decode has returned) and the stop flag
// is atomic.
type csvSource struct {
	r       *csv.Reader
	errs    *errorList
	header  []string       // normalised names
	index   map[string]int // name -> 0-based position
	sent    bool           // header handed to gocsv
	stopped atomic.Bool
}

// newCSVSource reads and checks the header against the known columns, recording problems
// in errs. It returns nil when the header is unusable.
func newCSVSource(file string, r io.Reader, errs *errorList, known []column) *csvSource {
	cr := csv.NewReader(bufio.NewReaderSize(r, 1<<16))
	cr.FieldsPerRecord = -1 // checked here, to report and go on
	cr.ReuseRecord = false
	cr.TrimLeadingSpace = true // so that ` "a, b"` is a quoted field
	cr.Comment = '#'           // a line starting with # is a note, e.g. the caution of a listing
	s := &csvSource{r: cr, errs: errs, index: map[string]int{}}
	// From here on the source's errors go in a list of its own (see csvSource).
	defer func() { s.errs = &errorList{file: file} }()
	head, err := cr.Read()
	if errors.Is(err, io.EOF) {
		errs.add(&FieldError{Line: 1, Msg: "the file is empty: a header row naming the columns is needed"})
		return nil
	}
	if err != nil {
		s.parseError(err)
		return nil
	}
	if len(head) > 0 {
		head[0] = strings.TrimPrefix(head[0], "\ufeff")
	}
	bad := false
	for i, h := range head {
		name := strings.ToLower(strings.TrimSpace(h))
		s.header = append(s.header, name)
		switch {
		case !utf8.ValidString(h):
			errs.add(&FieldError{Line: 1, Column: i + 1, Value: h, Msg: "header is not valid UTF-8 text (is this a CSV file?)"})
			bad = true
		case name == "":
			// A trailing separator gives an empty name; a column without a name is ignored.
		case name == lineColumn:
			errs.add(&FieldError{Line: 1, Column: i + 1, Value: h, Msg: "reserved column name"})
			bad = true
		default:
			if j, dup := s.index[name]; dup {
				errs.add(&FieldError{Line: 1, Column: i + 1, Value: h, Msg: fmt.Sprintf("column named twice (also column %d)", j+1)})
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
			errs.add(&FieldError{Line: 1, Column: s.index[c.alt] + 1, Value: c.alt,
				Msg: fmt.Sprintf("give %s or %s, not both", c.name, c.alt)})
			bad = true
		case c.required && !has && !hasAlt:
			msg := "missing required column " + c.name
			if c.alt != "" {
				msg += " (or " + c.alt + ")"
			}
			errs.add(&FieldError{Line: 1, Msg: msg + "; the header has: " + strings.Join(s.named(), ", ")})
			bad = true
		}
	}
	if bad {
		return nil
	}
	return s
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

// unknown lists the header's columns that are not in known (they are ignored).
func (s *csvSource) unknown(known []column) []string {
	var out []string
	for _, h := range s.named() {
		if !slices.ContainsFunc(known, func(c column) bool { return c.name == h || c.alt == h }) && h != "(nothing)" {
			out = append(out, h)
		}
	}
	return out
}

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
		rec, err := s.r.Read()
		if errors.Is(err, io.EOF) {
			return nil, io.EOF
		}
		if err != nil {
			var pe *csv.ParseError
			if !errors.As(err, &pe) {
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
		if !utf8.ValidString(f) || strings.ContainsRune(f, 0) {
			s.errs.add(&FieldError{Line: line, Column: i + 1, Field: s.nameAt(i), Value: strings.ToValidUTF8(f, "\uFFFD"),
				Msg: "not valid UTF-8 text"})
			ok = false
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
