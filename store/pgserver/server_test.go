package pgserver

import (
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"
)

// Helper processes: the test binary re-runs itself with one of these set to act as a second
// trussfleet process.
const (
	helperStartEnv = "TRUSSFLEET_PGSERVER_HELPER_START" // data dir: Start, print "ok"
	helperChildEnv = "TRUSSFLEET_PGSERVER_HELPER_CHILD" // data dir: RunChild, print pid, wait
)

func TestMain(m *testing.M) {
	if dir := os.Getenv(helperStartEnv); dir != "" {
		s, err := New(Options{DataDir: dir, SearchPath: os.Getenv("PATH"), Ephemeral: true})
		if err == nil {
			err = s.Start(context.Background())
		}
		if err != nil {
			fmt.Println("error:", err)
			os.Exit(1)
		}
		fmt.Println("ok")
		os.Exit(0)
	}
	if dir := os.Getenv(helperChildEnv); dir != "" {
		s, err := New(Options{DataDir: dir, SearchPath: os.Getenv("PATH"), Ephemeral: true})
		var c *Child
		if err == nil {
			c, err = s.RunChild(context.Background())
		}
		if err != nil {
			fmt.Println("error:", err)
			os.Exit(1)
		}
		fmt.Println(c.PID())
		time.Sleep(time.Hour) // until the test kills this process
	}
	os.Exit(m.Run())
}

// newServer makes a Server on a fresh data directory, or fails (CI) or skips when there are
// no PostgreSQL binaries. A server still running at the end is stopped.
func newServer(t *testing.T, dataDir string, logf func(string, ...any)) *Server {
	t.Helper()
	return newServerWith(t, Options{DataDir: dataDir, Logf: logf})
}

// newServerWith is newServer with more options; the search path and Ephemeral are set.
func newServerWith(t *testing.T, opts Options) *Server {
	t.Helper()
	opts.SearchPath, opts.Ephemeral = os.Getenv("PATH"), true
	s, err := New(opts)
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI needs a PostgreSQL server: %v", err)
		}
		t.Skipf("no PostgreSQL server binaries: %v", err)
	}
	t.Cleanup(func() {
		_ = s.Stop(context.Background())
		if s.SocketDir() != s.DataDir() {
			os.RemoveAll(s.SocketDir())
		}
	})
	return s
}

// longDir returns a data directory path whose socket would not fit in sun_path, under a
// 0700 test directory: both things the server must cope with.
func longDir(t *testing.T) string {
	dir := filepath.Join(t.TempDir(), strings.Repeat("d", 60), strings.Repeat("e", 40), "pg")
	if len(dir) <= maxSocketPath {
		t.Fatalf("test path %s is not long enough", dir)
	}
	return dir
}

func TestLifecycle(t *testing.T) {
	ctx := context.Background()
	var mu sync.Mutex
	var logs []string
	logf := func(f string, a ...any) { mu.Lock(); logs = append(logs, fmt.Sprintf(f, a...)); mu.Unlock() }
	dataDir := longDir(t)
	s := newServer(t, dataDir, logf)

	if st := s.Status(); st.Running || st.Initialized {
		t.Fatalf("before start: %+v", st)
	}
	if err := s.Start(ctx); err != nil {
		t.Fatal(err)
	}
	st := s.Status()
	if !st.Running || !st.Initialized || st.PID == 0 {
		t.Fatalf("after start: %+v", st)
	}
	if len(s.SocketDir()) > 40 || s.SocketDir() == s.DataDir() {
		t.Errorf("socket directory %s: want a short one apart from the long data directory", s.SocketDir())
	}

	fi, err := os.Stat(dataDir)
	if err != nil {
		t.Fatal(err)
	}
	if fi.Mode().Perm() != 0o700 {
		t.Errorf("data directory mode %04o, want 0700", fi.Mode().Perm())
	}
	if os.Geteuid() == 0 {
		if uid := fi.Sys().(*syscall.Stat_t).Uid; uid == 0 {
			t.Errorf("running as root, the data directory must belong to the server's user, not root")
		}
	}

	t.Run("psql accepts the URL", func(t *testing.T) {
		// psql is an independent client: the URL must not be pgx-only syntax.
		out, err := exec.Command(filepath.Join(s.BinDir(), "psql"), "-X", "-A", "-t", "-c", "SELECT current_database()", s.URL(Database)).CombinedOutput()
		if err != nil {
			t.Fatalf("psql: %v: %s", err, out)
		}
		if got := strings.TrimSpace(string(out)); got != Database {
			t.Errorf("psql says database %q, want %q", got, Database)
		}
	})

	t.Run("no TCP unless asked", func(t *testing.T) {
		conn, err := pgx.Connect(ctx, s.URL(Database))
		if err != nil {
			t.Fatal(err)
		}
		defer conn.Close(ctx)
		var listen string
		if err := conn.QueryRow(ctx, "SHOW listen_addresses").Scan(&listen); err != nil {
			t.Fatal(err)
		}
		if listen != "" {
			t.Errorf("listen_addresses = %q, want empty", listen)
		}
	})

	t.Run("second start reuses the running server", func(t *testing.T) {
		s2 := newServer(t, dataDir, nil)
		if err := s2.Start(ctx); err != nil {
			t.Fatal(err)
		}
		if got := s2.Status().PID; got != st.PID {
			t.Errorf("pid %d after second start, want the same server %d", got, st.PID)
		}
	})

	t.Run("stale postmaster.pid after a crash", func(t *testing.T) {
		if err := s.Stop(ctx); err != nil {
			t.Fatal(err)
		}
		if s.Status().Running {
			t.Fatal("still running after Stop")
		}
		// A crash leaves the file; after a reboot its pid belongs to some other process,
		// here this test binary.
		pidFile := filepath.Join(dataDir, "postmaster.pid")
		stale := fmt.Sprintf("%d\n%s\n0\n%d\n", os.Getpid(), dataDir, Port)
		if err := os.WriteFile(pidFile, []byte(stale), 0o600); err != nil {
			t.Fatal(err)
		}
		if err := s.acct.own(pidFile); err != nil {
			t.Fatal(err)
		}
		if err := s.Start(ctx); err != nil {
			t.Fatalf("start over a stale postmaster.pid: %v", err)
		}
		if !s.Status().Running {
			t.Fatal("not running")
		}
		mu.Lock()
		defer mu.Unlock()
		if !strings.Contains(strings.Join(logs, "\n"), "removed stale") {
			t.Errorf("no log line about the stale file; logs:\n%s", strings.Join(logs, "\n"))
		}
	})

	if os.Geteuid() == 0 {
		t.Run("root: parents made searchable and said so", func(t *testing.T) {
			mu.Lock()
			defer mu.Unlock()
			if !strings.Contains(strings.Join(logs, "\n"), "search permission") {
				t.Errorf("t.TempDir is 0700; expected a log line granting search permission; logs:\n%s", strings.Join(logs, "\n"))
			}
		})
	}
}

func TestConcurrentStart(t *testing.T) {
	dataDir := filepath.Join(t.TempDir(), "pg")
	newServer(t, dataDir, nil) // for the skip/fail decision and the final Stop
	// Two separate processes, as two trussfleet commands started together would be.
	var wg sync.WaitGroup
	outs := make([]string, 2)
	errs := make([]error, 2)
	for i := range outs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			cmd := exec.Command(os.Args[0], "-test.run=^$")
			cmd.Env = append(os.Environ(), helperStartEnv+"="+dataDir)
			out, err := cmd.CombinedOutput()
			outs[i], errs[i] = string(out), err
		}()
	}
	wg.Wait()
	for i := range outs {
		if errs[i] != nil || !strings.Contains(outs[i], "ok") {
			t.Errorf("process %d: %v: %s", i, errs[i], outs[i])
		}
	}
}

func TestRunChildDiesWithParent(t *testing.T) {
	dataDir := filepath.Join(t.TempDir(), "pg")
	newServer(t, dataDir, nil)
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(os.Environ(), helperChildEnv+"="+dataDir)
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	buf := make([]byte, 4096)
	n, _ := stdout.Read(buf)
	pid, err := strconv.Atoi(strings.TrimSpace(string(buf[:n])))
	if err != nil {
		cmd.Process.Kill()
		cmd.Wait()
		t.Fatalf("helper did not report a server pid: %q", buf[:n])
	}
	if !isPostgresFor(pid, dataDir) {
		t.Fatalf("pid %d is not a postgres on %s", pid, dataDir)
	}
	// SIGKILL: the helper gets no chance to clean up; the kernel must take the server down.
	cmd.Process.Kill()
	cmd.Wait()
	deadline := time.Now().Add(30 * time.Second)
	for isPostgresFor(pid, dataDir) {
		if time.Now().After(deadline) {
			syscall.Kill(pid, syscall.SIGKILL)
			t.Fatalf("postgres %d outlived its killed parent by 30 s", pid)
		}
		time.Sleep(50 * time.Millisecond)
	}
}

func TestRunChildStop(t *testing.T) {
	ctx := context.Background()
	s := newServer(t, filepath.Join(t.TempDir(), "pg"), nil)
	c, err := s.RunChild(ctx)
	if err != nil {
		t.Fatal(err)
	}
	conn, err := pgx.Connect(ctx, s.URL(Database))
	if err != nil {
		c.Stop()
		t.Fatal(err)
	}
	var one int
	err = conn.QueryRow(ctx, "SELECT 1").Scan(&one)
	conn.Close(ctx)
	if err != nil || one != 1 {
		t.Errorf("SELECT 1 gave %d, %v", one, err)
	}
	if err := c.Stop(); err != nil {
		t.Errorf("stop: %v", err)
	}
	if s.Status().Running {
		t.Error("still running after Stop")
	}
}

func TestFindBinDir(t *testing.T) {
	fake := t.TempDir()
	for _, tool := range serverTools {
		if err := os.WriteFile(filepath.Join(fake, tool), []byte("#!/bin/sh\n"), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	linkDir := t.TempDir()
	if err := os.Symlink(filepath.Join(fake, "pg_ctl"), filepath.Join(linkDir, "pg_ctl")); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		path string
		want string
	}{
		{"directory on PATH", fake, fake},
		{"link on PATH leads to the real directory", linkDir, fake},
		{"first match wins", strings.Join([]string{t.TempDir(), fake, linkDir}, string(os.PathListSeparator)), fake},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := FindBinDir(tc.path)
			if err != nil || got != tc.want {
				t.Errorf("FindBinDir(%q) = %q, %v; want %q", tc.path, got, err, tc.want)
			}
		})
	}
	t.Run("none anywhere says how to install", func(t *testing.T) {
		if m, _ := filepath.Glob(debianBinGlob); len(m) > 0 {
			t.Skip("this machine has Debian server binaries, which FindBinDir rightly finds")
		}
		_, err := FindBinDir(t.TempDir())
		if err == nil || !strings.Contains(err.Error(), "apt-get install postgresql") || !strings.Contains(err.Error(), "--database-url") {
			t.Errorf("error %v: want install and --database-url hints", err)
		}
	})
	t.Run("explicit directory without the tools", func(t *testing.T) {
		err := CheckBinDir(t.TempDir())
		if err == nil || !strings.Contains(err.Error(), "apt-get install postgresql") {
			t.Errorf("error %v: want the install hint", err)
		}
	})
}

func TestSocketDirFor(t *testing.T) {
	tests := []struct {
		name    string
		dataDir string
		short   bool
	}{
		{"short path keeps the socket in the data directory", "/var/tmp/tf/pg", false},
		{"long path moves it to /tmp", "/" + strings.Repeat("x", 95), true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := socketDirFor(tc.dataDir, 104)
			if tc.short == (got == tc.dataDir) {
				t.Errorf("socketDirFor(%q) = %q", tc.dataDir, got)
			}
			// sun_path holds 108 bytes with the terminating NUL (Linux unix(7)).
			if n := len(got) + 1 + socketNameLen; n >= 108 {
				t.Errorf("socket path of %d bytes does not fit sun_path", n)
			}
		})
	}
	if socketDirFor("/a/very/long/"+strings.Repeat("y", 100), 1) == socketDirFor("/a/very/long/"+strings.Repeat("z", 100), 1) {
		t.Error("two data directories share one socket directory")
	}
}
