package pgserver

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"os/user"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
)

// account is the operating-system user the server runs as.
type account struct {
	name     string
	uid, gid uint32
	// switchUser is set when the caller is root and the tools must run as another user.
	switchUser bool
}

// serverAccount picks the account: the caller itself, unless the caller is root, which
// initdb refuses; then runAs, or "postgres" where it exists, else "nobody".
func serverAccount(runAs string) (account, error) {
	if os.Geteuid() != 0 {
		name := strconv.Itoa(os.Geteuid())
		if u, err := user.Current(); err == nil {
			name = u.Username
		}
		return account{name: name, uid: uint32(os.Geteuid()), gid: uint32(os.Getegid())}, nil
	}
	candidates := []string{"postgres", "nobody"}
	if runAs != "" {
		candidates = []string{runAs}
	}
	var errs []error
	for _, name := range candidates {
		u, err := user.Lookup(name)
		if err != nil {
			errs = append(errs, err)
			continue
		}
		uid, err1 := strconv.ParseUint(u.Uid, 10, 32)
		gid, err2 := strconv.ParseUint(u.Gid, 10, 32)
		if err1 != nil || err2 != nil || uid == 0 {
			errs = append(errs, fmt.Errorf("user %s has uid %s, gid %s: not usable for the server", name, u.Uid, u.Gid))
			continue
		}
		return account{name: name, uid: uint32(uid), gid: uint32(gid), switchUser: true}, nil
	}
	return account{}, fmt.Errorf("running as root, and PostgreSQL refuses root: no unprivileged user to run it as (%w)", errors.Join(errs...))
}

// command prepares a server tool to run as the account, in a directory it can enter.
func (a account) command(ctx context.Context, path string, args ...string) *exec.Cmd {
	cmd := exec.CommandContext(ctx, path, args...)
	// The tools look up their working directory; the caller's (e.g. /root) may be closed to
	// the server's account.
	cmd.Dir = "/"
	if a.switchUser {
		cmd.SysProcAttr = &syscall.SysProcAttr{
			Credential: &syscall.Credential{Uid: a.uid, Gid: a.gid, Groups: []uint32{}},
		}
	}
	return cmd
}

// run runs a tool and returns its output in the error when it fails.
func (a account) run(ctx context.Context, path string, args ...string) error {
	cmd := a.command(ctx, path, args...)
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	if err := cmd.Run(); err != nil {
		return fmt.Errorf("%s %s (as user %s): %w: %s", filepath.Base(path), strings.Join(args, " "), a.name, err, strings.TrimSpace(out.String()))
	}
	return nil
}

// canSearch reports whether the account may pass through a directory with this owner,
// group and mode. Supplementary groups are cleared when switching user, so only the
// primary group counts.
func (a account) canSearch(st *syscall.Stat_t) bool {
	mode := st.Mode
	switch {
	case st.Uid == a.uid:
		return mode&0o100 != 0
	case st.Gid == a.gid:
		return mode&0o010 != 0
	default:
		return mode&0o001 != 0
	}
}

// grantSearch makes every ancestor of dir searchable by the account, adding o+x where it is
// missing and logging each change. Needed only when the server runs as another user.
func (a account) grantSearch(dir string, logf func(string, ...any)) error {
	if !a.switchUser {
		return nil
	}
	for d := filepath.Dir(dir); ; d = filepath.Dir(d) {
		fi, err := os.Stat(d)
		if err != nil {
			return fmt.Errorf("checking %s: %w", d, err)
		}
		st, ok := fi.Sys().(*syscall.Stat_t)
		if ok && !a.canSearch(st) {
			mode := fi.Mode().Perm() | 0o001
			if err := os.Chmod(d, mode); err != nil {
				return fmt.Errorf("giving user %s search permission on %s: %w", a.name, d, err)
			}
			logf("pgserver: added search permission for others (o+x, now %04o) on %s so that user %s can reach the data directory", mode, d, a.name)
		}
		if d == filepath.Dir(d) {
			return nil
		}
	}
}

// own gives a path to the account when the server runs as another user.
func (a account) own(path string) error {
	if !a.switchUser {
		return nil
	}
	if err := os.Lchown(path, int(a.uid), int(a.gid)); err != nil {
		return fmt.Errorf("giving %s to user %s: %w", path, a.name, err)
	}
	return nil
}
