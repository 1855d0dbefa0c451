package pgserver

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"net"
	"os"
	"os/exec"
	"os/user"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
)

// psqlAs runs psql as the named operating-system user (the current one when name is
// empty), with a clean environment, to run one query on conn. It returns psql's output
// and its error.
func psqlAs(t *testing.T, s *Server, name, conn string) (stdout, stderr string, err error) {
	t.Helper()
	cmd := exec.Command(filepath.Join(s.BinDir(), "psql"), "-X", "-A", "-t", "-w", "-c", "SELECT current_user", conn)
	// No PG* variable of the test's environment may help or hinder the connection.
	cmd.Env = []string{"PATH=/usr/bin:/bin", "HOME=/nonexistent"}
	cmd.Dir = "/"
	if name != "" {
		u, err := user.Lookup(name)
		if err != nil {
			t.Fatalf("user %s: %v", name, err)
		}
		uid, _ := strconv.ParseUint(u.Uid, 10, 32)
		gid, _ := strconv.ParseUint(u.Gid, 10, 32)
		cmd.SysProcAttr = &syscall.SysProcAttr{Credential: &syscall.Credential{Uid: uint32(uid), Gid: uint32(gid), Groups: []uint32{}}}
	}
	var o, e bytes.Buffer
	cmd.Stdout, cmd.Stderr = &o, &e
	err = cmd.Run()
	return strings.TrimSpace(o.String()), strings.TrimSpace(e.String()), err
}

// needRoot skips a test that must run processes as other users.
func needRoot(t *testing.T) {
	t.Helper()
	if os.Geteuid() != 0 {
		t.Skip("running clients as other users needs root; as another user the server runs as that user, whom it lets in")
	}
}

// TestOnlyTheInvokingUserConnects runs, as root, a server as "postgres" and as "nobody",
// and connects to it with psql running as each of root, the server's account and the
// other account. First the server is started as trussfleet left it before it wrote its own
// authentication files (pg_hba.conf trusting every local connection): the server's account
// gets in, which shows that the test can see an open server. Then trussfleet starts it:
// only root, the user running trussfleet, gets in.
func TestOnlyTheInvokingUserConnects(t *testing.T) {
	needRoot(t)
	ctx := context.Background()
	for _, tc := range []struct{ runAs, other string }{{"postgres", "nobody"}, {"nobody", "postgres"}} {
		t.Run("server runs as "+tc.runAs, func(t *testing.T) {
			if _, err := user.Lookup(tc.runAs); err != nil {
				t.Skipf("no user %s on this machine", tc.runAs)
			}
			var mu sync.Mutex
			var logs []string
			logf := func(f string, a ...any) { mu.Lock(); logs = append(logs, fmt.Sprintf(f, a...)); mu.Unlock() }
			s := newServerWith(t, Options{DataDir: filepath.Join(t.TempDir(), "pg"), RunAs: tc.runAs, Logf: logf})
			if err := s.Start(ctx); err != nil {
				t.Fatal(err)
			}
			if got := s.Status().RunsAs; got != tc.runAs {
				t.Fatalf("server runs as %s, want %s", got, tc.runAs)
			}
			url := s.URL(Database)

			// The old set-up: trust in pg_hba.conf, no hba_file in trussfleet.conf.
			startOld(t, s)
			if out, errText, err := psqlAs(t, s, tc.runAs, url); err != nil || out != Role {
				t.Fatalf("with trust, psql as %s: %v %s; want it let in (otherwise this test proves nothing)", tc.runAs, err, errText)
			}
			// A trussfleet finding that server running says it is open.
			if err := s.Start(ctx); err != nil {
				t.Fatal(err)
			}
			mu.Lock()
			warned := strings.Contains(strings.Join(logs, "\n"), "may let other local users in")
			mu.Unlock()
			if !warned {
				t.Errorf("no warning about the running server's old authentication; logs:\n%s", strings.Join(logs, "\n"))
			}

			// The same cluster, started by trussfleet.
			if err := s.Stop(ctx); err != nil {
				t.Fatal(err)
			}
			if err := s.Start(ctx); err != nil {
				t.Fatal(err)
			}
			if out, errText, err := psqlAs(t, s, "", url); err != nil || out != Role {
				t.Errorf("psql as root (who runs trussfleet): %v %s, logged in as %q; want %s", err, errText, out, Role)
			}
			// The server's own account reaches the socket (its directory is the account's):
			// the server itself must refuse it.
			out, errText, err := psqlAs(t, s, tc.runAs, url)
			if err == nil || out == Role || !strings.Contains(errText, "Peer authentication failed") {
				t.Errorf("psql as %s (the server's account): %v, output %q, stderr %q; want refused by peer authentication", tc.runAs, err, out, errText)
			}
			out, errText, err = psqlAs(t, s, tc.other, url)
			if err == nil || out == Role || !(strings.Contains(errText, "Peer authentication failed") || strings.Contains(errText, "Permission denied")) {
				t.Errorf("psql as %s: %v, output %q, stderr %q; want refused", tc.other, err, out, errText)
			}
			t.Logf("as %s: %s", tc.other, errText)
		})
	}
}

// startOld stops the server and starts it with pg_hba.conf trusting every local connection
// and without trussfleet's authentication settings, as a trussfleet before them did.
func startOld(t *testing.T, s *Server) {
	t.Helper()
	ctx := context.Background()
	if err := s.Stop(ctx); err != nil {
		t.Fatal(err)
	}
	hba := filepath.Join(s.DataDir(), "pg_hba.conf")
	if err := os.WriteFile(hba, []byte("local all all trust\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	conf := filepath.Join(s.DataDir(), "trussfleet.conf")
	b, err := os.ReadFile(conf)
	if err != nil {
		t.Fatal(err)
	}
	var kept []string
	for _, line := range strings.Split(string(b), "\n") {
		if !strings.HasPrefix(line, "hba_file") && !strings.HasPrefix(line, "ident_file") {
			kept = append(kept, line)
		}
	}
	if err := os.WriteFile(conf, []byte(strings.Join(kept, "\n")), 0o600); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{hba, conf} {
		if err := s.acct.own(p); err != nil {
			t.Fatal(err)
		}
	}
	if err := s.acct.run(ctx, s.tool("pg_ctl"), "start", "-D", s.DataDir(), "-w", "-s", "-l", filepath.Join(s.DataDir(), "server.log")); err != nil {
		t.Fatal(err)
	}
}

// freePort is a TCP port on localhost that nothing listens on at the moment.
func freePort(t *testing.T) int {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	return l.Addr().(*net.TCPAddr).Port
}

// TestTCPNeedsThePassword starts a server with a TCP port: TCPURL (the password file)
// gets in, pgx and psql alike; no password or a wrong one does not; the file is the
// invoking user's alone; a restart keeps the password working.
func TestTCPNeedsThePassword(t *testing.T) {
	ctx := context.Background()
	port := freePort(t)
	s := newServerWith(t, Options{DataDir: filepath.Join(t.TempDir(), "pg"), TCPPort: port})
	if err := s.Start(ctx); err != nil {
		t.Fatal(err)
	}
	tcpURL := s.TCPURL(Database)
	if !strings.Contains(tcpURL, "localhost:"+strconv.Itoa(port)) || !strings.Contains(tcpURL, "passfile=") {
		t.Fatalf("TCPURL %q", tcpURL)
	}

	connects := func(t *testing.T, conn string) error {
		t.Helper()
		c, err := pgx.Connect(ctx, conn)
		if err != nil {
			return err
		}
		defer c.Close(ctx)
		var addr *string
		// inet_client_addr is null on a Unix socket: the connection must be TCP.
		if err := c.QueryRow(ctx, "SELECT host(inet_client_addr())").Scan(&addr); err != nil {
			return err
		}
		if addr == nil {
			t.Errorf("%s connected over the Unix socket, not TCP", conn)
		}
		return nil
	}
	if err := connects(t, tcpURL); err != nil {
		t.Fatalf("pgx with the password file: %v", err)
	}
	if out, errText, err := psqlAs(t, s, "", tcpURL); err != nil || out != Role {
		t.Errorf("psql with the password file: %v %s", err, errText)
	}

	base := fmt.Sprintf("postgres://%s@localhost:%d/%s", Role, port, Database)
	for name, conn := range map[string]string{
		"no password":    base + "?passfile=/dev/null",
		"wrong password": base + "?password=" + strings.Repeat("0", 64),
	} {
		err := connects(t, conn)
		var pgErr *pgconn.PgError
		if !errors.As(err, &pgErr) || pgErr.Code != "28P01" {
			t.Errorf("%s: %v; want the server's invalid_password (28P01)", name, err)
		}
	}

	fi, err := os.Stat(s.PasswordFile())
	if err != nil {
		t.Fatal(err)
	}
	if st := fi.Sys().(*syscall.Stat_t); fi.Mode().Perm() != 0o600 || int(st.Uid) != os.Geteuid() {
		t.Errorf("password file mode %04o, uid %d; want 0600 and uid %d", fi.Mode().Perm(), st.Uid, os.Geteuid())
	}
	if os.Geteuid() == 0 {
		// The server's account cannot read the file, so psql running as it has no password.
		acct := s.Status().RunsAs
		if out, errText, err := psqlAs(t, s, acct, tcpURL); err == nil || out == Role {
			t.Errorf("psql as %s over TCP: logged in as %q (%s); want refused", acct, out, errText)
		}
	}

	before, err := os.ReadFile(s.PasswordFile())
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Stop(ctx); err != nil {
		t.Fatal(err)
	}
	if err := s.Start(ctx); err != nil {
		t.Fatal(err)
	}
	after, err := os.ReadFile(s.PasswordFile())
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(before, after) {
		t.Errorf("the password file changed across a restart")
	}
	if err := connects(t, tcpURL); err != nil {
		t.Errorf("after a restart: %v", err)
	}
}
