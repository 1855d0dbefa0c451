package store

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
)

// Table trains: sql/migrations/001_inventory.sql.

// Train is a stored train file: the name a screening run refers to it by and the file's
// text, which the traffic package parses.
type Train struct {
	Name       string
	FileName   string
	Source     string
	SHA256     string
	ImportedAt time.Time // set by the database; ignored when staging
}

var trainsTable = table{
	name:  "trains",
	key:   []string{"name"},
	cols:  []string{"file_name", "source", "sha256"},
	touch: "imported_at",
}

func (t Train) values() []any { return []any{t.Name, t.FileName, t.Source, t.SHA256} }

const trainColumns = "name, file_name, source, sha256, imported_at"

// Trains returns every stored train, ordered by name.
func (db *DB) Trains(ctx context.Context) ([]Train, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+trainColumns+" FROM trains ORDER BY name")
	if err != nil {
		return nil, fmt.Errorf("listing trains: %w", err)
	}
	return pgx.CollectRows(rows, pgx.RowToStructByPos[Train])
}

// Train returns the stored train of that name.
func (db *DB) Train(ctx context.Context, name string) (Train, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+trainColumns+" FROM trains WHERE name = $1", name)
	if err != nil {
		return Train{}, fmt.Errorf("reading train %q: %w", name, err)
	}
	t, err := pgx.CollectExactlyOneRow(rows, pgx.RowToStructByPos[Train])
	if errors.Is(err, pgx.ErrNoRows) {
		return t, fmt.Errorf("train %q: %w", name, ErrNotFound)
	}
	return t, err
}

// FindTrain finds the stored train a configuration or an inventory names: by its name, or
// by its file name with or without the folder and .yaml (or .yml); a train of that very name
// first. It returns ErrNotFound (wrapped) when none matches.
func (db *DB) FindTrain(ctx context.Context, asked string) (Train, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+trainColumns+` FROM trains
		WHERE name = $1 OR file_name = $1 OR regexp_replace(file_name, '^.*/', '') IN ($1, $1 || '.yaml', $1 || '.yml')
		ORDER BY (name = $1) DESC LIMIT 1`, asked)
	if err != nil {
		return Train{}, fmt.Errorf("train %q: %w", asked, err)
	}
	t, err := pgx.CollectExactlyOneRow(rows, pgx.RowToStructByPos[Train])
	switch {
	case errors.Is(err, pgx.ErrNoRows):
		return t, fmt.Errorf("train %q: %w", asked, ErrNotFound)
	case err != nil:
		return t, fmt.Errorf("train %q: %w", asked, err)
	}
	return t, nil
}
