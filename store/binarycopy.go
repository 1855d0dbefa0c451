package store

import (
	"encoding/binary"
	"math"
	"strings"
	"sync"
)

// copyEncoder writes rows in PostgreSQL's binary COPY format: a signature, flags and an
// extension length; each row a field count, then each field's length (-1 for NULL) and its
// bytes in the type's binary form, big-endian; a field count of -1 to end. Its methods append
// one field each, in the order of the COPY statement's columns.
//
// A job writes a few thousand result rows; encoding them here, column types known in
// advance, costs a fraction of handing pgx one []any a row for it to box, plan and encode
// value by value.
type copyEncoder struct {
	buf []byte
}

// copySignature opens every binary COPY stream.
const copySignature = "PGCOPY\n\377\r\n\000"

// textOID is the type OID of text, a text[] field's element type (PostgreSQL's pg_type
// catalogue).
const textOID = 25

// copyEncoders keeps encoders, and their 1 to 2 MB buffers, from one job to the next.
var copyEncoders = sync.Pool{New: func() any { return new(copyEncoder) }}

// copyStatement is the COPY ... FROM STDIN statement for rows of the columns, in that order.
func copyStatement(table string, columns []string) string {
	return "COPY " + table + " (" + strings.Join(columns, ", ") + ") FROM STDIN (FORMAT binary)"
}

// begin empties the buffer and writes the header: the signature, no flags (no OIDs), no
// header extension.
func (e *copyEncoder) begin() {
	e.buf = append(e.buf[:0], copySignature...)
	e.put32(0)
	e.put32(0)
}

// row starts a row of n fields.
func (e *copyEncoder) row(n int) { e.buf = binary.BigEndian.AppendUint16(e.buf, uint16(n)) }

// end writes the trailer and returns the whole stream.
func (e *copyEncoder) end() []byte {
	e.buf = binary.BigEndian.AppendUint16(e.buf, 0xffff) // int16 -1
	return e.buf
}

// put32 appends a bare big-endian int32 (a length, a count, an OID).
func (e *copyEncoder) put32(v int) { e.buf = binary.BigEndian.AppendUint32(e.buf, uint32(v)) }

func (e *copyEncoder) null() { e.put32(-1) }

// int8 is a bigint field.
func (e *copyEncoder) int8(v int64) {
	e.put32(8)
	e.buf = binary.BigEndian.AppendUint64(e.buf, uint64(v))
}

// int4 is an integer field.
func (e *copyEncoder) int4(v int32) {
	e.put32(4)
	e.put32(int(v))
}

// float8 is a double precision field, NaN and ±Inf included.
func (e *copyEncoder) float8(v float64) {
	e.put32(8)
	e.buf = binary.BigEndian.AppendUint64(e.buf, math.Float64bits(v))
}

// float8OrNull is a double precision field that stores only a finite number: NaN and ±Inf,
// which mean "no value" in the screening results, become NULL.
func (e *copyEncoder) float8OrNull(v float64) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		e.null()
		return
	}
	e.float8(v)
}

// text is a text field: the string's bytes, which the server checks are valid UTF-8.
func (e *copyEncoder) text(s string) {
	e.put32(len(s))
	e.buf = append(e.buf, s...)
}

// textArray is a text[] field with no NULL elements; an empty slice is the empty array '{}'
// (no dimensions, as PostgreSQL itself sends it), never NULL. It is a function because a
// method cannot take a type parameter.
func textArray[S ~string](e *copyEncoder, elems []S) {
	dims, size := 0, 12 // the number of dimensions, the has-NULLs flag, the element type
	if len(elems) > 0 {
		dims, size = 1, 20 // and the dimension's length and lower bound
	}
	for _, s := range elems {
		size += 4 + len(s)
	}
	e.put32(size)
	e.put32(dims)
	e.put32(0)
	e.put32(textOID)
	if dims == 1 {
		e.put32(len(elems))
		e.put32(1)
	}
	for _, s := range elems {
		e.text(string(s))
	}
}
