package store

import (
	"bytes"
	"context"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
)

// column is one column of a table whose rows are held in a struct R: its name, and the field
// of R that holds its value. A table's columns, in one slice, are the one place its schema
// is spelled in the program: the column list of its COPY statement and of its SELECT, the
// order its rows are encoded and scanned in, and each field's encoding (by the field's type,
// field) all come from that slice.
type column[R any] struct {
	name  string
	field func(*R) any // a pointer to the field
}

// columnNames lists the columns' names, in order.
func columnNames[R any](cols []column[R]) []string {
	names := make([]string, len(cols))
	for i, c := range cols {
		names[i] = c.name
	}
	return names
}

// encodeRow appends one row of the columns.
func encodeRow[R any](e *CopyEncoder, cols []column[R], r *R) {
	e.row(len(cols))
	for _, c := range cols {
		e.field(c.field(r))
	}
}

// selectRows reads the rows of table that the condition (with its arguments) picks, each
// into an R through the columns.
func selectRows[R any](ctx context.Context, db *DB, table string, cols []column[R], where string, args ...any) ([]R, error) {
	q := "SELECT " + strings.Join(columnNames(cols), ", ") + " FROM " + table + " WHERE " + where
	rows, err := db.Pool.Query(ctx, q, args...)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", table, err)
	}
	return pgx.CollectRows(rows, func(row pgx.CollectableRow) (R, error) {
		var r R
		dest := make([]any, len(cols))
		for i, c := range cols {
			dest[i] = c.field(&r)
		}
		return r, row.Scan(dest...)
	})
}

// copyStatement is the COPY ... FROM STDIN statement for rows of the columns, in that order.
func copyStatement(table string, columns []string) string {
	return "COPY " + table + " (" + strings.Join(columns, ", ") + ") FROM STDIN (FORMAT binary)"
}

// copyStream sends a binary COPY stream (Begin ... End) to the server with the statement.
func copyStream(ctx context.Context, tx pgx.Tx, table, statement string, stream []byte) error {
	if _, err := tx.Conn().PgConn().CopyFrom(ctx, bytes.NewReader(stream), statement); err != nil {
		return fmt.Errorf("%s: %w", table, err)
	}
	return nil
}
