package main

import (
	"os"
	"testing"

	"github.com/trussfleet/trussfleet/store/pgtest"
)

// beMain makes the test binary act as the trussfleet command, so that tests can start real
// worker processes (and kill them) without building the binary first.
const beMain = "TRUSSFLEET_TEST_BE_MAIN"

func TestMain(m *testing.M) {
	if os.Getenv(beMain) == "1" {
		os.Args = append(os.Args[:1], os.Args[2:]...) // drop the "--" that separates our arguments
		main()
		os.Exit(0)
	}
	pgtest.Main(m)
}
