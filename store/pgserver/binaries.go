package pgserver

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strconv"
)

// ErrNoBinaries is returned (wrapped) when no PostgreSQL server binaries can be found.
var ErrNoBinaries = errors.New("no PostgreSQL server binaries (initdb, pg_ctl, postgres) found")

// installHint tells a user the two ways out when the binaries are missing.
const installHint = "install them (Debian or Ubuntu: apt-get install postgresql; the server " +
	"need not run, trussfleet starts its own) or use an existing server with --database-url, " +
	"TRUSSFLEET_DATABASE_URL or database.url in the configuration file"

// debianBinGlob is where Debian and Ubuntu keep each major version's server binaries; they
// are not on PATH there.
const debianBinGlob = "/usr/lib/postgresql/*/bin"

// serverTools are the programs a data directory needs.
var serverTools = []string{"initdb", "pg_ctl", "postgres"}

// FindBinDir returns the directory holding initdb, pg_ctl and postgres. It looks first in
// each directory of searchPath (a PATH-style list, e.g. the value of $PATH), following a
// symbolic link to the directory the real pg_ctl lives in, then under
// /usr/lib/postgresql/*/bin, newest major version first.
func FindBinDir(searchPath string) (string, error) {
	for _, dir := range filepath.SplitList(searchPath) {
		if dir == "" {
			continue
		}
		p := filepath.Join(dir, "pg_ctl")
		if !isExecutable(p) {
			continue
		}
		// A link such as /usr/local/bin/pg_ctl: initdb and postgres sit beside the target.
		if real, err := filepath.EvalSymlinks(p); err == nil {
			if d := filepath.Dir(real); hasTools(d) {
				return d, nil
			}
		}
		if hasTools(dir) {
			return dir, nil
		}
	}
	dirs, _ := filepath.Glob(debianBinGlob)
	sort.Slice(dirs, func(i, j int) bool { return majorOf(dirs[i]) > majorOf(dirs[j]) })
	for _, d := range dirs {
		if hasTools(d) {
			return d, nil
		}
	}
	return "", fmt.Errorf("%w on PATH or under %s: %s", ErrNoBinaries, debianBinGlob, installHint)
}

// CheckBinDir reports whether dir holds the server tools, with the same hint as FindBinDir.
func CheckBinDir(dir string) error {
	if hasTools(dir) {
		return nil
	}
	return fmt.Errorf("%w in %s: %s", ErrNoBinaries, dir, installHint)
}

func hasTools(dir string) bool {
	for _, t := range serverTools {
		if !isExecutable(filepath.Join(dir, t)) {
			return false
		}
	}
	return true
}

func isExecutable(path string) bool {
	st, err := os.Stat(path)
	return err == nil && st.Mode().IsRegular() && st.Mode()&0o111 != 0
}

// majorOf reads the major version from /usr/lib/postgresql/<major>/bin; 0 if not a number.
func majorOf(binDir string) int {
	n, _ := strconv.Atoi(filepath.Base(filepath.Dir(binDir)))
	return n
}
