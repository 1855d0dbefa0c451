package pgserver

import (
	"context"
	"fmt"
)

// Crash stops the server the way a crash does: pg_ctl's immediate mode kills every server
// process at once, with no shutdown checkpoint and no flush of WAL still in memory, so the
// next Start recovers from the WAL on disk. Fault tests use it to check that what
// trussfleet was told is committed survives a crash of the database.
func (s *Server) Crash(ctx context.Context) error {
	if s.runningPID() == 0 {
		return nil
	}
	if err := s.acct.run(ctx, s.tool("pg_ctl"), "stop", "-D", s.dataDir, "-m", "immediate", "-w", "-s"); err != nil {
		return fmt.Errorf("crashing PostgreSQL in %s: %w", s.dataDir, err)
	}
	return nil
}
