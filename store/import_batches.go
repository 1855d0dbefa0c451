package store

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
)

// Table import_batches: sql/migrations/001_inventory.sql.

// Kind is what an import loads.
type Kind string

// The import kinds, as recorded in import_batches.kind.
const (
	KindBridges Kind = "bridges"
	KindMembers Kind = "members"
	KindTrains  Kind = "trains"
	KindTrusses Kind = "trusses" // joint tables (truss_tables.go)
)

// Counts say what an import did with its rows.
type Counts struct {
	Rows      int // valid rows read
	Inserted  int // new keys
	Updated   int // existing keys whose values changed
	Unchanged int // existing keys with the same values
	Deleted   int // stored rows absent from the file, removed by a replacing import (Import.DropAbsent)
}

// Batch is one recorded import.
type Batch struct {
	ID         int64
	Kind       Kind
	FileName   string
	SHA256     string
	Counts     Counts
	StartedAt  time.Time
	FinishedAt time.Time
}

// Import is a bulk load in progress: one transaction, which Commit records and commits and
// Rollback abandons. Stage the rows (Stage), look for repeated keys (Duplicates), then Merge.
type Import struct {
	tx      pgx.Tx
	id      int64
	kind    Kind
	started time.Time
	staged  int64
	done    bool
}

// BeginImport opens the transaction of an import of one file.
func (db *DB) BeginImport(ctx context.Context, kind Kind, fileName string) (*Import, error) {
	tx, err := db.Pool.Begin(ctx)
	if err != nil {
		return nil, fmt.Errorf("beginning import of %s: %w", fileName, err)
	}
	im := &Import{tx: tx, kind: kind}
	// An import reported as committed must survive a crash of the server.
	if err := Durable(ctx, tx); err != nil {
		tx.Rollback(ctx)
		return nil, fmt.Errorf("beginning import of %s: %w", fileName, err)
	}
	// The batch row exists from the start so that merged rows can refer to it; Commit fills
	// in the digest and the counts. A placeholder digest satisfies the column's check.
	err = tx.QueryRow(ctx, `INSERT INTO import_batches (kind, file_name, sha256, rows, inserted, updated, unchanged, started_at)
		VALUES ($1, $2, repeat('0', 64), 0, 0, 0, 0, now()) RETURNING id, started_at`, string(kind), fileName).Scan(&im.id, &im.started)
	if err != nil {
		tx.Rollback(ctx)
		return nil, fmt.Errorf("recording import of %s: %w", fileName, err)
	}
	return im, nil
}

// ID is the import_batches id of this import.
func (im *Import) ID() int64 { return im.id }

// Commit records the file's digest and the counts and commits the import.
func (im *Import) Commit(ctx context.Context, sha256 string, c Counts) error {
	if im.done {
		return errors.New("import already finished")
	}
	im.done = true
	_, err := im.tx.Exec(ctx, `UPDATE import_batches SET sha256 = $2, rows = $3, inserted = $4, updated = $5, unchanged = $6,
		finished_at = clock_timestamp() WHERE id = $1`, im.id, sha256, c.Rows, c.Inserted, c.Updated, c.Unchanged)
	if err != nil {
		im.tx.Rollback(ctx)
		return fmt.Errorf("recording import %d: %w", im.id, err)
	}
	if err := im.tx.Commit(ctx); err != nil {
		return fmt.Errorf("committing import %d: %w", im.id, err)
	}
	return nil
}

// Rollback abandons the import; nothing it staged or merged is kept. It does nothing after
// Commit, so it may be deferred.
func (im *Import) Rollback(ctx context.Context) {
	if im.done {
		return
	}
	im.done = true
	im.tx.Rollback(ctx)
}

// Batches lists the most recent imports, newest first.
func (db *DB) Batches(ctx context.Context, limit int) ([]Batch, error) {
	rows, err := db.Pool.Query(ctx, `SELECT id, kind, file_name, sha256, rows, inserted, updated, unchanged, started_at, finished_at
		FROM import_batches ORDER BY id DESC LIMIT $1`, limit)
	if err != nil {
		return nil, fmt.Errorf("listing imports: %w", err)
	}
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (Batch, error) {
		var b Batch
		var kind string
		err := r.Scan(&b.ID, &kind, &b.FileName, &b.SHA256, &b.Counts.Rows, &b.Counts.Inserted, &b.Counts.Updated,
			&b.Counts.Unchanged, &b.StartedAt, &b.FinishedAt)
		b.Kind = Kind(kind)
		return b, err
	})
}
