package store

import (
	"context"
	"fmt"
	"io"
	"log/slog"

	"github.com/jackc/pgx/v5/pgxpool"
	"github.com/riverqueue/river/riverdriver/riverpgxv5"
	"github.com/riverqueue/river/rivermigrate"
)

func init() {
	MigrationSteps = append(MigrationSteps, MigrationStep{Name: "job queue", Run: migrateRiver})
}

// riverMigrationLock is the advisory lock key under which River's schema is migrated, so that
// two processes migrating at once take turns.
const riverMigrationLock = 7_163_000_001

// migrateRiver applies River's own migrations (its job tables) with its migrator, each in a
// transaction of its own (one adds an enum value that a later statement uses), under a
// session advisory lock so that two processes migrating at once take turns.
func migrateRiver(ctx context.Context, pool *pgxpool.Pool) ([]string, error) {
	m, err := rivermigrate.New(riverpgxv5.New(pool), &rivermigrate.Config{Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		return nil, err
	}
	conn, err := pool.Acquire(ctx)
	if err != nil {
		return nil, err
	}
	defer conn.Release()
	if _, err := conn.Exec(ctx, "SELECT pg_advisory_lock($1)", riverMigrationLock); err != nil {
		return nil, err
	}
	defer conn.Exec(context.WithoutCancel(ctx), "SELECT pg_advisory_unlock($1)", riverMigrationLock) //nolint:errcheck // the lock ends with the session anyway
	res, err := m.Migrate(ctx, rivermigrate.DirectionUp, nil)
	if err != nil {
		return nil, err
	}
	var applied []string
	for _, v := range res.Versions {
		applied = append(applied, fmt.Sprintf("river %03d %s (up)", v.Version, v.Name))
	}
	return applied, nil
}
