package store

import (
	"context"
	"fmt"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgtype"
)

// Table category_results: sql/migrations/015_network.sql.

// CategoryResult is a row of category_results: one line category's outcome on a bridge, in
// a result set.
type CategoryResult struct {
	SetID    int64
	Category string // e.g. "D4"
	// Status is carried, passes (passes, but a category it dominates does not) or fails.
	Status string
	// RF is the lowest rating factor of the rated members under the category's reference
	// train (NULL where it loads none), Member the member that has it, LimitBy "axle load" or
	// "mass per metre" ("" with no member).
	RF      pgtype.Float8
	Member  string
	LimitBy string
}

// categoryResultColumns are category_results' columns: the COPY that writes the rows, the
// encoder's order and the SELECT that reads them.
var categoryResultColumns = []column[CategoryResult]{
	{"set_id", func(r *CategoryResult) any { return &r.SetID }},
	{"category", func(r *CategoryResult) any { return &r.Category }},
	{"status", func(r *CategoryResult) any { return &r.Status }},
	{"rf", func(r *CategoryResult) any { return &r.RF }},
	{"member", func(r *CategoryResult) any { return &r.Member }},
	{"limit_by", func(r *CategoryResult) any { return &r.LimitBy }},
}

// CategoryResultColumns are the names of category_results' columns, in the order
// CategoryResult rows are encoded.
var CategoryResultColumns = columnNames(categoryResultColumns)

var copyCategoryResults = copyStatement("category_results", CategoryResultColumns)

// CategoryResult appends one category_results row.
func (e *CopyEncoder) CategoryResult(r *CategoryResult) { encodeRow(e, categoryResultColumns, r) }

// CopyCategoryResults copies a binary COPY stream of category_results rows (CopyEncoder:
// Begin, CategoryResult for each row, End) into the table.
func CopyCategoryResults(ctx context.Context, tx pgx.Tx, stream []byte) error {
	return copyStream(ctx, tx, "category_results", copyCategoryResults, stream)
}

// CategoryResults reads the rows of a result set (none where its run did not ask for the
// network view).
func (db *DB) CategoryResults(ctx context.Context, setID int64) ([]CategoryResult, error) {
	return selectRows(ctx, db, "category_results", categoryResultColumns, "set_id = $1 ORDER BY category", setID)
}

// RunCategoryResults reads the category_results of a run's picture, by bridge: the outcome
// of each line category on each bridge the run rated by category.
func (db *DB) RunCategoryResults(ctx context.Context, runID int64) (map[string][]CategoryResult, error) {
	rows, err := db.Pool.Query(ctx, `SELECT r.bridge_id, c.set_id, c.category, c.status, c.rf, c.member, c.limit_by
		FROM run_picture($1) r JOIN category_results c ON c.set_id = r.set_id
		ORDER BY r.bridge_id, c.category`, runID)
	if err != nil {
		return nil, fmt.Errorf("category results of run %d: %w", runID, err)
	}
	out := map[string][]CategoryResult{}
	var id string
	var c CategoryResult
	_, err = pgx.ForEachRow(rows, []any{&id, &c.SetID, &c.Category, &c.Status, &c.RF, &c.Member, &c.LimitBy}, func() error {
		out[id] = append(out[id], c)
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("category results of run %d: %w", runID, err)
	}
	return out, nil
}
