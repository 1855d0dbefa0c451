package screening_test

import (
	"fmt"
	"io/fs"
	"syscall"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// BenchmarkScreenFloor screens one bridge (a 12-panel Pratt, 72 m) under the default
// configuration's trains (the demo's freight trains and multiple unit), its trusses alone and
// with its floor system, which adds 24 stringer and 26 floor-beam results.
func BenchmarkScreenFloor(b *testing.B) {
	load := func(name string) *traffic.Train {
		data, err := fs.ReadFile(configs.Trains(), name+".yaml")
		if err != nil {
			b.Fatal(err)
		}
		t, err := traffic.ParseTrainFile(name+".yaml", data)
		if err != nil {
			b.Fatal(err)
		}
		return t
	}
	mu := load("eastfell-multiple-unit")
	ex, err := screening.NewScenario("existing", []*traffic.Train{load("northmoor-freight-today"), mu})
	if err != nil {
		b.Fatal(err)
	}
	pr, err := screening.NewScenario("proposed", []*traffic.Train{load("northmoor-freight-proposed"), mu})
	if err != nil {
		b.Fatal(err)
	}
	d, _ := traffic.ParseDynamic("phi3")
	s := &screening.Settings{Existing: ex, Proposed: pr, Dynamic: d, Method: rating.WorkingStress,
		Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2}}
	s.ShareTrains()
	for _, withFloor := range []bool{false, true} {
		br := screening.Bridge{ID: "B", Truss: truss.Params{Type: "pratt", SpanM: 72, Panels: 12, DepthM: 9},
			TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 20}
		if withFloor {
			br.TrussSpacingM = 5
			br.Floor = screening.FloorSystem{Rate: true}
		}
		b.Run(fmt.Sprintf("floor=%v", withFloor), func(b *testing.B) { benchScreen(b, br, s) })
	}
}

// benchScreen screens br again and again, and reports the process's CPU time per bridge
// beside the wall time: on a shared machine, the steadier of the two.
func benchScreen(b *testing.B, br screening.Bridge, s *screening.Settings) {
	var w screening.Screener
	cpu0 := cpuTime()
	for b.Loop() {
		if r := w.Screen(br, s); r.Err != nil {
			b.Fatal(r.Err)
		}
	}
	b.ReportMetric(float64((cpuTime()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/op")
}

// cpuTime is the process's user and system CPU time so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
