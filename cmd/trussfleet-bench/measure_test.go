package main

import (
	"os"
	"os/exec"
	"runtime"
	"strconv"
	"testing"
)

// touchMB makes the test binary, started as a child, hold this many MiB and end.
const touchMB = "TRUSSFLEET_BENCH_TEST_TOUCH_MB"

func TestMain(m *testing.M) {
	if s := os.Getenv(touchMB); s != "" {
		n, _ := strconv.Atoi(s)
		touch(n)
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// touch allocates n MiB and writes every page of it, so that all of it is resident.
func touch(n int) []byte {
	b := make([]byte, n<<20)
	for i := 0; i < len(b); i += 4096 {
		b[i] = 1
	}
	return b
}

// TestPeakRSSIsTheChildsOwn: a child that holds 64 MiB is measured at 64 MiB or a little
// more (its runtime and code), not at the 256 MiB the parent held before starting it, which
// the kernel's account of a child started with vfork would otherwise report (runMeasured).
// Reference: the sizes the two processes touch, page by page.
func TestPeakRSSIsTheChildsOwn(t *testing.T) {
	const parentMB, childMB = 256, 64
	runtime.KeepAlive(touch(parentMB))

	self, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	c := exec.Command(self, "-test.run=^$")
	c.Env = append(os.Environ(), touchMB+"="+strconv.Itoa(childMB))
	u, err := runMeasured(c)
	if err != nil {
		t.Fatal(err)
	}
	got := mib(u.peakRSSBytes)
	// The child's runtime, test binary and heap overhead: well under 64 MiB more (common
	// practice, no source).
	if !u.peakExact || got < childMB || got > 2*childMB {
		t.Errorf("child's peak RSS %.0f MiB (told apart from the parent's: %v); want between %d and %d MiB, not the parent's %d",
			got, u.peakExact, childMB, 2*childMB, parentMB)
	}
	if u.wall <= 0 || u.userS+u.sysS <= 0 {
		t.Errorf("wall %v, CPU %.3f s: want both positive", u.wall, u.userS+u.sysS)
	}
}
