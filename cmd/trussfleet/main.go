// Command trussfleet screens a fleet of railway truss bridges for heavier proposed traffic.
//
// Each sub-command lives in a file of its own in this folder; they parse flags, call a package
// below, and print. Configuration is resolved once here (flags > TRUSSFLEET_* environment >
// config file > defaults) into a typed Config and passed down.
package main

import (
	"errors"
	"fmt"
	"os"

	"github.com/trussfleet/trussfleet/internal/safetext"
)

// exitError carries a process exit code chosen by a command (a scheduler acts on it).
type exitError struct {
	code int
	err  error
}

func (e *exitError) Error() string { return e.err.Error() }
func (e *exitError) Unwrap() error { return e.err }

func main() {
	root := newRootCmd()
	err := root.Execute()
	stopProfile()
	if err != nil {
		// Messages quote inventory text (a bridge ID, a value of a file), so they are written
		// through safetext, line by line.
		fmt.Fprintln(os.Stderr, "trussfleet:", safetext.TerminalLines(err.Error()))
		var ee *exitError
		if errors.As(err, &ee) {
			os.Exit(ee.code)
		}
		os.Exit(1)
	}
}
