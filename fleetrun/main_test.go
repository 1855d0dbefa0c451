package fleetrun_test

import (
	"testing"

	"github.com/trussfleet/trussfleet/store/pgtest"
)

func TestMain(m *testing.M) { pgtest.Main(m) }
