package fleetrun

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/store"
)

// NewRun describes a run to create.
type NewRun struct {
	ProgramVersion string
	Config         any    // marshalled to JSON
	Plan           any    // marshalled to JSON: a screening.Plan
	PlanHash       string // part of every bridge's input hash
	ChunkSize      int
	// Changed screens only the bridges whose inputs differ from the latest completed run's
	// and carries the others' results forward from it.
	Changed bool
}

// CreateRun records a run, its bridges and its jobs in one transaction, and returns its id.
// A full run holds a row for every bridge and screens them all. With NewRun.Changed, the run
// is based on the latest completed run and holds rows only for what differs from it
// (writeDelta): bridges whose input hash equals the base run's are carried forward without a
// row or a job, so a night in which nothing changed writes the run's own row and nothing else.
func (c *Client) CreateRun(ctx context.Context, nr NewRun) (int64, error) {
	cfg, err := json.Marshal(nr.Config)
	if err != nil {
		return 0, fmt.Errorf("run configuration: %w", err)
	}
	plan, err := json.Marshal(nr.Plan)
	if err != nil {
		return 0, fmt.Errorf("run plan: %w", err)
	}
	sum := sha256.Sum256(append(append([]byte{}, cfg...), plan...))
	var id int64
	err = pgx.BeginFunc(ctx, c.db.Pool, func(tx pgx.Tx) error {
		if err := store.Durable(ctx, tx); err != nil {
			return err
		}
		row := store.NewRunRow{ProgramVersion: nr.ProgramVersion, Config: cfg, ConfigHash: hex.EncodeToString(sum[:]),
			Plan: plan, Mode: "full", PlanHash: nr.PlanHash}
		if nr.Changed {
			row.Mode = "changed"
			if row.BaseRunID, err = store.LatestCompletedRun(ctx, tx); err != nil {
				return err
			}
		}
		if id, err = store.InsertRun(ctx, tx, row); err != nil {
			return err
		}
		// The jobs hash each bridge as they load it (chunkInputs); only a run that carries
		// unchanged bridges forward needs every hash now.
		var total int
		if row.BaseRunID == nil {
			total, err = store.InsertInventoryBridges(ctx, tx, id)
		} else {
			total, err = writeDelta(ctx, tx, id, *row.BaseRunID, nr.PlanHash)
		}
		if err != nil {
			return err
		}
		pending, err := store.PendingBridgeIDs(ctx, tx, id)
		if err != nil {
			return err
		}
		if len(pending) >= analyzeFrom {
			if err := store.AnalyzeRunBridges(ctx, tx); err != nil {
				return err
			}
		}
		if err := insertChunks(ctx, c.river, tx, id, pending, nr.ChunkSize); err != nil {
			return err
		}
		return store.SetRunTotal(ctx, tx, id, total, len(pending) == 0)
	})
	if err != nil {
		return 0, fmt.Errorf("creating run: %w", err)
	}
	return id, nil
}

// analyzeFrom is the number of bridges to screen from which a new run analyses run_bridges:
// without statistics that know the run, the planner takes it for a handful of rows and reads
// all its pending bridges to find a job's 50 (10 ms a job at 10,000 bridges). A run with
// fewer new rows than this gains nothing from it, and ANALYZE samples 30,000 rows whatever
// the run (0.1 to 0.3 s).
const analyzeFrom = 1000

// writeDelta writes the rows of a run based on base that differ from base's picture: a
// pending row for each bridge whose input hash differs from its row there (or that has none,
// or whose screening failed), a removed row for each bridge of base's picture gone from the
// inventory; and marks the run incomplete (its picture continues in base's). It returns the
// number of bridges in the inventory.
func writeDelta(ctx context.Context, tx pgx.Tx, id, base int64, planHash string) (int, error) {
	ids, hashes, err := inputHashes(ctx, tx, planHash)
	if err != nil {
		return 0, err
	}
	before, err := store.Picture(ctx, tx, base)
	if err != nil {
		return 0, err
	}
	var changed, changedHashes []string
	for i, b := range ids {
		old, ok := before[b]
		delete(before, b)
		if ok && old.InputHash == hashes[i] && (old.Status == "done" || old.Status == "carried") {
			continue
		}
		changed, changedHashes = append(changed, b), append(changedHashes, hashes[i])
	}
	removed := make([]string, 0, len(before))
	for b := range before {
		removed = append(removed, b)
	}
	if len(changed) > 0 {
		if err := store.InsertPendingBridges(ctx, tx, id, changed, changedHashes); err != nil {
			return 0, err
		}
	}
	if len(removed) > 0 {
		if err := store.InsertRemovedBridges(ctx, tx, id, removed); err != nil {
			return 0, err
		}
	}
	return len(ids), store.MarkIncomplete(ctx, tx, id)
}
