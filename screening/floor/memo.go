package floor

import (
	"sync"

	"github.com/trussfleet/trussfleet/screening/envelope"
)

// Memo keeps floor-system live effects across bridges, for every Analyser of a run: a
// stringer span's largest moment depends only on the train and the panel length, and the
// end shear and floor-beam reaction only on the train and the two panel lengths, so bridges
// with equal panels (a fleet's standard panel lengths) need not sweep a train again. Its
// keys are the trains' *envelope.Load, so it serves one set of prepared trains (one run's
// settings) and must not outlive changes to them. Safe for concurrent use; the zero value is
// ready.
type Memo struct {
	mu    sync.Mutex
	swept map[sweepKey][2]envelope.Extreme
	peaks map[peakKey]Peak
}

// memoLimit bounds a Memo's entries of each kind: past it the Memo starts afresh (a run's
// distinct panel lengths times its trains stay far below it on any fleet seen so far).
const memoLimit = 1 << 16

func (m *Memo) sweep(k sweepKey) ([2]envelope.Extreme, bool) {
	if m == nil {
		return [2]envelope.Extreme{}, false
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	r, ok := m.swept[k]
	return r, ok
}

func (m *Memo) keepSweep(k sweepKey, r [2]envelope.Extreme) {
	if m == nil {
		return
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.swept == nil || len(m.swept) >= memoLimit {
		m.swept = map[sweepKey][2]envelope.Extreme{}
	}
	m.swept[k] = r
}

func (m *Memo) peak(k peakKey) (Peak, bool) {
	if m == nil {
		return Peak{}, false
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	p, ok := m.peaks[k]
	return p, ok
}

func (m *Memo) keepPeak(k peakKey, p Peak) {
	if m == nil {
		return
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.peaks == nil || len(m.peaks) >= memoLimit {
		m.peaks = map[peakKey]Peak{}
	}
	m.peaks[k] = p
}
