package pgtest

import (
	"context"
	"errors"
	"fmt"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"syscall"
	"testing"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgserver"
)

// EnvURL names an existing server to test against instead of a throwaway one. Its role
// needs the CREATEDB privilege.
const EnvURL = "TRUSSFLEET_TEST_DATABASE_URL"

var (
	mainCalled atomic.Bool

	once     sync.Once
	startErr error
	admin    string // URL of a maintenance database on the server
	template string // name of the migrated template database
	child    *pgserver.Child
	tmpDir   string

	// CREATE DATABASE ... TEMPLATE fails while another copy of the template is in progress.
	createMu sync.Mutex
	seq      atomic.Int64
)

// Main runs the tests and then stops the server and removes its files. Call it from
// TestMain; it does not return.
func Main(m *testing.M) {
	mainCalled.Store(true)
	code := m.Run()
	if err := shutdown(); err != nil {
		fmt.Fprintln(os.Stderr, "pgtest:", err)
		if code == 0 {
			code = 1
		}
	}
	os.Exit(code)
}

// DB returns an open pool to a fresh database with the current schema, closed and dropped
// when the test ends.
func DB(t testing.TB) *store.DB {
	t.Helper()
	u := URL(t)
	db, err := store.Open(context.Background(), store.Options{URL: u})
	if err != nil {
		t.Fatalf("pgtest: %v", err)
	}
	t.Cleanup(db.Close)
	return db
}

// URL creates a fresh database with the current schema and returns its connection string;
// the database is dropped when the test ends (after cleanups registered later, such as a
// pool's Close, have run).
func URL(t testing.TB) string {
	t.Helper()
	if !mainCalled.Load() {
		t.Fatal("pgtest: call pgtest.Main(m) from TestMain, so that the server is stopped after the tests")
	}
	once.Do(func() { startErr = start() })
	if startErr != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("pgtest: CI needs a PostgreSQL server and none could be had: %v", startErr)
		}
		t.Skipf("pgtest: no PostgreSQL server (set %s, or install the server binaries): %v", EnvURL, startErr)
	}
	name := fmt.Sprintf("tf_test_%d_%d", os.Getpid(), seq.Add(1))
	ctx := context.Background()
	createMu.Lock()
	err := exec(ctx, admin, "CREATE DATABASE "+ident(name)+" TEMPLATE "+ident(template))
	createMu.Unlock()
	if err != nil {
		t.Fatalf("pgtest: creating database %s: %v", name, err)
	}
	t.Cleanup(func() {
		if err := exec(ctx, admin, "DROP DATABASE IF EXISTS "+ident(name)+" WITH (FORCE)"); err != nil {
			t.Errorf("pgtest: dropping database %s: %v", name, err)
		}
	})
	return withDatabase(admin, name)
}

// start gets a server and migrates the template database on it.
func start() error {
	ctx := context.Background()
	if u := os.Getenv(EnvURL); u != "" {
		admin = u
	} else {
		sweep()
		// The pid in the name lets a later binary remove what a killed one left behind.
		dir, err := os.MkdirTemp("/tmp", fmt.Sprintf("tfpg-%d-", os.Getpid()))
		if err != nil {
			return err
		}
		tmpDir = dir
		srv, err := pgserver.New(pgserver.Options{DataDir: dir + "/pg", SearchPath: os.Getenv("PATH"), Ephemeral: true})
		if err != nil {
			return err
		}
		if child, err = srv.RunChild(ctx); err != nil {
			return err
		}
		admin = srv.URL("postgres")
	}
	template = fmt.Sprintf("tf_template_%d", os.Getpid())
	if err := exec(ctx, admin, "DROP DATABASE IF EXISTS "+ident(template)); err != nil {
		return err
	}
	if err := exec(ctx, admin, "CREATE DATABASE "+ident(template)); err != nil {
		return fmt.Errorf("creating template database: %w", err)
	}
	db, err := store.Open(ctx, store.Options{URL: withDatabase(admin, template)})
	if err != nil {
		return err
	}
	defer db.Close()
	if _, err := db.Migrate(ctx); err != nil {
		return err
	}
	return nil
}

// shutdown drops the template and stops and removes the throwaway server.
func shutdown() error {
	if admin == "" {
		return nil
	}
	var errs []string
	if child == nil && template != "" {
		// An external server outlives the tests: leave it as it was found.
		if err := exec(context.Background(), admin, "DROP DATABASE IF EXISTS "+ident(template)+" WITH (FORCE)"); err != nil {
			errs = append(errs, err.Error())
		}
	}
	if child != nil {
		if err := child.Stop(); err != nil {
			errs = append(errs, err.Error())
		}
	}
	if tmpDir != "" {
		if err := os.RemoveAll(tmpDir); err != nil {
			errs = append(errs, err.Error())
		}
	}
	if len(errs) > 0 {
		return fmt.Errorf("shutting down the test server: %s", strings.Join(errs, "; "))
	}
	return nil
}

// exec runs one statement on its own connection. Its errors are redacted: the URL of
// TRUSSFLEET_TEST_DATABASE_URL may hold a password, and test logs are often public.
func exec(ctx context.Context, connURL, stmt string) error {
	conn, err := pgx.Connect(ctx, connURL)
	if err != nil {
		return store.RedactError(err, connURL)
	}
	defer conn.Close(ctx)
	_, err = conn.Exec(ctx, stmt)
	return store.RedactError(err, connURL)
}

func ident(name string) string { return pgx.Identifier{name}.Sanitize() }

// withDatabase points a connection string at another database, in either of libpq's forms.
func withDatabase(connString, database string) string {
	if strings.HasPrefix(connString, "postgres://") || strings.HasPrefix(connString, "postgresql://") {
		if u, err := url.Parse(connString); err == nil {
			u.Path = "/" + database
			u.RawPath = ""
			return u.String()
		}
	}
	// Keyword/value form: a later keyword overrides an earlier one.
	return connString + " dbname=" + database
}

// sweep removes the directories of test binaries that died without running Main's clean-up
// (a panic, a timeout, a kill): their server died with them (see pgserver.RunChild), and the
// pid in the directory's name is no longer a process.
func sweep() {
	dirs, _ := filepath.Glob("/tmp/tfpg-*-*")
	for _, d := range dirs {
		pidText, _, _ := strings.Cut(strings.TrimPrefix(filepath.Base(d), "tfpg-"), "-")
		pid, err := strconv.Atoi(pidText)
		if err != nil || pid <= 0 {
			continue
		}
		if err := syscall.Kill(pid, 0); errors.Is(err, syscall.ESRCH) {
			os.RemoveAll(d)
		}
	}
}
