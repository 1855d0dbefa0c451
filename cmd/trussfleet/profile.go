package main

import (
	"fmt"
	"os"
	"runtime/pprof"
	"strings"
)

// profileEnv names the environment variable that asks for a CPU profile of the whole
// command (for contributors measuring a fleet run: DEVELOPERS.md, "Profiling"); the profile
// is written to the file it names when the command ends, "{command}" in the name replaced by
// the command's name (a benchmark runs several commands: the imports, then screen).
const profileEnv = "TRUSSFLEET_CPU_PROFILE"

// stopProfile stops the profile startProfile started; it does nothing where none runs.
var stopProfile = func() {}

// startProfile starts the CPU profile that profileEnv asks for, if any, of the command named.
func startProfile(command string) error {
	path := strings.ReplaceAll(os.Getenv(profileEnv), "{command}", command)
	if path == "" {
		return nil
	}
	f, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("%s: %w", profileEnv, err)
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		return fmt.Errorf("%s: %w", profileEnv, err)
	}
	stopProfile = func() {
		pprof.StopCPUProfile()
		f.Close()
	}
	return nil
}
