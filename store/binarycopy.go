package store

import (
	"encoding/binary"
	"fmt"
	"math"

	"github.com/jackc/pgx/v5/pgtype"
)

// CopyEncoder writes rows in PostgreSQL's binary COPY format: a signature, flags and an
// extension length; each row a field count, then each field's length (-1 for NULL) and its
// bytes in the type's binary form, big-endian; a field count of -1 to end. A table's file
// gives it a method that appends one row of that table (MemberResult, MemberAssessment), in
// the order of the table's columns.
//
// A job writes a few thousand result rows; encoding them here, column types known in
// advance, costs a fraction of handing pgx one []any a row for it to box, plan and encode
// value by value. The zero value is ready to use; keep one, and its buffer, from one job to
// the next.
type CopyEncoder struct {
	buf []byte
}

// NewCopyEncoder gives an encoder that writes over buf's storage.
func NewCopyEncoder(buf []byte) *CopyEncoder { return &CopyEncoder{buf: buf} }

// copySignature opens every binary COPY stream.
const copySignature = "PGCOPY\n\377\r\n\000"

// textOID is the type OID of text, a text[] field's element type (PostgreSQL's pg_type
// catalogue).
const textOID = 25

// Begin empties the buffer and writes the header: the signature, no flags (no OIDs), no
// header extension.
func (e *CopyEncoder) Begin() {
	e.buf = append(e.buf[:0], copySignature...)
	e.put32(0)
	e.put32(0)
}

// Reset empties the buffer without writing a header: the rows appended after it are bare
// rows, to be digested rather than sent.
func (e *CopyEncoder) Reset() { e.buf = e.buf[:0] }

// End writes the trailer and returns the whole stream.
func (e *CopyEncoder) End() []byte {
	e.buf = binary.BigEndian.AppendUint16(e.buf, 0xffff) // int16 -1
	return e.buf
}

// Bytes is what was written since Begin or Reset.
func (e *CopyEncoder) Bytes() []byte { return e.buf }

// row starts a row of n fields.
func (e *CopyEncoder) row(n int) { e.buf = binary.BigEndian.AppendUint16(e.buf, uint16(n)) }

// put32 appends a bare big-endian int32 (a length, a count, an OID).
func (e *CopyEncoder) put32(v int) { e.buf = binary.BigEndian.AppendUint32(e.buf, uint32(v)) }

func (e *CopyEncoder) null() { e.put32(-1) }

// int8 is a bigint field.
func (e *CopyEncoder) int8(v int64) {
	e.put32(8)
	e.buf = binary.BigEndian.AppendUint64(e.buf, uint64(v))
}

// int4 is an integer field.
func (e *CopyEncoder) int4(v int32) {
	e.put32(4)
	e.put32(int(v))
}

// float8 is a double precision field, NaN and ±Inf included.
func (e *CopyEncoder) float8(v float64) {
	e.put32(8)
	e.buf = binary.BigEndian.AppendUint64(e.buf, math.Float64bits(v))
}

// text is a text field: the string's bytes, which the server checks are valid UTF-8.
func (e *CopyEncoder) text(s string) {
	e.put32(len(s))
	e.buf = append(e.buf, s...)
}

// textArray is a text[] field with no NULL elements; an empty slice is the empty array '{}'
// (no dimensions, as PostgreSQL itself sends it), never NULL.
func (e *CopyEncoder) textArray(elems []string) {
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
		e.text(s)
	}
}

// field appends one field, encoded by the type of the value v points to: bigint (int64),
// integer (pgtype.Int4, NULL when not Valid), double precision (float64, stored as it is,
// NaN and ±Inf included; pgtype.Float8, NULL when not Valid), text (string) and text[]
// ([]string).
func (e *CopyEncoder) field(v any) {
	switch v := v.(type) {
	case *int64:
		e.int8(*v)
	case *pgtype.Int4:
		if !v.Valid {
			e.null()
			return
		}
		e.int4(v.Int32)
	case *float64:
		e.float8(*v)
	case *pgtype.Float8:
		if !v.Valid {
			e.null()
			return
		}
		e.float8(v.Float64)
	case *string:
		e.text(*v)
	case *[]string:
		e.textArray(*v)
	default:
		panic(fmt.Sprintf("store: no binary COPY encoding for a field of type %T", v))
	}
}
