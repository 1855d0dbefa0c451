package main

import (
	"bufio"
	"bytes"
	"os"
	"strconv"
	"strings"
	"sync"
	"time"
)

// The embedded server's share of a benchmark, read from Linux's /proc: the postmaster and
// its child processes (backends, writer, WAL writer, checkpointer...).

// serverUsage is what the server used while a benchmark ran.
type serverUsage struct {
	// peakPSSKB is the largest sum of the processes' proportional set sizes (shared pages
	// divided among the processes that map them, so shared buffers count once); peakRSSKB
	// the largest plain sum of their resident sets, which counts shared buffers in each.
	peakPSSKB, peakRSSKB float64
	// cpuS is the CPU time (user and system) the processes used, including children that
	// ended meanwhile.
	cpuS float64
}

type serverSampler struct {
	pid  int
	cpu0 float64
	done chan struct{}
	wg   sync.WaitGroup

	mu  sync.Mutex
	use serverUsage
}

// clockTicks is USER_HZ, the unit of /proc/<pid>/stat's times: 100 on every Linux port Go
// supports.
const clockTicks = 100

func startServerSampler(pid int) *serverSampler {
	s := &serverSampler{pid: pid, done: make(chan struct{})}
	s.cpu0 = serverCPU(pid)
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
	return s
}

func (s *serverSampler) sample() {
	var pss, rss float64
	for _, p := range serverPIDs(s.pid) {
		b, err := os.ReadFile("/proc/" + strconv.Itoa(p) + "/smaps_rollup")
		if err != nil {
			continue
		}
		pss += kbField(b, "Pss:")
		rss += kbField(b, "Rss:")
	}
	s.mu.Lock()
	s.use.peakPSSKB = max(s.use.peakPSSKB, pss)
	s.use.peakRSSKB = max(s.use.peakRSSKB, rss)
	s.mu.Unlock()
}

func (s *serverSampler) stop() serverUsage {
	close(s.done)
	s.wg.Wait()
	s.sample()
	s.use.cpuS = serverCPU(s.pid) - s.cpu0
	return s.use
}

// serverPIDs is the postmaster and its children.
func serverPIDs(postmaster int) []int {
	pids := []int{postmaster}
	ents, err := os.ReadDir("/proc")
	if err != nil {
		return pids
	}
	for _, e := range ents {
		p, err := strconv.Atoi(e.Name())
		if err != nil || p == postmaster {
			continue
		}
		if f := statFields(p); len(f) > 1 && f[1] == strconv.Itoa(postmaster) {
			pids = append(pids, p)
		}
	}
	return pids
}

// serverCPU is the CPU seconds of the postmaster, its live children and its ended ones.
func serverCPU(postmaster int) float64 {
	var ticks float64
	for _, p := range serverPIDs(postmaster) {
		f := statFields(p)
		if len(f) < 15 {
			continue
		}
		// Fields after the command: state(0) ppid(1) ... utime(11) stime(12) cutime(13) cstime(14).
		n := 2
		if p == postmaster {
			n = 4
		}
		for _, v := range f[11 : 11+n] {
			x, _ := strconv.ParseFloat(v, 64)
			ticks += x
		}
	}
	return ticks / clockTicks
}

// statFields are the fields of /proc/<pid>/stat after the command name (which may hold
// spaces), starting with the state.
func statFields(pid int) []string {
	b, err := os.ReadFile("/proc/" + strconv.Itoa(pid) + "/stat")
	if err != nil {
		return nil
	}
	i := bytes.LastIndexByte(b, ')')
	if i < 0 {
		return nil
	}
	return strings.Fields(string(b[i+1:]))
}

// kbField reads a "Name:   123 kB" line.
func kbField(b []byte, name string) float64 {
	sc := bufio.NewScanner(bytes.NewReader(b))
	for sc.Scan() {
		if f := strings.Fields(sc.Text()); len(f) >= 2 && f[0] == name {
			v, _ := strconv.ParseFloat(f[1], 64)
			return v
		}
	}
	return 0
}

// loadAverage is the one-minute load average; 0 where it cannot be read.
func loadAverage() float64 {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return 0
	}
	f := strings.Fields(string(b))
	if len(f) == 0 {
		return 0
	}
	v, _ := strconv.ParseFloat(f[0], 64)
	return v
}
