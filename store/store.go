package store

import (
	"context"
	"errors"
	"fmt"
	"net"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgxpool"
	"github.com/trussfleet/trussfleet/store/pgserver"
)

// Options say which PostgreSQL to use.
type Options struct {
	// URL of an existing server. Empty: start (or reuse) the embedded server.
	URL string
	// DataDir of the embedded server; required when URL is empty.
	DataDir string
	// BinDir holds the PostgreSQL server binaries; empty searches SearchPath and then
	// /usr/lib/postgresql/*/bin.
	BinDir string
	// SearchPath is a PATH-style list of directories to search for the binaries.
	SearchPath string
	// TCPPort makes the embedded server also listen on localhost at this port; 0: socket only.
	TCPPort int
	// Logf receives what the embedded server did that a user should know of; nil discards.
	Logf func(format string, args ...any)
	// MaxConns bounds the pool; 0 takes pgx's default.
	MaxConns int32
}

// DB is an open connection pool to trussfleet's database.
type DB struct {
	// Pool is the pgx pool, for packages that add their own tables through sql/.
	Pool *pgxpool.Pool
	// URL the pool was opened with.
	URL string
	// Server is the embedded server started or reused, nil when a URL was given.
	Server *pgserver.Server
}

// Embedded returns the embedded server the options describe, without starting it.
func Embedded(opts Options) (*pgserver.Server, error) {
	if opts.DataDir == "" {
		return nil, errors.New("no database URL and no data directory for the embedded server")
	}
	return pgserver.New(pgserver.Options{
		DataDir:    opts.DataDir,
		BinDir:     opts.BinDir,
		SearchPath: opts.SearchPath,
		TCPPort:    opts.TCPPort,
		Logf:       opts.Logf,
	})
}

// sendBuffer is the socket send buffer asked for on each connection: enough for a job's
// result rows (about 1.7 MB for 50 bridges) to be written whole. With the usual 208 kB the
// write of a COPY blocks every few 64 kB messages, and while the screening goroutines keep
// both processors busy, Go notices that the socket can take more only at its next network
// poll, up to 10 ms later: the server sat waiting for the rows for about half of each COPY
// (BENCHMARKS.md, "Fleet run").
const sendBuffer = 4 << 20

// Open connects to the configured server, starting the embedded one when no URL is given
// and it is not running. It does not migrate; call Migrate.
func Open(ctx context.Context, opts Options) (*DB, error) {
	db := &DB{URL: opts.URL}
	if db.URL == "" {
		srv, err := Embedded(opts)
		if err != nil {
			return nil, err
		}
		if err := srv.Start(ctx); err != nil {
			return nil, err
		}
		db.Server, db.URL = srv, srv.URL(pgserver.Database)
	}
	// Every error below may quote the URL, and the URL may hold a password.
	cfg, err := pgxpool.ParseConfig(db.URL)
	if err != nil {
		return nil, RedactError(fmt.Errorf("database URL: %w", err), db.URL)
	}
	if opts.MaxConns > 0 {
		cfg.MaxConns = opts.MaxConns
	}
	dial := cfg.ConnConfig.DialFunc
	cfg.ConnConfig.DialFunc = func(ctx context.Context, network, addr string) (net.Conn, error) {
		c, err := dial(ctx, network, addr)
		if wb, ok := c.(interface{ SetWriteBuffer(int) error }); ok && err == nil {
			_ = wb.SetWriteBuffer(sendBuffer) // the kernel may cap it (net.core.wmem_max)
		}
		return c, err
	}
	pool, err := pgxpool.NewWithConfig(ctx, cfg)
	if err != nil {
		return nil, RedactError(fmt.Errorf("opening database: %w", err), db.URL)
	}
	if err := pool.Ping(ctx); err != nil {
		pool.Close()
		return nil, RedactError(fmt.Errorf("connecting to database %s on %s: %w", cfg.ConnConfig.Database, cfg.ConnConfig.Host, err), db.URL)
	}
	db.Pool = pool
	return db, nil
}

// Close closes the pool. The embedded server keeps running for the next command; stop it
// with its Stop method (trussfleet db stop).
func (db *DB) Close() {
	db.Pool.Close()
}

// Durable makes the transaction's commit wait until its WAL is on disk, whatever the
// server's synchronous_commit. A job's results and its completion are one transaction; were
// that commit acknowledged and then lost in a crash of the server, River would complete the
// job again on the recovered server (its completer retries) and the bridges would stay
// pending with no job. Every transaction that ends a bridge, queues work, imports a file or
// deletes a run is durable.
func Durable(ctx context.Context, tx pgx.Tx) error {
	_, err := tx.Exec(ctx, "SET LOCAL synchronous_commit = on")
	return err
}
