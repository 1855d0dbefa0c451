package pgserver

import (
	"context"
	"crypto/hmac"
	"crypto/pbkdf2"
	"crypto/rand"
	"crypto/sha256"
	"encoding/base64"
	"encoding/hex"
	"errors"
	"fmt"
	"net/url"
	"os"
	"os/user"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"

	"github.com/jackc/pgx/v5"
)

// Who may connect. The server's own pg_hba.conf and pg_ident.conf are replaced, through
// hba_file and ident_file in trussfleet.conf, by files trussfleet writes at every start:
//
//   - On the Unix socket, peer authentication with the map "trussfleet": the server asks
//     the kernel for the connecting process's user id, and the map lets exactly one
//     operating-system user, the one running trussfleet (this process's effective user),
//     log in, as the role trussfleet. Any other user is refused, the server's own account
//     ("postgres" or "nobody" when trussfleet runs as root) included.
//   - On TCP (only with Options.TCPPort), scram-sha-256 for the role trussfleet from
//     localhost, with a random password that only the user running trussfleet can read
//     (PasswordFile); TCPURL names the file with libpq's passfile parameter.
const (
	hbaFileName   = "trussfleet_hba.conf"
	identFileName = "trussfleet_ident.conf"
	identMap      = "trussfleet"
)

// clientUser is the name of this process's effective user, the only one the server lets
// in. Peer authentication compares names, so a user id without one cannot be let in.
func clientUser() (string, error) {
	uid := strconv.Itoa(os.Geteuid())
	u, err := user.LookupId(uid)
	if err != nil {
		return "", fmt.Errorf("the embedded server lets in only the user running trussfleet, by name, and user id %s has none: %w", uid, err)
	}
	if u.Username == "" || strings.ContainsAny(u.Username, "\" \t\n\r#,") || strings.HasPrefix(u.Username, "/") {
		return "", fmt.Errorf("user name %q cannot be written in the server's ident map", u.Username)
	}
	return u.Username, nil
}

// hbaText is the server's authentication file: peer on the socket, and scram-sha-256 on
// localhost when tcp is set. Connections that match no line are refused.
func hbaText(tcp bool) string {
	var b strings.Builder
	b.WriteString("# Written by trussfleet at every start; edits are lost.\n")
	b.WriteString("# Only the operating-system user running trussfleet may connect (" + identFileName + ").\n")
	b.WriteString("local all all peer map=" + identMap + "\n")
	if tcp {
		b.WriteString("host all " + Role + " 127.0.0.1/32 scram-sha-256\n")
		b.WriteString("host all " + Role + " ::1/128 scram-sha-256\n")
	}
	return b.String()
}

// identText maps the one operating-system user let in to the role trussfleet.
func identText(osUser string) string {
	return "# Written by trussfleet at every start; edits are lost.\n" +
		identMap + " \"" + osUser + "\" " + Role + "\n"
}

// writeAuthFiles writes the authentication and ident files into the data directory, for
// the server's account to read; writeSettings points the server at them.
func (s *Server) writeAuthFiles() error {
	osUser, err := clientUser()
	if err != nil {
		return err
	}
	for name, text := range map[string]string{hbaFileName: hbaText(s.opts.TCPPort != 0), identFileName: identText(osUser)} {
		path := filepath.Join(s.dataDir, name)
		if err := os.WriteFile(path, []byte(text), 0o600); err != nil {
			return fmt.Errorf("writing %s: %w", path, err)
		}
		if err := s.acct.own(path); err != nil {
			return err
		}
	}
	return nil
}

// authSettings are the lines of trussfleet.conf that put the files above in force.
func (s *Server) authSettings() string {
	return "hba_file = " + confQuote(filepath.Join(s.dataDir, hbaFileName)) + "\n" +
		"ident_file = " + confQuote(filepath.Join(s.dataDir, identFileName)) + "\n"
}

// checkAuth warns when the running server was started without trussfleet's authentication
// files (by a trussfleet before them, which trusted every local connection): they take
// effect at its next start.
func (s *Server) checkAuth(ctx context.Context, conn *pgx.Conn) {
	var hba string
	if err := conn.QueryRow(ctx, "SELECT current_setting('hba_file')").Scan(&hba); err != nil {
		return
	}
	if want := filepath.Join(s.dataDir, hbaFileName); hba != want {
		s.opts.Logf("pgserver: the server running on %s uses %s, not %s: it may let other local users in; "+
			"restart it (trussfleet db stop, then any command) to let only user %s in", s.dataDir, hba, want, s.acct.name)
	}
}

// PasswordFile is the password file of the TCP listener (a libpq passfile: "*:port:*:
// trussfleet:password"), beside the data directory, mode 0600, owned by the user who runs
// trussfleet. It exists only once a server with a TCP port has started.
func (s *Server) PasswordFile() string { return s.dataDir + ".pgpass" }

// TCPURL is a connection string for the named database over TCP on localhost, naming the
// password file; empty when the server has no TCP port.
func (s *Server) TCPURL(database string) string {
	if s.opts.TCPPort == 0 {
		return ""
	}
	q := url.Values{}
	q.Set("passfile", s.PasswordFile())
	return fmt.Sprintf("postgres://%s@localhost:%d/%s?%s", url.PathEscape(Role), s.port, url.PathEscape(database), q.Encode())
}

// setTCPPassword gives the role trussfleet the password of the password file, creating
// the file with a new random password when there is none. Only the SCRAM verifier is sent
// to the server, so the password itself appears in no statement or server log.
func (s *Server) setTCPPassword(ctx context.Context, conn *pgx.Conn) error {
	pw, err := s.tcpPassword()
	if err != nil {
		return err
	}
	salt := make([]byte, 16)
	if _, err := rand.Read(salt); err != nil {
		return err
	}
	v, err := scramVerifier(pw, salt, 4096)
	if err != nil {
		return err
	}
	// A verifier is base64 and punctuation ($ : + / =), never a quote.
	if _, err := conn.Exec(ctx, "ALTER ROLE "+pgx.Identifier{Role}.Sanitize()+" PASSWORD '"+v+"'"); err != nil {
		return fmt.Errorf("setting the TCP password of role %s: %w", Role, err)
	}
	return nil
}

// tcpPassword reads the password file, or writes a new one. A file that others could read
// or that belongs to another user is refused, not used.
func (s *Server) tcpPassword() (string, error) {
	path := s.PasswordFile()
	fi, err := os.Lstat(path)
	switch {
	case err == nil:
		st, ok := fi.Sys().(*syscall.Stat_t)
		if !fi.Mode().IsRegular() || !ok || int(st.Uid) != os.Geteuid() || fi.Mode().Perm()&0o077 != 0 {
			return "", fmt.Errorf("password file %s must be a regular file of user id %d with mode 0600: remove it and start again", path, os.Geteuid())
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return "", err
		}
		fields := strings.Split(strings.TrimSpace(string(b)), ":")
		if pw := fields[len(fields)-1]; len(fields) == 5 && len(pw) == 64 {
			if fields[1] == strconv.Itoa(s.port) {
				return pw, nil
			}
			return pw, writePassFile(path, s.port, pw)
		}
		return "", fmt.Errorf("password file %s is not one trussfleet wrote: remove it and start again", path)
	case errors.Is(err, os.ErrNotExist):
		b := make([]byte, 32)
		if _, err := rand.Read(b); err != nil {
			return "", err
		}
		pw := hex.EncodeToString(b)
		return pw, writePassFile(path, s.port, pw)
	default:
		return "", err
	}
}

// writePassFile replaces the password file at once: a new file, mode 0600, renamed over it.
func writePassFile(path string, port int, pw string) error {
	f, err := os.CreateTemp(filepath.Dir(path), filepath.Base(path)+".*")
	if err != nil {
		return fmt.Errorf("writing password file: %w", err)
	}
	_, err = fmt.Fprintf(f, "*:%d:*:%s:%s\n", port, Role, pw)
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(f.Name(), path)
	}
	if err != nil {
		os.Remove(f.Name())
		return fmt.Errorf("writing password file %s: %w", path, err)
	}
	return nil
}

// scramVerifier is the SCRAM-SHA-256 verifier PostgreSQL stores for a password (RFC 5802
// and RFC 7677; the text form of PostgreSQL's pg_authid.rolpassword):
// SCRAM-SHA-256$<iterations>:<salt>$<StoredKey>:<ServerKey>, in base64. The password is
// hex, so SASLprep leaves it as it is.
func scramVerifier(password string, salt []byte, iterations int) (string, error) {
	salted, err := pbkdf2.Key(sha256.New, password, salt, iterations, sha256.Size)
	if err != nil {
		return "", err
	}
	mac := func(key []byte, msg string) []byte {
		h := hmac.New(sha256.New, key)
		h.Write([]byte(msg))
		return h.Sum(nil)
	}
	stored := sha256.Sum256(mac(salted, "Client Key"))
	server := mac(salted, "Server Key")
	b64 := base64.StdEncoding.EncodeToString
	return fmt.Sprintf("SCRAM-SHA-256$%d:%s$%s:%s", iterations, b64(salt), b64(stored[:]), b64(server)), nil
}
