package main

import (
	"encoding/json"
	"errors"
	"os"
	"runtime"
	"runtime/pprof"
	"sync"
	"time"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/store"
)

// profiling holds a command's hidden profiling flags: CPU and heap profiles of the process
// and a file of where the jobs' time went (see BENCHMARKS.md, "Fleet run").
type profiling struct {
	cpu, heap, timings string

	mu  sync.Mutex
	sum phaseTotals
}

// phaseTotals sums store.ChunkTiming over a process's jobs, in seconds of wall time per
// phase (jobs overlap, so the sum exceeds the run's wall time when several run at once).
type phaseTotals struct {
	Jobs    int     `json:"jobs"`
	Bridges int     `json:"bridges"`
	LoadS   float64 `json:"load_s"`
	ScreenS float64 `json:"screen_s"`
	CopyS   float64 `json:"copy_s"`
	UpdateS float64 `json:"update_s"`
	CommitS float64 `json:"commit_s"`
	// PeakRSSKB is the process's own peak resident set (VmHWM) when it ended; 0 where the
	// system does not tell. (A parent's rusage of a child can report the parent's own peak
	// instead: Go starts children with vfork, whose memory the kernel counts as the child's
	// until exec.)
	PeakRSSKB float64 `json:"peak_rss_kb"`
}

func (p *profiling) flags(cmd *cobra.Command) {
	f := cmd.Flags()
	f.StringVar(&p.cpu, "cpuprofile", "", "write a CPU profile of this process to the file")
	f.StringVar(&p.heap, "memprofile", "", "write a heap profile of this process to the file at the end")
	f.StringVar(&p.timings, "timings", "", "write the jobs' time per phase (JSON) to the file at the end")
	for _, n := range []string{"cpuprofile", "memprofile", "timings"} {
		_ = f.MarkHidden(n)
	}
}

// start begins the CPU profile; the function it returns ends it and writes the other files.
func (p *profiling) start() (func() error, error) {
	var cpuFile *os.File
	if p.cpu != "" {
		f, err := os.Create(p.cpu)
		if err != nil {
			return nil, err
		}
		if err := pprof.StartCPUProfile(f); err != nil {
			f.Close()
			return nil, err
		}
		cpuFile = f
	}
	return func() error {
		var errs []error
		if cpuFile != nil {
			pprof.StopCPUProfile()
			errs = append(errs, cpuFile.Close())
		}
		if p.heap != "" {
			runtime.GC()
			errs = append(errs, writeFileWith(p.heap, func(f *os.File) error { return pprof.WriteHeapProfile(f) }))
		}
		if p.timings != "" {
			p.mu.Lock()
			if b, err := os.ReadFile("/proc/self/status"); err == nil {
				p.sum.PeakRSSKB = kbField(b, "VmHWM:")
			}
			b, err := json.MarshalIndent(p.sum, "", "  ")
			p.mu.Unlock()
			errs = append(errs, err, os.WriteFile(p.timings, append(b, '\n'), 0o644))
		}
		return errors.Join(errs...)
	}, nil
}

// onTiming is the worker's hook; nil when no timings file is asked for.
func (p *profiling) onTiming(t store.ChunkTiming) {
	p.mu.Lock()
	defer p.mu.Unlock()
	s := &p.sum
	s.Jobs++
	s.Bridges += t.Bridges
	for _, x := range []struct {
		to *float64
		d  time.Duration
	}{{&s.LoadS, t.Load}, {&s.ScreenS, t.Screen}, {&s.CopyS, t.Copy}, {&s.UpdateS, t.Update}, {&s.CommitS, t.Commit}} {
		*x.to += x.d.Seconds()
	}
}

func writeFileWith(path string, write func(*os.File) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	err = write(f)
	return errors.Join(err, f.Close())
}
