package main

import (
	"fmt"
	"io"
	"log/slog"
	"os"
	"time"

	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/store"
)

// progressPrinter shows a run's progress: a bar on a terminal, a log line every few seconds
// otherwise.
func progressPrinter(errw io.Writer) func(fleetrun.Progress) {
	tty := isTerminal(errw)
	var lastLog time.Time
	return func(p fleetrun.Progress) {
		eta := "?"
		if p.PerSecond > 0 {
			eta = (time.Duration(float64(p.Pending)/p.PerSecond) * time.Second).Round(time.Second).String()
		}
		switch {
		case tty:
			fmt.Fprintf(errw, "\r%s %d/%d bridges  %.0f/s  ETA %s   ", bar(p.Done, p.Total, 30), p.Done, p.Total, p.PerSecond, eta)
		case time.Since(lastLog) > 5*time.Second || p.Status != store.RunRunning:
			slog.Info("screening", "run", p.RunID, "done", p.Done, "total", p.Total, "per_s", fmt.Sprintf("%.0f", p.PerSecond), "eta", eta)
			lastLog = time.Now()
		}
		if tty && p.Status != store.RunRunning {
			fmt.Fprintln(errw)
		}
	}
}

func bar(done, total, width int) string {
	n := 0
	if total > 0 {
		n = done * width / total
	}
	b := make([]byte, width)
	for i := range b {
		b[i] = '.'
		if i < n {
			b[i] = '#'
		}
	}
	return "[" + string(b) + "]"
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
