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
	if err := root.Execute(); err != nil {
		fmt.Fprintln(os.Stderr, "trussfleet:", err)
		var ee *exitError
		if errors.As(err, &ee) {
			os.Exit(ee.code)
		}
		os.Exit(1)
	}
}
