package store

import (
	"context"
	"encoding/json"
	"fmt"

	"github.com/jackc/pgx/v5"
)

// Table truss_tables: sql/migrations/013_truss_forms.sql.

// TrussTable is the joint/member table of one bridge whose truss_type is "table": the table
// as the importer checked it, as JSON (the screening's truss.Table; the store does not read
// it).
type TrussTable struct {
	BridgeID string
	Doc      json.RawMessage
}

var trussTablesTable = table{
	name:  "truss_tables",
	key:   []string{"bridge_id"},
	cols:  []string{"doc"},
	touch: "updated_at",
}

func (t TrussTable) values() []any { return []any{t.BridgeID, t.Doc} }

// TrussTables returns the joint tables of the given bridges (all when ids is nil), by
// bridge id.
func (db *DB) TrussTables(ctx context.Context, ids []string) (map[string]json.RawMessage, error) {
	return trussTables(ctx, db.Pool, ids)
}

// TrussTablesTx is TrussTables read in a transaction (a run's snapshot).
func TrussTablesTx(ctx context.Context, tx pgx.Tx, ids []string) (map[string]json.RawMessage, error) {
	return trussTables(ctx, tx, ids)
}

type querier interface {
	Query(ctx context.Context, sql string, args ...any) (pgx.Rows, error)
}

func trussTables(ctx context.Context, q querier, ids []string) (map[string]json.RawMessage, error) {
	sql := "SELECT bridge_id, doc FROM truss_tables WHERE $1::text[] IS NULL OR bridge_id = ANY($1)"
	rows, err := q.Query(ctx, sql, ids)
	if err != nil {
		return nil, fmt.Errorf("reading joint tables: %w", err)
	}
	out := map[string]json.RawMessage{}
	var id string
	var doc []byte
	_, err = pgx.ForEachRow(rows, []any{&id, &doc}, func() error {
		out[id] = append(json.RawMessage(nil), doc...)
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("reading joint tables: %w", err)
	}
	return out, nil
}
