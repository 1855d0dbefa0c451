package main

import (
	"sync"
	"time"

	"github.com/prometheus/procfs"
)

// The embedded server's share of a benchmark, read from Linux's /proc (through procfs,
// which parses stat, status and smaps_rollup, command names with spaces included): the
// postmaster and its child processes (backends, writer, WAL writer, checkpointer...).

// serverUsage is what the server used while a benchmark ran.
type serverUsage struct {
	// peakPSSBytes is the largest sum of the processes' proportional set sizes (shared pages
	// divided among the processes that map them, so shared buffers count once);
	// peakRSSBytes the largest plain sum of their resident sets, which counts shared buffers
	// in each.
	peakPSSBytes, peakRSSBytes uint64
	// cpuS is the CPU time (user and system) the processes used, including children that
	// ended meanwhile.
	cpuS float64
}

type serverSampler struct {
	fs   procfs.FS
	pid  int
	cpu0 float64
	done chan struct{}
	wg   sync.WaitGroup

	mu  sync.Mutex
	use serverUsage
}

// userHZ is the unit of /proc/<pid>/stat's times, clock ticks: 100 on every Linux port Go
// supports (procfs assumes the same).
const userHZ = 100

// startServerSampler samples the server's memory every 200 ms until stop.
func startServerSampler(postmaster int) (*serverSampler, error) {
	fs, err := procfs.NewDefaultFS()
	if err != nil {
		return nil, err
	}
	s := &serverSampler{fs: fs, pid: postmaster, done: make(chan struct{})}
	s.cpu0 = serverCPU(fs, postmaster)
	s.wg.Add(1)
	go func() {
		defer s.wg.Done()
		t := time.NewTicker(200 * time.Millisecond)
		defer t.Stop()
		for {
			s.sample()
			select {
			case <-s.done:
				return
			case <-t.C:
			}
		}
	}()
	return s, nil
}

func (s *serverSampler) sample() {
	var pss, rss uint64
	for _, p := range serverProcs(s.fs, s.pid) {
		m, err := p.ProcSMapsRollup()
		if err != nil {
			continue // ended meanwhile
		}
		pss += m.Pss
		rss += m.Rss
	}
	s.mu.Lock()
	s.use.peakPSSBytes = max(s.use.peakPSSBytes, pss)
	s.use.peakRSSBytes = max(s.use.peakRSSBytes, rss)
	s.mu.Unlock()
}

func (s *serverSampler) stop() serverUsage {
	close(s.done)
	s.wg.Wait()
	s.sample()
	s.use.cpuS = serverCPU(s.fs, s.pid) - s.cpu0
	return s.use
}

// serverProcs is the postmaster and its children.
func serverProcs(fs procfs.FS, postmaster int) []procfs.Proc {
	var out []procfs.Proc
	all, err := fs.AllProcs()
	if err != nil {
		if p, err := fs.Proc(postmaster); err == nil {
			out = append(out, p)
		}
		return out
	}
	for _, p := range all {
		if p.PID == postmaster {
			out = append(out, p)
		} else if st, err := p.Stat(); err == nil && st.PPID == postmaster {
			out = append(out, p)
		}
	}
	return out
}

// serverCPU is the CPU seconds of the postmaster, its live children and its ended ones
// (the postmaster's waited-for children's times).
func serverCPU(fs procfs.FS, postmaster int) float64 {
	var ticks float64
	for _, p := range serverProcs(fs, postmaster) {
		st, err := p.Stat()
		if err != nil {
			continue
		}
		ticks += float64(st.UTime + st.STime)
		if p.PID == postmaster {
			ticks += float64(st.CUTime + st.CSTime)
		}
	}
	return ticks / userHZ
}

// loadAverage is the one-minute load average; 0 where it cannot be read.
func loadAverage() float64 {
	fs, err := procfs.NewDefaultFS()
	if err != nil {
		return 0
	}
	l, err := fs.LoadAvg()
	if err != nil {
		return 0
	}
	return l.Load1
}
