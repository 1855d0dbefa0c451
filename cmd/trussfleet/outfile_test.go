package main

import (
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"syscall"
	"testing"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// TestOutputsHaveCreateMode: exported and generated files get the mode os.Create gives a
// new file (0666 less the umask), not os.CreateTemp's 0600. Reference: a file made by
// os.Create in the same folder (common practice: the umask decides who may read outputs).
func TestOutputsHaveCreateMode(t *testing.T) {
	// Under the usual umask 022 os.Create gives 0644; set it so that the check cannot pass
	// by a umask of 077 making every mode 0600.
	defer syscall.Umask(syscall.Umask(0o022))
	dir := t.TempDir()
	f, err := os.Create(filepath.Join(dir, "reference"))
	if err != nil {
		t.Fatal(err)
	}
	f.Close()
	want := mode(t, f.Name())
	if want != 0o644 {
		t.Fatalf("os.Create gave %v under umask 022", want)
	}

	export := filepath.Join(dir, "shared", "bridges.csv")
	if err := writeFileAtomic(export, func(w io.Writer) error { _, err := io.WriteString(w, "bridge_id\n"); return err }); err != nil {
		t.Fatal(err)
	}
	ref, err := traffic.ParseSpec("northmoor-freight-today", configs.Trains())
	if err != nil {
		t.Fatal(err)
	}
	opt := fleetgen.Defaults(1)
	opt.Reference = ref
	if err := writeFleet(opt, dir, func(string, string) {}); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{export, filepath.Join(dir, "bridges.csv"), filepath.Join(dir, "members.csv")} {
		if got := mode(t, p); got != want {
			t.Errorf("%s: mode %v, want %v as os.Create gives", filepath.Base(p), got, want)
		}
	}
}

func mode(t *testing.T, path string) fs.FileMode {
	t.Helper()
	st, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	return st.Mode().Perm()
}
