package store

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// chunkInputs loads the bridges of a job that are still pending in the run, with their
// members, as screening inputs, and each bridge's input hash (InputHash with planHash, the
// run's; none for a run without one), taken of the rows loaded: the hash describes exactly
// what is screened.
func (db *DB) chunkInputs(ctx context.Context, runID int64, planHash string, ids []string) ([]screening.Bridge, map[string]string, error) {
	// r.bridge_id = ANY($2) as well as the join: a run just created may have no statistics,
	// and then the planner may read all the run's bridges to join 50 of them.
	rows, err := db.Pool.Query(ctx, "SELECT "+bridgeColumns+` FROM bridges b
		JOIN run_bridges r ON r.bridge_id = b.bridge_id AND r.run_id = $1 AND r.status = 'pending'
			AND r.bridge_id = ANY($2)
		WHERE b.bridge_id = ANY($2) ORDER BY b.bridge_id`, runID, ids)
	if err != nil {
		return nil, nil, err
	}
	bridges, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (Bridge, error) {
		var b Bridge
		return b, r.Scan(b.pointers()...)
	})
	if err != nil {
		return nil, nil, err
	}
	rows, err = db.Pool.Query(ctx, "SELECT "+memberColumns+" FROM members WHERE bridge_id = ANY($1)", ids)
	if err != nil {
		return nil, nil, err
	}
	members, err := collectMembers(rows)
	if err != nil {
		return nil, nil, err
	}
	byBridge := make(map[string][]Member, len(bridges))
	for _, m := range members {
		byBridge[m.BridgeID] = append(byBridge[m.BridgeID], m)
	}
	out := make([]screening.Bridge, len(bridges))
	hashes := make(map[string]string, len(bridges))
	for i, b := range bridges {
		ms := byBridge[b.BridgeID]
		out[i] = ScreeningInput(b, ms)
		if planHash != "" {
			hashes[b.BridgeID] = InputHash(planHash, b, ms)
		}
	}
	return out, hashes, nil
}

// ScreeningInput turns an inventory row and its members into what screening needs.
func ScreeningInput(b Bridge, members []Member) screening.Bridge {
	sb := screening.Bridge{
		ID:             b.BridgeID,
		Truss:          truss.Params{Type: b.TrussType, SpanM: b.SpanM, Panels: b.Panels, DepthM: b.DepthM, Deck: b.Deck, EndPosts: b.EndPosts},
		TrussShare:     b.TrussShare,
		Tracks:         b.Tracks,
		DeadLoadKNPerM: b.DeadLoadKNPerM,
		Members:        make(map[string]rating.Member, len(members)),
	}
	for _, m := range members {
		sb.Members[m.Member] = RatingMember(m)
	}
	return sb
}

// RatingMember turns a members row into the rating package's view of it.
func RatingMember(m Member) rating.Member {
	r := rating.Member{ConditionFactor: m.ConditionFactor}
	if m.CapacityTensionKN != nil {
		r.CapacityTension = *m.CapacityTensionKN
	}
	if m.CapacityCompressionKN != nil {
		r.CapacityCompression = *m.CapacityCompressionKN
	}
	if m.RatingFactor != nil && m.ReferenceTrain != nil {
		r.RatingFactor, r.ReferenceTrain = *m.RatingFactor, *m.ReferenceTrain
	}
	return r
}

var memberResultColumns = []string{"set_id", "scenario", "member", "kind", "dead_kn", "live_max_kn",
	"live_min_kn", "impact", "rf_tension", "rf_compression", "basis", "max_train", "max_head_m", "max_direction",
	"max_from_m", "max_to_m", "min_train", "min_head_m", "min_direction", "min_from_m", "min_to_m", "max_count", "min_count"}

var copyMemberResults = copyStatement("member_results", memberResultColumns)

var memberAssessmentColumns = []string{"set_id", "member", "rf_existing", "rf_proposed",
	"sense_proposed", "demand_increase", "flags"}

var copyMemberAssessments = copyStatement("member_assessments", memberAssessmentColumns)

// writeResults writes the results of the bridges that are still pending, locking their rows
// first: a second attempt at the same job (a rescued job whose first attempt committed) finds
// them done and writes nothing. A screened bridge's member rows are written only when no
// result set with the same content is stored yet (storeSets); its run_bridges row names the
// set. hashes are the bridges' input hashes as loaded; a bridge without one keeps the hash its
// run was created with. It returns the number of bridges written.
func writeResults(ctx context.Context, tx pgx.Tx, runID int64, results []screening.Result, hashes map[string]string, tm *ChunkTiming) (int, error) {
	t0 := time.Now()
	ids := make([]string, len(results))
	for i, r := range results {
		ids[i] = r.BridgeID
	}
	rows, err := tx.Query(ctx, `SELECT bridge_id FROM run_bridges WHERE run_id = $1 AND bridge_id = ANY($2)
		AND status = 'pending' ORDER BY bridge_id FOR UPDATE`, runID, ids)
	if err != nil {
		return 0, err
	}
	still, err := pgx.CollectRows(rows, pgx.RowTo[string])
	if err != nil {
		return 0, err
	}
	pending := make(map[string]bool, len(still))
	for _, id := range still {
		pending[id] = true
	}
	var written []screening.Result
	for _, r := range results {
		if pending[r.BridgeID] {
			written = append(written, r)
		}
	}
	if len(written) == 0 {
		return 0, nil
	}
	sets, err := storeSets(ctx, tx, written)
	if err != nil {
		return 0, err
	}
	var u bridgeUpdates
	for i, r := range written {
		u.add(r, hashes[r.BridgeID], sets[i])
	}
	t1 := time.Now()
	// r.bridge_id = ANY($2) beside the join: the planner, with no statistics yet for a new
	// run, would otherwise hash all the run's rows to join the chunk's (an index lookup each).
	if _, err := tx.Exec(ctx, `UPDATE run_bridges r SET status = u.status, error = u.error,
		worst_member = u.worst, rf_existing = u.rfe, rf_proposed = u.rfp, demand_increase = u.inc,
		headroom = u.head, flags = string_to_array(u.flags, ','), flag_counts = u.counts::jsonb,
		governing_train = u.gtrain, governing_sense = u.gsense, governing_head_m = u.ghead,
		governing_direction = u.gdir, governing_from_m = u.gfrom, governing_to_m = u.gto, screened_at = now(),
		input_hash = CASE WHEN u.hash = '' THEN r.input_hash ELSE u.hash END, set_id = u.set_id
		FROM unnest($2::text[], $3::text[], $4::text[], $5::text[], $6::float8[], $7::float8[], $8::float8[],
			$9::float8[], $10::text[], $11::text[], $12::text[], $13::text[], $14::float8[], $15::text[], $16::float8[],
			$17::float8[], $18::text[], $19::int8[])
			AS u(id, status, error, worst, rfe, rfp, inc, head, flags, counts, gtrain, gsense, ghead, gdir, gfrom, gto, hash, set_id)
		WHERE r.run_id = $1 AND r.bridge_id = ANY($2) AND r.bridge_id = u.id`,
		runID, u.ids, u.status, u.errs, u.worst, u.rfe, u.rfp, u.inc, u.head, u.flags, u.counts, u.gtrain, u.gsense,
		u.ghead, u.gdir, u.gfrom, u.gto, u.hashes, u.sets); err != nil {
		return 0, err
	}
	tm.Copy, tm.Update = t1.Sub(t0), time.Since(t1)
	return len(u.ids), nil
}

// storeSets finds or stores the result set of each screened result (nil for a bridge that
// failed) and returns the sets' ids in the results' order. A set is known by its bridge and
// the digest of its rows; one with the same content stored before (by any run) is reused and
// nothing is written for it. Two transactions storing the same set at once store it once:
// the second one's insert waits on the unique key for the first to commit, then finds its
// row.
func storeSets(ctx context.Context, tx pgx.Tx, results []screening.Result) ([]*int64, error) {
	e := copyEncoders.Get().(*copyEncoder)
	// Sorted by key, so that two transactions inserting overlapping sets lock them in the
	// same order and cannot deadlock.
	type key struct {
		bridge string
		digest [sha256.Size]byte
		at     int
	}
	var keys []key
	for i, r := range results {
		if r.Err == nil {
			keys = append(keys, key{r.BridgeID, setDigest(e, r), i})
		}
	}
	copyEncoders.Put(e)
	ids := make([]*int64, len(results))
	if len(keys) == 0 {
		return ids, nil
	}
	slices.SortFunc(keys, func(a, b key) int {
		if c := strings.Compare(a.bridge, b.bridge); c != 0 {
			return c
		}
		return bytes.Compare(a.digest[:], b.digest[:])
	})
	bridges := make([]string, len(keys))
	digests := make([][]byte, len(keys))
	for i, k := range keys {
		bridges[i], digests[i] = k.bridge, k.digest[:]
	}
	rows, err := tx.Query(ctx, `INSERT INTO result_sets (bridge_id, digest)
		SELECT * FROM unnest($1::text[], $2::bytea[]) ORDER BY 1, 2
		ON CONFLICT (bridge_id, digest) DO NOTHING RETURNING id, bridge_id, digest`, bridges, digests)
	if err != nil {
		return nil, fmt.Errorf("result sets: %w", err)
	}
	type found struct {
		id  int64
		new bool
	}
	byKey := map[string]found{}
	var id int64
	var b string
	var d []byte
	_, err = pgx.ForEachRow(rows, []any{&id, &b, &d}, func() error {
		byKey[b+"\x00"+string(d)] = found{id, true}
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("result sets: %w", err)
	}
	if len(byKey) < len(keys) {
		// FOR KEY SHARE: a prune that would delete a set no run refers to yet waits for this
		// transaction, and then sees it referred to.
		rows, err := tx.Query(ctx, `SELECT s.id, s.bridge_id, s.digest FROM result_sets s
			JOIN unnest($1::text[], $2::bytea[]) AS k(bridge_id, digest) ON s.bridge_id = k.bridge_id AND s.digest = k.digest
			FOR KEY SHARE OF s`, bridges, digests)
		if err != nil {
			return nil, fmt.Errorf("result sets: %w", err)
		}
		_, err = pgx.ForEachRow(rows, []any{&id, &b, &d}, func() error {
			if _, ok := byKey[b+"\x00"+string(d)]; !ok {
				byKey[b+"\x00"+string(d)] = found{id, false}
			}
			return nil
		})
		if err != nil {
			return nil, fmt.Errorf("result sets: %w", err)
		}
	}
	var fresh []screening.Result
	var freshIDs []int64
	for _, k := range keys {
		f, ok := byKey[k.bridge+"\x00"+string(k.digest[:])]
		if !ok {
			return nil, fmt.Errorf("result set of bridge %s neither stored nor found", k.bridge)
		}
		ids[k.at] = &f.id
		if f.new {
			fresh = append(fresh, results[k.at])
			freshIDs = append(freshIDs, f.id)
		}
	}
	if len(fresh) > 0 {
		if err := copyResults(ctx, tx, fresh, freshIDs); err != nil {
			return nil, err
		}
	}
	return ids, nil
}

// setDigest is the SHA-256 of a screened bridge's member rows, both tables, as they are
// written but with set id 0: equal digests, equal stored results.
func setDigest(e *copyEncoder, r screening.Result) [sha256.Size]byte {
	e.buf = e.buf[:0]
	for _, m := range r.Members {
		appendMemberResult(e, 0, "existing", m, m.Existing, m.Assessment.Existing)
		appendMemberResult(e, 0, "proposed", m, m.Proposed, m.Assessment.Proposed)
	}
	for _, m := range r.Members {
		appendMemberAssessment(e, 0, m)
	}
	return sha256.Sum256(e.buf)
}

// copyResults copies the results' member_results and member_assessments rows under their
// sets' ids, one table after the other through one encoder's buffer. After an error the
// encoder is dropped, not pooled: when the connection breaks, pgconn can return before its
// sender has stopped reading it.
func copyResults(ctx context.Context, tx pgx.Tx, results []screening.Result, setIDs []int64) error {
	e := copyEncoders.Get().(*copyEncoder)
	conn := tx.Conn().PgConn()
	if _, err := conn.CopyFrom(ctx, bytes.NewReader(encodeMemberResults(e, results, setIDs)), copyMemberResults); err != nil {
		return fmt.Errorf("member_results: %w", err)
	}
	if _, err := conn.CopyFrom(ctx, bytes.NewReader(encodeMemberAssessments(e, results, setIDs)), copyMemberAssessments); err != nil {
		return fmt.Errorf("member_assessments: %w", err)
	}
	copyEncoders.Put(e)
	return nil
}

// encodeMemberResults encodes the results' member_results rows, both scenarios of each member,
// result i under set setIDs[i].
func encodeMemberResults(e *copyEncoder, results []screening.Result, setIDs []int64) []byte {
	e.begin()
	for i, r := range results {
		for _, m := range r.Members {
			appendMemberResult(e, setIDs[i], "existing", m, m.Existing, m.Assessment.Existing)
			appendMemberResult(e, setIDs[i], "proposed", m, m.Proposed, m.Assessment.Proposed)
		}
	}
	return e.end()
}

// encodeMemberAssessments encodes the results' member_assessments rows, one a member, result
// i under set setIDs[i].
func encodeMemberAssessments(e *copyEncoder, results []screening.Result, setIDs []int64) []byte {
	e.begin()
	for i, r := range results {
		for _, m := range r.Members {
			appendMemberAssessment(e, setIDs[i], m)
		}
	}
	return e.end()
}

// bridgeUpdates gathers run_bridges columns for one UPDATE ... FROM unnest.
type bridgeUpdates struct {
	sets                                                           []*int64
	ids, status, errs, flags, counts, gtrain, gsense, gdir, hashes []string
	worst                                                          []*string
	rfe, rfp, inc, head, ghead, gfrom, gto                         []*float64
}

func (u *bridgeUpdates) add(r screening.Result, hash string, set *int64) {
	u.ids = append(u.ids, r.BridgeID)
	u.sets = append(u.sets, set)
	u.hashes = append(u.hashes, hash)
	if r.Err != nil {
		u.status = append(u.status, "failed")
		u.errs = append(u.errs, r.Err.Error())
		u.worst = append(u.worst, nil)
		u.rfe, u.rfp, u.inc, u.head = append(u.rfe, nil), append(u.rfp, nil), append(u.inc, nil), append(u.head, nil)
		u.flags, u.counts = append(u.flags, ""), append(u.counts, "{}")
		u.gtrain, u.gsense, u.gdir = append(u.gtrain, ""), append(u.gsense, ""), append(u.gdir, "")
		u.ghead, u.gfrom, u.gto = append(u.ghead, nil), append(u.gfrom, nil), append(u.gto, nil)
		return
	}
	s := r.Summary
	u.status = append(u.status, "done")
	u.errs = append(u.errs, "")
	var worst *string
	if s.Worst >= 0 {
		worst = &r.Members[s.Worst].Label
	}
	u.worst = append(u.worst, worst)
	u.rfe = append(u.rfe, rfOrNil(s.WorstEx, s.Worst >= 0 && !math.IsInf(s.WorstEx.RF, 0)))
	u.rfp = append(u.rfp, rfOrNil(s.WorstPr, s.Worst >= 0))
	u.inc = append(u.inc, num(s.DemandIncrease))
	u.head = append(u.head, num(s.Headroom))
	var flags []string
	counts := map[string]int{}
	for _, f := range rating.Flags {
		if n := s.FlagCounts[f]; n > 0 {
			flags = append(flags, string(f))
			counts[string(f)] = n
		}
	}
	cj, _ := json.Marshal(counts)
	u.flags = append(u.flags, strings.Join(flags, ","))
	u.counts = append(u.counts, string(cj))
	if g := r.Governing; g != nil && g.Loaded {
		u.gtrain = append(u.gtrain, g.Train)
		u.gsense = append(u.gsense, s.WorstPr.Sense.String())
		u.gdir = append(u.gdir, g.Direction.String())
		u.ghead, u.gfrom, u.gto = append(u.ghead, num(g.HeadM)), append(u.gfrom, num(g.LoadedFromM)), append(u.gto, num(g.LoadedToM))
	} else {
		u.gtrain, u.gsense, u.gdir = append(u.gtrain, ""), append(u.gsense, ""), append(u.gdir, "")
		u.ghead, u.gfrom, u.gto = append(u.ghead, nil), append(u.gfrom, nil), append(u.gto, nil)
	}
}

// appendMemberResult encodes a member's member_results row under one scenario, in the order
// of memberResultColumns.
func appendMemberResult(e *copyEncoder, setID int64, scenario string, m screening.MemberResult, env screening.Envelope, rfs []rating.Factor) {
	// NaN: no factor in that sense (NULL, as is a factor without a finite value).
	rt, rc := math.NaN(), math.NaN()
	basis := ""
	for _, f := range rfs {
		if f.Sense == rating.Tension {
			rt = f.RF
		} else {
			rc = f.RF
		}
		basis = f.Basis
	}
	e.row(len(memberResultColumns))
	e.int8(setID)
	e.text(scenario)
	e.text(m.Label)
	e.text(string(m.Kind))
	// The forces and the allowance are stored as they are, NaN and ±Inf included.
	e.float8(m.Dead)
	e.float8(env.Max.Value)
	e.float8(env.Min.Value)
	e.float8(env.Impact)
	e.float8OrNull(rt)
	e.float8OrNull(rc)
	e.text(basis)
	appendPlacement(e, env.Max)
	appendPlacement(e, env.Min)
	appendCount(e, env.Max)
	appendCount(e, env.Min)
}

// appendPlacement encodes an extreme's train, head position, direction and loaded stretch;
// with no train on the bridge all but the train are NULL and the direction is empty.
func appendPlacement(e *copyEncoder, x screening.Extreme) {
	e.text(x.Train)
	if !x.Loaded {
		e.null()
		e.text("")
		e.null()
		e.null()
		return
	}
	e.float8OrNull(x.HeadM)
	e.text(x.Direction.String())
	e.float8OrNull(x.LoadedFromM)
	e.float8OrNull(x.LoadedToM)
}

// appendCount encodes the vehicle count in the consist's last group at an extreme (NULL
// without a train on the bridge).
func appendCount(e *copyEncoder, x screening.Extreme) {
	if !x.Loaded {
		e.null()
		return
	}
	e.int4(int32(x.Count))
}

// appendMemberAssessment encodes a member's member_assessments row, in the order of
// memberAssessmentColumns.
func appendMemberAssessment(e *copyEncoder, setID int64, m screening.MemberResult) {
	a := m.Assessment
	sense := ""
	if a.HasPr {
		sense = a.WorstPr.Sense.String()
	}
	e.row(len(memberAssessmentColumns))
	e.int8(setID)
	e.text(m.Label)
	appendRF(e, a.WorstEx, a.HasEx)
	appendRF(e, a.WorstPr, a.HasPr)
	e.text(sense)
	e.float8OrNull(a.DemandIncrease)
	textArray(e, a.Flags)
}

// appendRF encodes a rating factor, NULL when there is none or it has no finite value.
func appendRF(e *copyEncoder, f rating.Factor, ok bool) {
	if !ok {
		e.null()
		return
	}
	e.float8OrNull(f.RF)
}

// num stores a finite number; NaN and ±Inf (no value) become NULL.
func num(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func rfOrNil(f rating.Factor, ok bool) *float64 {
	if !ok {
		return nil
	}
	return num(f.RF)
}
