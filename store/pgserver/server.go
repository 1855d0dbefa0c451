package pgserver

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
)

// Names the embedded server is set up with.
const (
	// Port is the port number of the socket (the file is .s.PGSQL.<Port>) unless a TCP port
	// is set; with TCP off it is only a name, so it never collides with another server.
	Port = 5432
	// Role is the superuser initdb creates, the one role anybody may log in as (auth.go).
	Role = "trussfleet"
	// Database is the database Start creates for trussfleet's own use.
	Database = "trussfleet"
)

// maxSocketPath leaves margin under the 108 bytes of sun_path for the socket's full path.
const maxSocketPath = 100

// socketNameLen is the length of ".s.PGSQL.NNNNN", the socket file in its directory, for
// the longest port number.
const socketNameLen = len(".s.PGSQL.65535")

// startTimeout bounds how long pg_ctl waits for the server to accept connections.
const startTimeout = 60 * time.Second

// includeLine is appended to postgresql.conf once, after initdb: the per-start settings
// trussfleet writes go in a file of their own and never edit the server's.
const includeLine = "\n# Settings written by trussfleet at each start.\ninclude_if_exists = 'trussfleet.conf'\n"

// Options configure a Server.
type Options struct {
	// DataDir is the server's data directory; required. Created on first start.
	DataDir string
	// BinDir holds initdb, pg_ctl and postgres; empty searches SearchPath, then the Debian
	// locations (see FindBinDir).
	BinDir string
	// SearchPath is a PATH-style list of directories to look for the binaries in.
	SearchPath string
	// TCPPort, when not 0, also listens on localhost at this port, where the role
	// trussfleet logs in with the random password of PasswordFile (scram-sha-256); TCPURL
	// names the file. 0: Unix socket only.
	TCPPort int
	// RunAs names the user to run the server as when the caller is root; empty: "postgres"
	// where it exists, else "nobody".
	RunAs string
	// Ephemeral trades durability for speed (no fsync): for throwaway test servers only.
	Ephemeral bool
	// Logf receives a line for each thing done that the user should know of (a permission
	// changed, a stale file removed, a server initialised). Nil discards them.
	Logf func(format string, args ...any)
}

// Server is one data directory and the server that runs on it.
type Server struct {
	opts    Options
	binDir  string
	dataDir string
	sockDir string
	port    int
	acct    account
}

// Status describes a server's state.
type Status struct {
	DataDir     string
	SocketDir   string
	Initialized bool   // the data directory holds a database cluster
	Version     string // major version of the cluster (PG_VERSION), when initialised
	Running     bool
	PID         int    // of the postmaster, when running
	RunsAs      string // operating-system user of the server
	URL         string // connection string for the trussfleet database
}

// New checks the options and finds the binaries; it starts nothing.
func New(opts Options) (*Server, error) {
	if opts.DataDir == "" {
		return nil, errors.New("pgserver: no data directory given")
	}
	if opts.TCPPort < 0 || opts.TCPPort > 65535 {
		return nil, fmt.Errorf("pgserver: TCP port %d out of range 0 to 65535", opts.TCPPort)
	}
	if opts.Logf == nil {
		opts.Logf = func(string, ...any) {}
	}
	dataDir, err := filepath.Abs(opts.DataDir)
	if err != nil {
		return nil, fmt.Errorf("pgserver: data directory %s: %w", opts.DataDir, err)
	}
	binDir := opts.BinDir
	if binDir == "" {
		if binDir, err = FindBinDir(opts.SearchPath); err != nil {
			return nil, err
		}
	} else if err := CheckBinDir(binDir); err != nil {
		return nil, err
	}
	acct, err := serverAccount(opts.RunAs)
	if err != nil {
		return nil, err
	}
	port := Port
	if opts.TCPPort != 0 {
		// One number names the socket and the TCP port.
		port = opts.TCPPort
	}
	return &Server{opts: opts, binDir: binDir, dataDir: dataDir, sockDir: socketDirFor(dataDir, acct.uid), port: port, acct: acct}, nil
}

// socketDirFor is the data directory itself when the socket's path fits, else a short
// directory under /tmp named after the account and the data directory, so that each data
// directory keeps one socket directory across runs.
func socketDirFor(dataDir string, uid uint32) string {
	if len(dataDir)+1+socketNameLen <= maxSocketPath {
		return dataDir
	}
	sum := sha256.Sum256([]byte(dataDir))
	return fmt.Sprintf("/tmp/trussfleet-%d-%s", uid, hex.EncodeToString(sum[:6]))
}

// DataDir is the absolute data directory.
func (s *Server) DataDir() string { return s.dataDir }

// SocketDir is the directory of the server's Unix socket.
func (s *Server) SocketDir() string { return s.sockDir }

// BinDir is the directory of the server binaries in use.
func (s *Server) BinDir() string { return s.binDir }

// URL is a connection string for the named database on this server, in the URI form that
// both pgx and psql accept.
func (s *Server) URL(database string) string {
	q := url.Values{}
	q.Set("host", s.sockDir)
	q.Set("port", strconv.Itoa(s.port))
	// An empty host part, with the socket directory as the host parameter: the form
	// libpq documents for Unix sockets ("postgresql:///dbname?host=/path").
	return "postgres://" + url.PathEscape(Role) + "@/" + url.PathEscape(database) + "?" + q.Encode()
}

// Start initialises the data directory if needed, starts the server unless it runs, and
// makes sure the trussfleet database exists. It is safe to call from several processes at
// once.
func (s *Server) Start(ctx context.Context) error {
	unlock, err := s.lock()
	if err != nil {
		return err
	}
	defer unlock()
	if pid := s.runningPID(); pid > 0 {
		return s.setUp(ctx)
	}
	if err := s.prepare(ctx); err != nil {
		return err
	}
	logFile := filepath.Join(s.dataDir, "server.log")
	err = s.acct.run(ctx, s.tool("pg_ctl"), "start", "-D", s.dataDir, "-w", "-s",
		"-t", strconv.Itoa(int(startTimeout/time.Second)), "-l", logFile)
	if err != nil {
		return fmt.Errorf("starting PostgreSQL in %s: %w%s", s.dataDir, err, tailOf(logFile))
	}
	s.opts.Logf("pgserver: started PostgreSQL (%s) in %s as user %s, socket in %s", s.binDir, s.dataDir, s.acct.name, s.sockDir)
	return s.setUp(ctx)
}

// Stop shuts the server down (fast mode: sessions are disconnected, work in progress
// rolled back). Stopping a server that does not run is not an error.
func (s *Server) Stop(ctx context.Context) error {
	if s.runningPID() == 0 {
		return nil
	}
	if err := s.acct.run(ctx, s.tool("pg_ctl"), "stop", "-D", s.dataDir, "-m", "fast", "-w", "-s"); err != nil {
		return fmt.Errorf("stopping PostgreSQL in %s: %w", s.dataDir, err)
	}
	return nil
}

// Status reports the server's state without changing it.
func (s *Server) Status() Status {
	st := Status{DataDir: s.dataDir, SocketDir: s.sockDir, RunsAs: s.acct.name, URL: s.URL(Database)}
	if v, err := os.ReadFile(filepath.Join(s.dataDir, "PG_VERSION")); err == nil {
		st.Initialized, st.Version = true, strings.TrimSpace(string(v))
	}
	st.PID = s.runningPID()
	st.Running = st.PID > 0
	return st
}

func (s *Server) tool(name string) string { return filepath.Join(s.binDir, name) }

// lock takes an exclusive lock on <data dir>.lock, waiting for another starter to finish.
func (s *Server) lock() (func(), error) {
	parent := filepath.Dir(s.dataDir)
	if err := os.MkdirAll(parent, 0o700); err != nil {
		return nil, fmt.Errorf("creating %s: %w", parent, err)
	}
	path := s.dataDir + ".lock"
	f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE, 0o600)
	if err != nil {
		return nil, fmt.Errorf("opening lock file %s: %w", path, err)
	}
	if err := syscall.Flock(int(f.Fd()), syscall.LOCK_EX); err != nil {
		f.Close()
		return nil, fmt.Errorf("locking %s: %w", path, err)
	}
	// Closing the file releases the lock.
	return func() { f.Close() }, nil
}

// prepare readies directories, the cluster and the settings file for a start, and clears
// lock files a crashed server left behind.
func (s *Server) prepare(ctx context.Context) error {
	if err := s.acct.grantSearch(s.dataDir, s.opts.Logf); err != nil {
		return err
	}
	if err := s.initCluster(ctx); err != nil {
		return err
	}
	if s.sockDir != s.dataDir {
		if err := s.makeSocketDir(); err != nil {
			return err
		}
	}
	if err := s.writeAuthFiles(); err != nil {
		return err
	}
	if err := s.writeSettings(); err != nil {
		return err
	}
	s.removeStale(filepath.Join(s.dataDir, "postmaster.pid"))
	s.removeStale(filepath.Join(s.sockDir, fmt.Sprintf(".s.PGSQL.%d.lock", s.port)))
	return nil
}

// initCluster runs initdb unless the data directory already holds a cluster of the
// binaries' major version.
func (s *Server) initCluster(ctx context.Context) error {
	if v, err := os.ReadFile(filepath.Join(s.dataDir, "PG_VERSION")); err == nil {
		want := majorOf(s.binDir)
		if got, _ := strconv.Atoi(strings.TrimSpace(string(v))); want != 0 && got != want {
			return fmt.Errorf("data directory %s holds a PostgreSQL %d cluster but the binaries in %s are version %d: "+
				"upgrade it with pg_upgrade or choose another data directory (--data-dir)", s.dataDir, got, s.binDir, want)
		}
		return s.checkOwner()
	}
	entries, err := os.ReadDir(s.dataDir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		if err := os.Mkdir(s.dataDir, 0o700); err != nil {
			return fmt.Errorf("creating data directory %s: %w", s.dataDir, err)
		}
	case err != nil:
		return fmt.Errorf("reading data directory %s: %w", s.dataDir, err)
	case len(entries) > 0:
		return fmt.Errorf("data directory %s is not empty and holds no PostgreSQL cluster (no PG_VERSION): "+
			"remove it or choose another data directory (--data-dir)", s.dataDir)
	}
	if err := os.Chmod(s.dataDir, 0o700); err != nil {
		return err
	}
	if err := s.acct.own(s.dataDir); err != nil {
		return err
	}
	// The cluster's own pg_hba.conf refuses everybody: trussfleet.conf replaces it with
	// the files of auth.go, and a server started without them lets nobody in.
	args := []string{"-D", s.dataDir, "-U", Role, "--auth=reject", "--encoding=UTF8", "--locale=C"}
	if s.opts.Ephemeral {
		args = append(args, "--no-sync")
	}
	if err := s.acct.run(ctx, s.tool("initdb"), args...); err != nil {
		// Leave no half-made cluster to trip the next start.
		if rmErr := os.RemoveAll(s.dataDir); rmErr != nil {
			err = errors.Join(err, rmErr)
		}
		return fmt.Errorf("initialising data directory: %w", err)
	}
	conf := filepath.Join(s.dataDir, "postgresql.conf")
	f, err := os.OpenFile(conf, os.O_APPEND|os.O_WRONLY, 0)
	if err != nil {
		return fmt.Errorf("opening %s: %w", conf, err)
	}
	_, err = f.WriteString(includeLine)
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", conf, err)
	}
	s.opts.Logf("pgserver: initialised a PostgreSQL cluster in %s (user %s)", s.dataDir, s.acct.name)
	return nil
}

// checkOwner refuses a data directory the server's account does not own: the server would
// not start, with a less helpful message.
func (s *Server) checkOwner() error {
	fi, err := os.Stat(s.dataDir)
	if err != nil {
		return err
	}
	if st, ok := fi.Sys().(*syscall.Stat_t); ok && st.Uid != s.acct.uid {
		return fmt.Errorf("data directory %s belongs to uid %d but the server runs as user %s (uid %d): "+
			"give it to that user (chown -R) or choose another data directory", s.dataDir, st.Uid, s.acct.name, s.acct.uid)
	}
	return nil
}

// makeSocketDir creates the short socket directory, or checks that an existing one is a
// real directory of the server's account closed to others, so nobody can plant a socket.
func (s *Server) makeSocketDir() error {
	err := os.Mkdir(s.sockDir, 0o700)
	if err == nil {
		return s.acct.own(s.sockDir)
	}
	if !errors.Is(err, os.ErrExist) {
		return fmt.Errorf("creating socket directory %s: %w", s.sockDir, err)
	}
	fi, err := os.Lstat(s.sockDir)
	if err != nil {
		return err
	}
	st, ok := fi.Sys().(*syscall.Stat_t)
	if !fi.IsDir() || !ok || st.Uid != s.acct.uid || fi.Mode().Perm()&0o077 != 0 {
		return fmt.Errorf("socket directory %s exists but is not a directory of user %s closed to others: remove it", s.sockDir, s.acct.name)
	}
	return nil
}

// writeSettings writes trussfleet.conf, read through the include line at every start.
func (s *Server) writeSettings() error {
	listen := "''"
	if s.opts.TCPPort != 0 {
		listen = "'localhost'"
	}
	var b strings.Builder
	fmt.Fprintf(&b, "port = %d\n", s.port)
	fmt.Fprintf(&b, "listen_addresses = %s\n", listen)
	fmt.Fprintf(&b, "unix_socket_directories = %s\n", confQuote(s.sockDir))
	b.WriteString("unix_socket_permissions = 0700\n")
	b.WriteString(s.authSettings())
	if s.opts.Ephemeral {
		b.WriteString("fsync = off\nsynchronous_commit = off\nfull_page_writes = off\nshared_buffers = 32MB\n")
	} else {
		b.WriteString(privateServerSettings)
	}
	path := filepath.Join(s.dataDir, "trussfleet.conf")
	if err := os.WriteFile(path, []byte(b.String()), 0o600); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return s.acct.own(path)
}

// privateServerSettings tune the embedded server, which serves one user's screening runs and
// nothing else (never a server given by URL: its owner sets it up). A fleet run commits one
// transaction per job and writes about 110 MB of WAL per 1,000 bridges (BENCHMARKS.md,
// "Fleet run").
//
//   - synchronous_commit = off: a commit returns before its WAL reaches the disk. A crash of
//     the server or the machine (not of trussfleet) can lose the last moments of commits,
//     never corrupt the database (fsync stays on). That is acceptable only for what can be
//     lost: River's own bookkeeping (a job fetched, retried or completed again) and progress
//     marks. Every transaction that writes results, completes a job with them, queues jobs
//     or imports a file asks for a durable commit itself (store.Durable: SET LOCAL
//     synchronous_commit = on), on this server and on any other, because River's completer
//     would otherwise complete again, on the recovered server, a job whose results the crash
//     lost (TestDatabaseCrash kills the server mid-run with pg_ctl's immediate mode).
//   - max_wal_size = 4GB: with the default 1 GB a 10,000-bridge run forced a checkpoint
//     every 25 s, each rewriting the pages it touched again in full into the WAL.
const privateServerSettings = "synchronous_commit = off\nmax_wal_size = 4GB\n"

// confQuote quotes a value for postgresql.conf.
func confQuote(v string) string { return "'" + strings.ReplaceAll(v, "'", "''") + "'" }

// runningPID is the postmaster's process id when a postgres serving this data directory
// runs, else 0.
func (s *Server) runningPID() int {
	pid := pidFromFile(filepath.Join(s.dataDir, "postmaster.pid"))
	if pid > 0 && isPostgresFor(pid, s.dataDir) {
		return pid
	}
	return 0
}

// removeStale deletes a PostgreSQL lock file whose process is gone or is not ours.
func (s *Server) removeStale(path string) {
	pid := pidFromFile(path)
	if pid == 0 || isPostgresFor(pid, s.dataDir) {
		return
	}
	if err := os.Remove(path); err == nil {
		s.opts.Logf("pgserver: removed stale %s (process %d is not this server)", path, pid)
	}
}

// pidFromFile reads the process id on the first line of a PostgreSQL lock file; 0 if none.
func pidFromFile(path string) int {
	b, err := os.ReadFile(path)
	if err != nil {
		return 0
	}
	line, _, _ := strings.Cut(string(b), "\n")
	pid, err := strconv.Atoi(strings.TrimSpace(line))
	if err != nil || pid <= 0 {
		return 0
	}
	return pid
}

// isPostgresFor reports whether process pid is a postgres started on dataDir: pg_ctl and
// RunChild both pass -D with the absolute path, so it shows in the command line.
func isPostgresFor(pid int, dataDir string) bool {
	cmdline, err := os.ReadFile(fmt.Sprintf("/proc/%d/cmdline", pid))
	if err != nil {
		return false
	}
	args := strings.Split(strings.TrimRight(string(cmdline), "\x00"), "\x00")
	if len(args) == 0 || filepath.Base(args[0]) != "postgres" {
		return false
	}
	for i, a := range args {
		if a == "-D" && i+1 < len(args) && filepath.Clean(args[i+1]) == dataDir {
			return true
		}
	}
	return false
}

// setUp readies a running server for use: it warns when the server still runs without
// trussfleet's authentication files, creates the trussfleet database unless it exists, and
// sets the password of the TCP listener.
func (s *Server) setUp(ctx context.Context) error {
	conn, err := pgx.Connect(ctx, s.URL("postgres"))
	var pgErr *pgconn.PgError
	if errors.As(err, &pgErr) && pgErr.Code == "28000" { // invalid_authorization_specification
		return fmt.Errorf("the embedded server in %s lets in only the user who started it, not this one: "+
			"run trussfleet as that user, or choose another data directory (--data-dir): %w", s.dataDir, err)
	}
	if err != nil {
		return fmt.Errorf("connecting to the embedded server in %s: %w", s.dataDir, err)
	}
	defer conn.Close(ctx)
	s.checkAuth(ctx, conn)
	if err := s.ensureDatabase(ctx, conn); err != nil {
		return err
	}
	if s.opts.TCPPort != 0 {
		return s.setTCPPassword(ctx, conn)
	}
	return nil
}

// ensureDatabase creates the trussfleet database unless it exists.
func (s *Server) ensureDatabase(ctx context.Context, conn *pgx.Conn) error {
	var exists bool
	if err := conn.QueryRow(ctx, "SELECT EXISTS (SELECT 1 FROM pg_database WHERE datname = $1)", Database).Scan(&exists); err != nil {
		return fmt.Errorf("embedded server in %s: %w", s.dataDir, err)
	}
	if exists {
		return nil
	}
	if _, err := conn.Exec(ctx, "CREATE DATABASE "+pgx.Identifier{Database}.Sanitize()); err != nil {
		return fmt.Errorf("creating database %s: %w", Database, err)
	}
	return nil
}

// tailOf returns the last lines of a log file, for an error message.
func tailOf(path string) string {
	b, err := os.ReadFile(path)
	if err != nil || len(b) == 0 {
		return ""
	}
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if len(lines) > 8 {
		lines = lines[len(lines)-8:]
	}
	return "\nserver log " + path + ":\n" + strings.Join(lines, "\n")
}
