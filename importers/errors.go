package importers

import (
	"fmt"
	"sort"
	"strings"

	"github.com/trussfleet/trussfleet/internal/excerpt"
	"github.com/xuri/excelize/v2"
)

// MaxErrors is how many errors of one file are kept; the rest are counted.
const MaxErrors = 200

// FieldError is one problem in an input file, located as precisely as the problem allows:
// a line (1 is the header), a column (1-based) and the column's name, and the value found
// (an excerpt of it, once the error is in a file's list).
type FieldError struct {
	File   string
	Sheet  string // the sheet of a workbook; Line is then its row
	Line   int
	Column int    // 0 when the problem is the whole row or file
	Field  string // column name, when known
	Value  string
	Msg    string
}

func (e *FieldError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	switch {
	case e.Sheet != "":
		fmt.Fprintf(&b, " sheet %q", e.Sheet)
		if e.Line > 0 {
			fmt.Fprintf(&b, " row %d", e.Line)
		}
		if name, err := excelize.ColumnNumberToName(e.Column); err == nil && e.Column > 0 {
			fmt.Fprintf(&b, ", column %s", name)
		}
	default:
		if e.Line > 0 {
			fmt.Fprintf(&b, " line %d", e.Line)
		}
		if e.Column > 0 {
			fmt.Fprintf(&b, ", column %d", e.Column)
		}
	}
	if e.Field != "" {
		fmt.Fprintf(&b, " (%s)", e.Field)
	}
	if e.Field != "" || e.Value != "" {
		fmt.Fprintf(&b, ", value %q", excerpt.Cut(e.Value))
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

// FileErrors are all the errors found in one file. It unwraps to its FieldErrors.
type FileErrors struct {
	File  string
	Errs  []*FieldError
	Extra int // errors found beyond MaxErrors
}

func (e *FileErrors) Error() string {
	var b strings.Builder
	n := len(e.Errs) + e.Extra
	fmt.Fprintf(&b, "%s: %d error", e.File, n)
	if n != 1 {
		b.WriteString("s")
	}
	b.WriteString(", nothing written")
	for _, fe := range e.Errs {
		b.WriteString("\n  ")
		b.WriteString(fe.Error())
	}
	if e.Extra > 0 {
		fmt.Fprintf(&b, "\n  ... and %d more", e.Extra)
	}
	return b.String()
}

// Unwrap gives the kept errors, for errors.As.
func (e *FileErrors) Unwrap() []error {
	out := make([]error, len(e.Errs))
	for i, fe := range e.Errs {
		out[i] = fe
	}
	return out
}

// errorList collects a file's errors up to MaxErrors.
type errorList struct {
	file  string
	sheet string // the workbook's sheet read, if any
	errs  []*FieldError
	extra int
}

func (l *errorList) add(e *FieldError) {
	if e.File == "" { // a directory's list names each error's own file
		e.File = l.file
	}
	if e.Sheet == "" {
		e.Sheet = l.sheet
	}
	e.Value = excerpt.Cut(e.Value) // the list keeps no input longer than a message quotes
	if len(l.errs) < MaxErrors {
		l.errs = append(l.errs, e)
	} else {
		l.extra++
	}
}

func (l *errorList) count() int { return len(l.errs) + l.extra }

// merge adds another list's errors and sorts all by line and column.
func (l *errorList) merge(o *errorList) {
	for _, e := range o.errs {
		l.add(e)
	}
	l.extra += o.extra
	l.sort()
}

// sort orders the errors by line and column; the file's own errors (line 0) come first.
func (l *errorList) sort() {
	sort.SliceStable(l.errs, func(i, j int) bool {
		a, b := l.errs[i], l.errs[j]
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		return a.Column < b.Column
	})
}

// err is nil when nothing was found.
func (l *errorList) err() error {
	if l.count() == 0 {
		return nil
	}
	return &FileErrors{File: l.file, Errs: l.errs, Extra: l.extra}
}
