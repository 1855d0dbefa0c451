package store

import (
	"context"
	"fmt"

	"github.com/jackc/pgx/v5/pgxpool"
	"github.com/jackc/tern/v2/migrate"
	"github.com/trussfleet/trussfleet/sql"
)

// MigrationStep brings one part of the schema up to date. It reports what it applied, one
// line per migration, and must be safe to run concurrently from several processes (take an
// advisory lock) and to run again when there is nothing to do.
type MigrationStep struct {
	Name string
	Run  func(ctx context.Context, pool *pgxpool.Pool) ([]string, error)
}

// MigrationSteps run in order by Migrate. The job queue's own schema, for one, is a further
// step appended here.
var MigrationSteps = []MigrationStep{
	{Name: "trussfleet schema", Run: migrateSchema},
}

// versionTable is tern's record of the schema version.
const versionTable = "public.schema_version"

// Migrate runs every migration step and returns the migrations it applied ("step: 001
// inventory"), none when the schema was already current.
func (db *DB) Migrate(ctx context.Context) ([]string, error) {
	var applied []string
	for _, step := range MigrationSteps {
		done, err := step.Run(ctx, db.Pool)
		if err != nil {
			return applied, fmt.Errorf("migrating %s: %w", step.Name, err)
		}
		for _, d := range done {
			applied = append(applied, step.Name+": "+d)
		}
	}
	return applied, nil
}

// SchemaVersion is the version of the trussfleet schema in the database and the newest one
// this program knows.
func (db *DB) SchemaVersion(ctx context.Context) (current, latest int32, err error) {
	err = db.withMigrator(ctx, func(m *migrate.Migrator) error {
		latest = int32(len(m.Migrations))
		current, err = m.GetCurrentVersion(ctx)
		return err
	})
	return current, latest, err
}

// migrateSchema applies sql/migrations with tern: each migration in its own transaction,
// all of it under tern's advisory lock.
func migrateSchema(ctx context.Context, pool *pgxpool.Pool) ([]string, error) {
	var applied []string
	err := withMigrator(ctx, pool, func(m *migrate.Migrator) error {
		m.OnStart = func(seq int32, name, direction, _ string) {
			applied = append(applied, fmt.Sprintf("%03d %s (%s)", seq, name, direction))
		}
		return m.Migrate(ctx)
	})
	return applied, err
}

func (db *DB) withMigrator(ctx context.Context, f func(*migrate.Migrator) error) error {
	return withMigrator(ctx, db.Pool, f)
}

func withMigrator(ctx context.Context, pool *pgxpool.Pool, f func(*migrate.Migrator) error) error {
	conn, err := pool.Acquire(ctx)
	if err != nil {
		return err
	}
	defer conn.Release()
	m, err := migrate.NewMigrator(ctx, conn.Conn(), versionTable)
	if err != nil {
		return err
	}
	if err := m.LoadMigrations(sql.Migrations()); err != nil {
		return fmt.Errorf("loading embedded migrations: %w", err)
	}
	return f(m)
}
