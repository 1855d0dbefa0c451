package main

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// createOutput creates a new file in dir, named by pattern with its last "*" replaced by a
// random string (as os.CreateTemp does), for an output that is renamed into place once
// written. Unlike os.CreateTemp's 0600, it asks for mode 0666, which the umask reduces as
// os.Create's does (0644 under the usual umask 022): an exported file is readable wherever
// the user's other files are, such as a shared inspectors' folder.
func createOutput(dir, pattern string) (*os.File, error) {
	prefix, suffix := pattern, ""
	if i := strings.LastIndex(pattern, "*"); i >= 0 {
		prefix, suffix = pattern[:i], pattern[i+1:]
	}
	for range 10000 {
		var b [6]byte
		if _, err := rand.Read(b[:]); err != nil {
			return nil, err
		}
		name := filepath.Join(dir, prefix+hex.EncodeToString(b[:])+suffix)
		f, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o666)
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		return f, err
	}
	return nil, &fs.PathError{Op: "createoutput", Path: filepath.Join(dir, pattern), Err: fs.ErrExist}
}
