package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"runtime/debug"
	"strings"
	"syscall"
	"time"

	"github.com/prometheus/procfs"
)

// exitBridgesFailed is trussfleet screen's exit code for a run that completed with bridges
// that could not be screened (README, "Exit codes of screen"): a measured run all the same.
const exitBridgesFailed = 3

// trussfleetPackage is built when no trussfleet binary is given or found.
const trussfleetPackage = "github.com/trussfleet/trussfleet/cmd/trussfleet"

// findTrussfleet is the trussfleet binary to measure: the one named (--trussfleet), else the
// one next to this program (go build -o DIR/ ./cmd/trussfleet ./cmd/trussfleet-bench), else
// one built now from the module in the working directory into dir (go run).
func findTrussfleet(ctx context.Context, named, dir string, out io.Writer) (string, error) {
	if named != "" {
		p, err := filepath.Abs(named)
		if err != nil {
			return "", err
		}
		if _, err := os.Stat(p); err != nil {
			return "", fmt.Errorf("--trussfleet: %w", err)
		}
		return p, nil
	}
	if self, err := os.Executable(); err == nil {
		p := filepath.Join(filepath.Dir(self), "trussfleet")
		if st, err := os.Stat(p); err == nil && st.Mode().IsRegular() {
			return p, nil
		}
	}
	p := filepath.Join(dir, "trussfleet")
	build := exec.CommandContext(ctx, "go", "build", "-o", p, trussfleetPackage)
	build.Stdout, build.Stderr = out, os.Stderr
	if err := build.Run(); err != nil {
		return "", fmt.Errorf("no trussfleet next to this program and none given with --trussfleet; building %s: %w", trussfleetPackage, err)
	}
	fmt.Fprintf(out, "built %s: %s\n", trussfleetPackage, p)
	return p, nil
}

// trussfleet starts trussfleet processes on the benchmark's database.
type trussfleet struct {
	exe     string
	cfgFile string
	db      database
}

// command is trussfleet with the given arguments (a command and its flags) and extra
// environment, on the benchmark's configuration and database.
func (t trussfleet) command(ctx context.Context, env []string, args ...string) *exec.Cmd {
	var global []string
	if t.cfgFile != "" {
		global = append(global, "--config", t.cfgFile)
	}
	if t.db.url == "" {
		global = append(global, "--data-dir", t.db.dataDir)
	}
	// The global flags go after the command: cobra takes persistent flags anywhere.
	c := exec.CommandContext(ctx, t.exe, append(args, global...)...)
	c.Env = os.Environ()
	if t.db.url != "" {
		// In the environment, not the arguments: a URL may hold a password.
		c.Env = append(c.Env, "TRUSSFLEET_DATABASE_URL="+t.db.url)
	}
	c.Env = append(c.Env, env...)
	return c
}

// run runs trussfleet to its end with its output on out.
func (t trussfleet) run(ctx context.Context, out io.Writer, args ...string) error {
	c := t.command(ctx, nil, args...)
	c.Stdout, c.Stderr = out, os.Stderr
	if err := c.Run(); err != nil {
		return fmt.Errorf("%s %s: %w", filepath.Base(t.exe), strings.Join(args, " "), err)
	}
	return nil
}

// usage is what a measured child process used.
type usage struct {
	wall        time.Duration
	userS, sysS float64
	// peakRSSBytes is the child's peak resident set when peakExact; otherwise the child's
	// peak could not be told apart from this process's own, and it held no more than
	// peakRSSBytes (0: not known at all). See runMeasured.
	peakRSSBytes uint64
	peakExact    bool
}

// runMeasured runs c to its end and measures its wall time, CPU time and peak resident set.
//
// The peak comes from the kernel's account of the ended child (wait4's ru_maxrss). That
// account starts from the parent's high-water mark: Go starts a child with vfork, so until
// its exec the child runs in the parent's memory, and the kernel keeps the larger of that
// memory's peak and the child's own. So this process first gives its free memory back and
// resets its own high-water mark to what it holds now (/proc/self/clear_refs, Linux 4.0);
// its mark read after the start is then the most the parent can have added, and a reported
// peak above it is the child's own.
func runMeasured(c *exec.Cmd) (usage, error) {
	debug.FreeOSMemory()
	_ = os.WriteFile("/proc/self/clear_refs", []byte("5"), 0)
	start := time.Now()
	if err := c.Start(); err != nil {
		return usage{}, err
	}
	bound, known := ownPeakRSS()
	err := c.Wait()
	u := usage{wall: time.Since(start)}
	ru, ok := c.ProcessState.SysUsage().(*syscall.Rusage)
	if !ok {
		return u, errors.Join(err, errors.New("no resource usage of the child process on this system"))
	}
	u.userS, u.sysS = tvSeconds(ru.Utime), tvSeconds(ru.Stime)
	u.peakRSSBytes = uint64(ru.Maxrss) * 1024 // kB on Linux
	switch {
	case !known:
		u.peakRSSBytes = 0
	case u.peakRSSBytes > bound:
		u.peakExact = true
	default:
		u.peakRSSBytes = bound
	}
	return u, err
}

// ownPeakRSS is this process's high-water mark of resident memory (VmHWM), in bytes, and
// whether it could be read.
func ownPeakRSS() (uint64, bool) {
	p, err := procfs.Self()
	if err != nil {
		return 0, false
	}
	st, err := p.NewStatus()
	if err != nil {
		return 0, false
	}
	return st.VmHWM, true
}

func tvSeconds(t syscall.Timeval) float64 { return float64(t.Sec) + float64(t.Usec)/1e6 }
