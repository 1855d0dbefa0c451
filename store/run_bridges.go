package store

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
)

// Table run_bridges: sql/migrations/002_screening.sql, 005 (hashes taken at load), 006 (the
// pending index), 007 (requeues), 009 (result sets, removed rows, run_picture), 012 (loading case, rocking), 015 (line
// categories, E rating).

// RunProgress counts a run's bridges by status.
type RunProgress struct {
	Total, Pending, Done, Failed, Carried int
}

// Progress reads a run's progress over its picture: Done counts the bridges the run itself
// screened, Carried those whose results it carried forward from an earlier run.
func (db *DB) Progress(ctx context.Context, id int64) (RunProgress, error) {
	var p RunProgress
	err := db.Pool.QueryRow(ctx, `SELECT count(*),
		count(*) FILTER (WHERE status = 'pending'), count(*) FILTER (WHERE status = 'done' AND run_id = $1),
		count(*) FILTER (WHERE status = 'failed'),
		count(*) FILTER (WHERE status = 'carried' OR (status = 'done' AND run_id <> $1))
		FROM run_picture($1)`, id).Scan(&p.Total, &p.Pending, &p.Done, &p.Failed, &p.Carried)
	return p, err
}

// PendingBridges counts a run's bridges still to be screened (an index-only count).
func (db *DB) PendingBridges(ctx context.Context, id int64) (int, error) {
	var n int
	err := db.Pool.QueryRow(ctx, `SELECT count(*) FROM run_bridges WHERE run_id = $1 AND status = 'pending'`, id).Scan(&n)
	return n, err
}

// BridgeSet is the result set of a bridge in a run's picture: its own row's, or the nearest
// base run's (nil where the bridge has none, as a failed one).
func (db *DB) BridgeSet(ctx context.Context, runID int64, bridgeID string) (*int64, error) {
	var set *int64
	var removed bool
	err := db.Pool.QueryRow(ctx, `WITH RECURSIVE chain (id, base, complete, depth) AS (
			SELECT id, base_run_id, complete, 0 FROM runs WHERE id = $1
			UNION ALL
			SELECT r.id, r.base_run_id, r.complete, c.depth + 1 FROM chain c JOIN runs r ON r.id = c.base
			WHERE NOT c.complete)
		SELECT b.set_id, b.status = 'removed' FROM chain c JOIN run_bridges b ON b.run_id = c.id AND b.bridge_id = $2
		ORDER BY c.depth LIMIT 1`, runID, bridgeID).Scan(&set, &removed)
	if errors.Is(err, pgx.ErrNoRows) || (err == nil && removed) {
		return nil, fmt.Errorf("bridge %q in run %d: %w", bridgeID, runID, ErrNotFound)
	}
	return set, err
}

// InsertInventoryBridges gives the run a pending row for every bridge of the inventory,
// with no input hash yet (its job takes it), and returns how many.
func InsertInventoryBridges(ctx context.Context, tx pgx.Tx, runID int64) (int, error) {
	tag, err := tx.Exec(ctx, `INSERT INTO run_bridges (run_id, bridge_id, input_hash)
		SELECT $1, b.bridge_id, '' FROM bridges b`, runID)
	return int(tag.RowsAffected()), err
}

// InsertPendingBridges gives the run a pending row for each bridge, with its input hash
// (ids and hashes at the same index).
func InsertPendingBridges(ctx context.Context, tx pgx.Tx, runID int64, ids, hashes []string) error {
	_, err := tx.Exec(ctx, `INSERT INTO run_bridges (run_id, bridge_id, input_hash)
		SELECT $1, u.bridge_id, u.input_hash FROM unnest($2::text[], $3::text[]) AS u(bridge_id, input_hash)`,
		runID, ids, hashes)
	return err
}

// InsertRemovedBridges gives the run a removed row for each bridge: gone from the inventory
// since its base run, and so left out of its picture.
func InsertRemovedBridges(ctx context.Context, tx pgx.Tx, runID int64, ids []string) error {
	_, err := tx.Exec(ctx, `INSERT INTO run_bridges (run_id, bridge_id, input_hash, status, screened_at)
		SELECT $1, u.bridge_id, '', 'removed', now() FROM unnest($2::text[]) AS u(bridge_id)`, runID, ids)
	return err
}

// PictureBridge is a bridge's row in a run's picture, as much of it as decides whether a
// later run screens the bridge again.
type PictureBridge struct {
	InputHash, Status string
}

// Picture reads a run's picture (run_picture), by bridge.
func Picture(ctx context.Context, tx pgx.Tx, runID int64) (map[string]PictureBridge, error) {
	rows, err := tx.Query(ctx, `SELECT bridge_id, input_hash, status FROM run_picture($1)`, runID)
	if err != nil {
		return nil, err
	}
	out := map[string]PictureBridge{}
	var b string
	var p PictureBridge
	if _, err := pgx.ForEachRow(rows, []any{&b, &p.InputHash, &p.Status}, func() error {
		out[b] = p
		return nil
	}); err != nil {
		return nil, fmt.Errorf("picture of run %d: %w", runID, err)
	}
	return out, nil
}

// AnalyzeRunBridges renews the planner's statistics of run_bridges. Without them the planner
// takes a new run for a handful of rows and reads all its pending bridges to find a job's 50
// (10 ms a job at 10,000 bridges, growing with the fleet). ANALYZE samples a bounded number
// of rows, a few milliseconds at any size.
func AnalyzeRunBridges(ctx context.Context, tx pgx.Tx) error {
	_, err := tx.Exec(ctx, "ANALYZE run_bridges")
	return err
}

// PendingBridgeIDs lists a run's pending bridges in id order.
func PendingBridgeIDs(ctx context.Context, tx pgx.Tx, runID int64) ([]string, error) {
	rows, err := tx.Query(ctx, `SELECT bridge_id FROM run_bridges WHERE run_id = $1 AND status = 'pending'
		ORDER BY bridge_id`, runID)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, pgx.RowTo[string])
}

// LockPendingBridges locks, until the transaction ends, the rows of those of the bridges that
// are still pending in the run, and returns their ids in id order.
func LockPendingBridges(ctx context.Context, tx pgx.Tx, runID int64, ids []string) ([]string, error) {
	rows, err := tx.Query(ctx, `SELECT bridge_id FROM run_bridges WHERE run_id = $1 AND bridge_id = ANY($2)
		AND status = 'pending' ORDER BY bridge_id FOR UPDATE`, runID, ids)
	if err != nil {
		return nil, err
	}
	return pgx.CollectRows(rows, pgx.RowTo[string])
}

// FailBridges records why the run's still pending bridges among ids could not be screened.
func FailBridges(ctx context.Context, tx pgx.Tx, runID int64, ids []string, why string) error {
	_, err := tx.Exec(ctx, `UPDATE run_bridges SET status = 'failed', error = $3, screened_at = now()
		WHERE run_id = $1 AND bridge_id = ANY($2) AND status = 'pending'`, runID, ids, why)
	return err
}

// FailBridgesEach is FailBridges with a reason for each bridge (ids and whys at the same
// index).
func FailBridgesEach(ctx context.Context, tx pgx.Tx, runID int64, ids, whys []string) error {
	_, err := tx.Exec(ctx, `UPDATE run_bridges r SET status = 'failed', error = f.why, screened_at = now()
		FROM unnest($2::text[], $3::text[]) AS f(bridge_id, why)
		WHERE r.run_id = $1 AND r.bridge_id = f.bridge_id AND r.status = 'pending'`, runID, ids, whys)
	return err
}

// CountRequeues records that the run's bridges were queued again.
func CountRequeues(ctx context.Context, tx pgx.Tx, runID int64, ids []string) error {
	_, err := tx.Exec(ctx, `UPDATE run_bridges SET requeues = requeues + 1
		WHERE run_id = $1 AND bridge_id = ANY($2)`, runID, ids)
	return err
}

// BridgeOutcome is what a job writes to a screened bridge's run_bridges row: done with its
// summary and result set, or failed with its reason.
type BridgeOutcome struct {
	BridgeID string
	Status   string // done or failed
	Error    string // why it failed
	// The summary of a done bridge: its worst member, that member's rating factors, the
	// largest demand increase, the headroom, the flags its members carry (in report order)
	// with their counts, and the proposed train governing the worst member with where it
	// stood. Numbers are nil where there is none or it has no finite value.
	WorstMember                                      *string
	RFExisting, RFProposed, DemandIncrease, Headroom *float64
	Flags                                            []string
	FlagCounts                                       map[string]int
	// UnratedMembers counts the members the proposed traffic loads in a sense they hold no
	// rating for (migration 011); nil for a failed bridge.
	UnratedMembers                 *int32
	GoverningTrain, GoverningSense string
	GoverningHeadM                 *float64
	GoverningDirection             string
	GoverningFromM, GoverningToM   *float64
	// InputHash is the hash of the inputs screened; "" keeps the hash the run was created
	// with.
	InputHash string
	SetID     *int64 // the bridge's result set; nil for a failed bridge

	// GoverningCase is the loading case of the governing extreme (tracks, shares; migration
	// 012); NoRocking says AREMA's rocking term was left out (no truss spacing); nil for a
	// failed bridge.
	GoverningCase string
	NoRocking     *bool
	// Categories are the highest line categories the bridge carries, ERating its Cooper E
	// rating and EMember the member that has it (migration 015); nil where the run did not
	// ask for the network view.
	Categories []string
	ERating    *float64
	EMember    *string
	// FatigueNoData counts the members the fatigue check could not check (no area or
	// category), FatigueLifeYears is the shortest remaining fatigue life and FatigueMember its
	// member (migration 016); nil and "" where the run checked no fatigue or no life ends.
	FatigueNoData    *int32
	FatigueLifeYears *float64
	FatigueMember    string
	// FatigueLifeIndex is FatigueLifeYears over the planning horizon (nil: none).
	FatigueLifeIndex *float64
}

// outcomeColumn is a run_bridges column a BridgeOutcome sets: its values travel to the server
// as one array of the outcomes (array, of that type), and set is the value the column takes,
// of the array's element (u.name) and the row (r).
type outcomeColumn struct {
	name, array, set string
	values           func([]BridgeOutcome) any
}

// each gathers one field of the outcomes into a slice.
func each[T any](f func(*BridgeOutcome) T) func([]BridgeOutcome) any {
	return func(os []BridgeOutcome) any {
		out := make([]T, len(os))
		for i := range os {
			out[i] = f(&os[i])
		}
		return out
	}
}

// outcomeColumns are the columns SetOutcomes writes: the statement, its arrays and their
// order all come from here. An array of arrays must be rectangular, so the flags travel
// joined by commas and the flag counts as JSON text.
var outcomeColumns = []outcomeColumn{
	{"status", "text[]", "u.status", each(func(o *BridgeOutcome) string { return o.Status })},
	{"error", "text[]", "u.error", each(func(o *BridgeOutcome) string { return o.Error })},
	{"worst_member", "text[]", "u.worst_member", each(func(o *BridgeOutcome) *string { return o.WorstMember })},
	{"rf_existing", "float8[]", "u.rf_existing", each(func(o *BridgeOutcome) *float64 { return o.RFExisting })},
	{"rf_proposed", "float8[]", "u.rf_proposed", each(func(o *BridgeOutcome) *float64 { return o.RFProposed })},
	{"demand_increase", "float8[]", "u.demand_increase", each(func(o *BridgeOutcome) *float64 { return o.DemandIncrease })},
	{"headroom", "float8[]", "u.headroom", each(func(o *BridgeOutcome) *float64 { return o.Headroom })},
	{"flags", "text[]", "string_to_array(u.flags, ',')", each(func(o *BridgeOutcome) string { return strings.Join(o.Flags, ",") })},
	{"flag_counts", "text[]", "u.flag_counts::jsonb", each(flagCountsJSON)},
	{"unrated_members", "int4[]", "u.unrated_members", each(func(o *BridgeOutcome) *int32 { return o.UnratedMembers })},
	{"fatigue_no_data", "int4[]", "u.fatigue_no_data", each(func(o *BridgeOutcome) *int32 { return o.FatigueNoData })},
	{"fatigue_life_years", "float8[]", "u.fatigue_life_years", each(func(o *BridgeOutcome) *float64 { return o.FatigueLifeYears })},
	{"fatigue_member", "text[]", "nullif(u.fatigue_member, '')", each(func(o *BridgeOutcome) string { return o.FatigueMember })},
	{"fatigue_life_index", "float8[]", "u.fatigue_life_index", each(func(o *BridgeOutcome) *float64 { return o.FatigueLifeIndex })},
	{"governing_train", "text[]", "u.governing_train", each(func(o *BridgeOutcome) string { return o.GoverningTrain })},
	{"governing_sense", "text[]", "u.governing_sense", each(func(o *BridgeOutcome) string { return o.GoverningSense })},
	{"governing_head_m", "float8[]", "u.governing_head_m", each(func(o *BridgeOutcome) *float64 { return o.GoverningHeadM })},
	{"governing_direction", "text[]", "u.governing_direction", each(func(o *BridgeOutcome) string { return o.GoverningDirection })},
	{"governing_from_m", "float8[]", "u.governing_from_m", each(func(o *BridgeOutcome) *float64 { return o.GoverningFromM })},
	{"governing_to_m", "float8[]", "u.governing_to_m", each(func(o *BridgeOutcome) *float64 { return o.GoverningToM })},
	{"input_hash", "text[]", "CASE WHEN u.input_hash = '' THEN r.input_hash ELSE u.input_hash END",
		each(func(o *BridgeOutcome) string { return o.InputHash })},
	{"set_id", "int8[]", "u.set_id", each(func(o *BridgeOutcome) *int64 { return o.SetID })},
	{"governing_case", "text[]", "u.governing_case", each(func(o *BridgeOutcome) string { return o.GoverningCase })},
	{"no_rocking", "bool[]", "u.no_rocking", each(func(o *BridgeOutcome) *bool { return o.NoRocking })},
	{"categories", "text[]", "CASE WHEN u.categories IS NULL THEN NULL ELSE string_to_array(u.categories, ',') END",
		each(func(o *BridgeOutcome) *string { return joinedOrNil(o.Categories) })},
	{"e_rating", "float8[]", "u.e_rating", each(func(o *BridgeOutcome) *float64 { return o.ERating })},
	{"e_member", "text[]", "u.e_member", each(func(o *BridgeOutcome) *string { return o.EMember })},
}

// joinedOrNil joins a list by commas for its travel in an array of text: nil stays NULL, and
// an empty list is the empty string (an empty array).
func joinedOrNil(list []string) *string {
	if list == nil {
		return nil
	}
	s := strings.Join(list, ",")
	return &s
}

// flagCountsJSON is an outcome's flag counts as a JSON object ({} for none).
func flagCountsJSON(o *BridgeOutcome) string {
	if len(o.FlagCounts) == 0 {
		return "{}"
	}
	j, _ := json.Marshal(o.FlagCounts) // a map of strings to ints always marshals
	return string(j)
}

// setOutcomes is the UPDATE of SetOutcomes: $1 the run, $2 the bridges' ids, then one array
// per outcome column. r.bridge_id = ANY($2) beside the join: the planner, with no statistics
// yet for a new run, would otherwise hash all the run's rows to join the chunk's (an index
// lookup each).
var setOutcomes = func() string {
	var set, arrays, names []string
	for i, c := range outcomeColumns {
		set = append(set, c.name+" = "+c.set)
		arrays = append(arrays, fmt.Sprintf("$%d::%s", i+3, c.array))
		names = append(names, c.name)
	}
	return "UPDATE run_bridges r SET " + strings.Join(set, ", ") + ", screened_at = now()\n" +
		"FROM unnest($2::text[], " + strings.Join(arrays, ", ") + ") AS u(bridge_id, " + strings.Join(names, ", ") + ")\n" +
		"WHERE r.run_id = $1 AND r.bridge_id = ANY($2) AND r.bridge_id = u.bridge_id"
}()

// SetOutcomes writes the outcomes of screened bridges to their rows in the run, in one
// statement.
func SetOutcomes(ctx context.Context, tx pgx.Tx, runID int64, outcomes []BridgeOutcome) error {
	ids := make([]string, len(outcomes))
	for i, o := range outcomes {
		ids[i] = o.BridgeID
	}
	args := []any{runID, ids}
	for _, c := range outcomeColumns {
		args = append(args, c.values(outcomes))
	}
	_, err := tx.Exec(ctx, setOutcomes, args...)
	return err
}

// carriedColumns are the run_bridges columns a pruned run's picture passes on, unchanged, to
// a run that depends on it (run_id, status and source_run_id are set apart).
var carriedColumns = []string{"bridge_id", "input_hash", "error", "worst_member", "rf_existing", "rf_proposed",
	"demand_increase", "headroom", "flags", "flag_counts", "unrated_members", "governing_train", "governing_sense", "governing_head_m",
	"governing_direction", "governing_from_m", "governing_to_m", "screened_at", "requeues", "set_id",
	"governing_case", "no_rocking", "categories", "e_rating", "e_member",
	"fatigue_no_data", "fatigue_life_years", "fatigue_member", "fatigue_life_index"}

// squashStatement copies the picture of run $1 into run $2, for every bridge that run $2
// holds no row of: a screened bridge as carried, a failed one as failed (a failure is never
// carried: the next nightly run screens it again).
var squashStatement = func() string {
	cols := strings.Join(carriedColumns, ", ")
	return "INSERT INTO run_bridges (run_id, status, source_run_id, " + cols + ")\n" +
		"SELECT $2, CASE WHEN p.status = 'failed' THEN 'failed' ELSE 'carried' END, coalesce(p.source_run_id, p.run_id), p." +
		strings.Join(carriedColumns, ", p.") + "\n" +
		"FROM run_picture($1) p WHERE NOT EXISTS (SELECT 1 FROM run_bridges y WHERE y.run_id = $2 AND y.bridge_id = p.bridge_id)"
}()

// carryPicture copies the picture of run from into run into as carried rows, for every
// bridge that into holds no row of, and returns how many it copied.
func carryPicture(ctx context.Context, tx pgx.Tx, from, into int64) (int64, error) {
	tag, err := tx.Exec(ctx, squashStatement, from, into)
	return tag.RowsAffected(), err
}
