package main

import (
	"context"
	"fmt"
	"log/slog"
	"os"
	"path/filepath"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/store"
)

// defaultDataDir is $XDG_DATA_HOME/trussfleet/pg, or ~/.local/share/trussfleet/pg.
func defaultDataDir() (string, error) {
	if d := os.Getenv("XDG_DATA_HOME"); d != "" {
		return filepath.Join(d, "trussfleet", "pg"), nil
	}
	home, err := os.UserHomeDir()
	if err != nil {
		return "", fmt.Errorf("no data directory for the embedded server: set --data-dir or database.data_dir: %w", err)
	}
	return filepath.Join(home, ".local", "share", "trussfleet", "pg"), nil
}

// storeOptions turns the configuration into the store's options.
func (a *app) storeOptions() (store.Options, error) {
	opt := store.Options{URL: a.cfg.Database.URL, DataDir: a.cfg.Database.DataDir, SearchPath: os.Getenv("PATH"),
		Logf: func(format string, args ...any) { slog.Info(fmt.Sprintf(format, args...)) }}
	if opt.URL == "" && opt.DataDir == "" {
		d, err := defaultDataDir()
		if err != nil {
			return opt, err
		}
		opt.DataDir = d
	}
	return opt, nil
}

// openDatabase connects (starting the embedded server when no URL is configured) and brings
// the schema up to date.
func (a *app) openDatabase(ctx context.Context) (*store.DB, error) {
	opt, err := a.storeOptions()
	if err != nil {
		return nil, err
	}
	db, err := store.Open(ctx, opt)
	if err != nil {
		return nil, err
	}
	a.sayDatabase(opt)
	if _, err := db.Migrate(ctx); err != nil {
		db.Close()
		return nil, err
	}
	return db, nil
}

// sayDatabase tells, once per command on standard error, which database the command opened
// (a URL without its password, or the embedded server's data directory) and from which
// configuration file, so that a command run from another folder cannot use another database
// unnoticed. Standard output stays the command's own.
func (a *app) sayDatabase(opt store.Options) {
	if a.saidDatabase || a.stderr == nil {
		return
	}
	a.saidDatabase = true
	fmt.Fprintln(a.stderr, safetext.TerminalLines(databaseNote(opt, a.cfgUsed)))
}

// databaseNote is sayDatabase's line.
func databaseNote(opt store.Options, cfgFile string) string {
	s := "database: embedded, " + opt.DataDir
	if opt.URL != "" {
		s = "database: " + store.RedactConnString(opt.URL)
	}
	if cfgFile != "" {
		s += " (configuration " + cfgFile + ")"
	}
	return s
}

// withDatabase opens the database for a command, runs f, and closes it.
func (a *app) withDatabase(ctx context.Context, f func(db *store.DB) error) error {
	db, err := a.openDatabase(ctx)
	if err != nil {
		return err
	}
	defer db.Close()
	return f(db)
}

// withRun opens the database and finds the run asked for (0: the latest completed run).
func (a *app) withRun(ctx context.Context, runID int64, f func(db *store.DB, run store.Run) error) error {
	return a.withDatabase(ctx, func(db *store.DB) error {
		run, err := pickRun(ctx, db, runID)
		if err != nil {
			return err
		}
		return f(db, run)
	})
}
