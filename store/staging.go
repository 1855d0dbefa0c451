package store

import (
	"context"
	"fmt"
	"iter"
	"strings"

	"github.com/jackc/pgx/v5"
)

// table describes an inventory table to the staged upsert: its natural key, the columns an
// import writes, and the time column an update touches.
type table struct {
	name  string
	key   []string
	cols  []string
	touch string
}

func (t table) stage() string { return "stage_" + t.name }

// all is key and value columns in the order rows are given.
func (t table) all() []string { return append(append([]string{}, t.key...), t.cols...) }

// Duplicate is a natural key that appears on more than one line of a file.
type Duplicate struct {
	Key   []string
	Lines []int
}

// staged copies rows into a temporary staging table that disappears with the transaction.
// Each row is the file's line number followed by the table's key and value columns.
func staged(ctx context.Context, tx pgx.Tx, t table, rows iter.Seq[[]any]) (int64, error) {
	cols := t.all()
	// CREATE TABLE AS copies the column types without the constraints: the staging table
	// holds what the file says, the upsert applies the table's own checks.
	create := fmt.Sprintf("CREATE TEMP TABLE %s ON COMMIT DROP AS SELECT 0::integer AS src_line, %s FROM %s WITH NO DATA",
		t.stage(), strings.Join(cols, ", "), t.name)
	if _, err := tx.Exec(ctx, create); err != nil {
		return 0, fmt.Errorf("creating %s: %w", t.stage(), err)
	}
	next, stop := iter.Pull(rows)
	defer stop()
	src := pgx.CopyFromFunc(func() ([]any, error) {
		row, ok := next()
		if !ok {
			return nil, nil
		}
		return row, nil
	})
	n, err := tx.CopyFrom(ctx, pgx.Identifier{t.stage()}, append([]string{"src_line"}, cols...), src)
	if err != nil {
		return n, fmt.Errorf("copying rows into %s: %w", t.stage(), err)
	}
	return n, nil
}

// duplicates lists up to limit keys staged more than once, in order of first appearance.
func duplicates(ctx context.Context, tx pgx.Tx, t table, limit int) ([]Duplicate, error) {
	keys := strings.Join(t.key, ", ")
	q := fmt.Sprintf(`SELECT ARRAY[%s]::text[], array_agg(src_line ORDER BY src_line) FROM %s
		GROUP BY %s HAVING count(*) > 1 ORDER BY min(src_line) LIMIT %d`, keys, t.stage(), keys, limit)
	rows, err := tx.Query(ctx, q)
	if err != nil {
		return nil, fmt.Errorf("checking %s for repeated keys: %w", t.name, err)
	}
	var out []Duplicate
	for rows.Next() {
		var d Duplicate
		var lines []int32
		if err := rows.Scan(&d.Key, &lines); err != nil {
			return nil, err
		}
		for _, l := range lines {
			d.Lines = append(d.Lines, int(l))
		}
		out = append(out, d)
	}
	return out, rows.Err()
}

// merge upserts the staged rows on the natural key. A row whose values all equal the stored
// ones is left alone, so re-importing a file changes nothing; counts say what happened.
func merge(ctx context.Context, tx pgx.Tx, t table, batchID int64) (inserted, updated int, err error) {
	set := make([]string, 0, len(t.cols)+2)
	mine := make([]string, len(t.cols))
	theirs := make([]string, len(t.cols))
	for i, c := range t.cols {
		set = append(set, c+" = EXCLUDED."+c)
		mine[i] = t.name + "." + c
		theirs[i] = "EXCLUDED." + c
	}
	set = append(set, "import_batch_id = EXCLUDED.import_batch_id", t.touch+" = now()")
	all := strings.Join(t.all(), ", ")
	// xmax is 0 on a freshly inserted row version and set on an updated one: the usual way to
	// tell the two apart in RETURNING.
	q := fmt.Sprintf(`WITH up AS (
		INSERT INTO %[1]s (%[2]s, import_batch_id)
		SELECT %[2]s, $1 FROM %[3]s
		ON CONFLICT (%[4]s) DO UPDATE SET %[5]s
		WHERE (%[6]s) IS DISTINCT FROM (%[7]s)
		RETURNING (xmax = 0) AS inserted)
	SELECT count(*) FILTER (WHERE inserted), count(*) FILTER (WHERE NOT inserted) FROM up`,
		t.name, all, t.stage(), strings.Join(t.key, ", "), strings.Join(set, ", "),
		rowOf(mine), rowOf(theirs))
	if err := tx.QueryRow(ctx, q, batchID).Scan(&inserted, &updated); err != nil {
		return 0, 0, fmt.Errorf("merging into %s: %w", t.name, err)
	}
	return inserted, updated, nil
}

// rowOf writes a row constructor; ROW() keeps a one-column list a row.
func rowOf(cols []string) string { return "ROW(" + strings.Join(cols, ", ") + ")" }

// Row is a row type an import can stage: Bridge, Member or Train.
type Row interface {
	Bridge | Member | Train | TrussTable
	values() []any
}

// Staged pairs a row with the line of the file it came from (for trains, the position of
// the file in the import), for error messages.
type Staged[T Row] struct {
	Line int
	Row  T
}

// tables maps each import kind to its table.
var tables = map[Kind]table{KindBridges: bridgesTable, KindMembers: membersTable, KindTrains: trainsTable, KindTrusses: trussTablesTable}

// Stage copies the rows into the import's staging table and returns how many. Call it once
// per import, with the row type of the import's kind.
func Stage[T Row](ctx context.Context, im *Import, rows iter.Seq[Staged[T]]) (int64, error) {
	var zero T
	if want := kindOf(zero); want != im.kind {
		return 0, fmt.Errorf("staging %s rows in a %s import", want, im.kind)
	}
	n, err := staged(ctx, im.tx, tables[im.kind], func(yield func([]any) bool) {
		for r := range rows {
			if !yield(append([]any{r.Line}, r.Row.values()...)) {
				return
			}
		}
	})
	im.staged += n
	return n, err
}

func kindOf(r any) Kind {
	switch r.(type) {
	case Bridge:
		return KindBridges
	case Member:
		return KindMembers
	case TrussTable:
		return KindTrusses
	}
	return KindTrains
}

// Duplicates lists up to limit natural keys staged on more than one line.
func (im *Import) Duplicates(ctx context.Context, limit int) ([]Duplicate, error) {
	return duplicates(ctx, im.tx, tables[im.kind], limit)
}

// Merge upserts the staged rows on the natural key and counts what changed.
func (im *Import) Merge(ctx context.Context) (Counts, error) {
	ins, upd, err := merge(ctx, im.tx, tables[im.kind], im.id)
	return Counts{Rows: int(im.staged), Inserted: ins, Updated: upd, Unchanged: int(im.staged) - ins - upd}, err
}
