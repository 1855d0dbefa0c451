package importers

import (
	"bytes"
	"fmt"
	"io"
	"time"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// Limits on what an inventory file may hold (docs/inventory.md). They keep every value one a
// person can read in a list, every message short, and the memory a file needs bounded by a
// line, whatever the file holds.
const (
	// maxIDChars bounds an identifier or label that the owner keys on: bridge_id, member.
	maxIDChars = 64
	// maxNameChars bounds a name: a bridge's name, a line's, a reference train's (the same
	// bound as a train's name, so that every stored train can be named).
	maxNameChars = traffic.MaxNameChars
	// maxValueChars bounds every other known column: numbers, dates, choices of a list.
	maxValueChars = 64
	// maxFatigueCategory bounds a fatigue detail category's name ("71", "E'").
	maxFatigueCategory = 16

	// maxLineBytes bounds one line of a CSV file, its line end included: a row of every
	// column at its longest is a few kilobytes.
	maxLineBytes = 64 << 10
	// maxRowBytes bounds one row, which quoted line breaks may spread over several lines;
	// a row that runs on beyond it has lost a closing quote.
	maxRowBytes = 1 << 20
	// maxFields bounds the fields of a row and the columns of a header.
	maxFields = 1000
	// csvBuffer is the size of the read buffer before the CSV reader.
	csvBuffer = 64 << 10

	// maxDeadLoadKNPerM bounds the dead load one truss carries per metre: tens of kN/m for
	// the spans screened (common practice), and the bound of a train's distributed load.
	maxDeadLoadKNPerM = traffic.MaxQKNPerM
	// maxCapacityKN bounds a member's capacity: the largest truss members carry some tens of
	// thousands of kN (common practice).
	maxCapacityKN = 1e6
	// maxAreaMM2 bounds a member's gross area: 10 m², twenty times a large chord's.
	maxAreaMM2 = 1e7
	// maxRatingFactor bounds a stored rating factor.
	maxRatingFactor = 100.0

	// minYearBuilt is the earliest year_built: iron and steel truss bridges date from the
	// nineteenth century (common practice).
	minYearBuilt = 1800
)

// maxYearBuilt is the latest year_built: next year, for a span being finished.
func maxYearBuilt() int { return time.Now().Year() + 1 }

// limitError is a line or a row of a CSV file longer than the reader holds: line is the
// line being read when the limit was reached; row tells a row's limit from a line's.
type limitError struct {
	line int
	row  bool
}

func (e *limitError) Error() string { return fmt.Sprintf("line %d: %s", e.line, e.msg()) }

func (e *limitError) msg() string {
	if e.row {
		return fmt.Sprintf("a row runs on for more than %d MiB: is a closing quote missing?", maxRowBytes>>20)
	}
	return fmt.Sprintf("a line longer than %d KiB: not an inventory file, or its line ends are not LF or CRLF", maxLineBytes>>10)
}

// boundedReader passes a file to the CSV reader, failing with a *limitError at the first
// line longer than maxLineBytes or when a row runs on beyond maxRowBytes, so that the CSV
// reader, which holds a whole row, never holds more than that.
//
// The row is measured from rowStart, the offset where the CSV reader finished its last row,
// which the source sets after each row; what the buffer between them has read ahead counts
// towards the next row, so a row is refused at maxRowBytes plus at most one buffer.
type boundedReader struct {
	r         io.Reader
	line      int   // the line being read, 1-based
	lineBytes int   // bytes of it read so far
	total     int64 // bytes passed on
	rowStart  int64
	err       error
}

func newBoundedReader(r io.Reader) *boundedReader { return &boundedReader{r: r, line: 1} }

func (b *boundedReader) Read(p []byte) (int, error) {
	if b.err != nil {
		return 0, b.err
	}
	n, err := b.r.Read(p)
	for i := 0; i < n; {
		nl := bytes.IndexByte(p[i:n], '\n')
		end := n
		if nl >= 0 {
			end = i + nl + 1
		}
		if b.lineBytes+(end-i) > maxLineBytes { // the line's end counts
			keep := i + maxLineBytes - b.lineBytes
			b.err = &limitError{line: b.line}
			b.total += int64(keep)
			return keep, b.err
		}
		b.lineBytes += end - i
		if nl >= 0 {
			b.line++
			b.lineBytes = 0
		}
		i = end
	}
	b.total += int64(n)
	if b.total-b.rowStart > maxRowBytes+csvBuffer {
		b.err = &limitError{line: b.line, row: true}
		return n, b.err
	}
	return n, err
}
