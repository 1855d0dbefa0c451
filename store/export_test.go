package store

import (
	"context"

	"github.com/jackc/tern/v2/migrate"
)

// MigrateTo moves the schema to version v, up or down (the upgrade tests start from an older
// schema).
func (db *DB) MigrateTo(ctx context.Context, v int32) error {
	return db.withMigrator(ctx, func(m *migrate.Migrator) error { return m.MigrateTo(ctx, v) })
}
