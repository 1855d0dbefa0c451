package sql

import (
	"embed"
	"io/fs"
)

//go:embed migrations/*.sql
var migrations embed.FS

// Migrations returns the migration files, NNN_name.sql at the root of the file system.
func Migrations() fs.FS {
	sub, err := fs.Sub(migrations, "migrations")
	if err != nil {
		// fs.Sub fails only on an invalid path, and "migrations" is a constant.
		panic(err)
	}
	return sub
}
