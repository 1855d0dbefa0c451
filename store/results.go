package store

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
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

var memberResultColumns = []string{"run_id", "bridge_id", "scenario", "member", "kind", "dead_kn", "live_max_kn",
	"live_min_kn", "impact", "rf_tension", "rf_compression", "basis", "max_train", "max_head_m", "max_direction",
	"max_from_m", "max_to_m", "min_train", "min_head_m", "min_direction", "min_from_m", "min_to_m", "max_count", "min_count"}

var copyMemberResults = copyStatement("member_results", memberResultColumns)

var memberAssessmentColumns = []string{"run_id", "bridge_id", "member", "rf_existing", "rf_proposed",
	"sense_proposed", "demand_increase", "flags"}

var copyMemberAssessments = copyStatement("member_assessments", memberAssessmentColumns)

// writeResults writes the results of the bridges that are still pending, locking their rows
// first: a second attempt at the same job (a rescued job whose first attempt committed) finds
// them done and writes nothing. hashes are the bridges' input hashes as loaded; a bridge
// without one keeps the hash its run was created with. It returns the number of bridges
// written.
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
	var u bridgeUpdates
	var written []screening.Result
	for _, r := range results {
		if pending[r.BridgeID] {
			u.add(r, hashes[r.BridgeID])
			written = append(written, r)
		}
	}
	if len(u.ids) == 0 {
		return 0, nil
	}
	if err := copyResults(ctx, tx, runID, written); err != nil {
		return 0, err
	}
	t1 := time.Now()
	// r.bridge_id = ANY($2) beside the join: the planner, with no statistics yet for a new
	// run, would otherwise hash all the run's rows to join the chunk's (an index lookup each).
	if _, err := tx.Exec(ctx, `UPDATE run_bridges r SET status = u.status, error = u.error,
		worst_member = u.worst, rf_existing = u.rfe, rf_proposed = u.rfp, demand_increase = u.inc,
		headroom = u.head, flags = string_to_array(u.flags, ','), flag_counts = u.counts::jsonb,
		governing_train = u.gtrain, governing_sense = u.gsense, governing_head_m = u.ghead,
		governing_direction = u.gdir, governing_from_m = u.gfrom, governing_to_m = u.gto, screened_at = now(),
		input_hash = CASE WHEN u.hash = '' THEN r.input_hash ELSE u.hash END
		FROM unnest($2::text[], $3::text[], $4::text[], $5::text[], $6::float8[], $7::float8[], $8::float8[],
			$9::float8[], $10::text[], $11::text[], $12::text[], $13::text[], $14::float8[], $15::text[], $16::float8[],
			$17::float8[], $18::text[])
			AS u(id, status, error, worst, rfe, rfp, inc, head, flags, counts, gtrain, gsense, ghead, gdir, gfrom, gto, hash)
		WHERE r.run_id = $1 AND r.bridge_id = ANY($2) AND r.bridge_id = u.id`,
		runID, u.ids, u.status, u.errs, u.worst, u.rfe, u.rfp, u.inc, u.head, u.flags, u.counts, u.gtrain, u.gsense,
		u.ghead, u.gdir, u.gfrom, u.gto, u.hashes); err != nil {
		return 0, err
	}
	tm.Copy, tm.Update = t1.Sub(t0), time.Since(t1)
	return len(u.ids), nil
}

// copyResults copies the results' member_results and member_assessments rows, one table after
// the other through one encoder's buffer. After an error the encoder is dropped, not pooled:
// when the connection breaks, pgconn can return before its sender has stopped reading it.
func copyResults(ctx context.Context, tx pgx.Tx, runID int64, results []screening.Result) error {
	e := copyEncoders.Get().(*copyEncoder)
	conn := tx.Conn().PgConn()
	if _, err := conn.CopyFrom(ctx, bytes.NewReader(encodeMemberResults(e, runID, results)), copyMemberResults); err != nil {
		return fmt.Errorf("member_results: %w", err)
	}
	if _, err := conn.CopyFrom(ctx, bytes.NewReader(encodeMemberAssessments(e, runID, results)), copyMemberAssessments); err != nil {
		return fmt.Errorf("member_assessments: %w", err)
	}
	copyEncoders.Put(e)
	return nil
}

// encodeMemberResults encodes the results' member_results rows, both scenarios of each member.
func encodeMemberResults(e *copyEncoder, runID int64, results []screening.Result) []byte {
	e.begin()
	for _, r := range results {
		for _, m := range r.Members {
			appendMemberResult(e, runID, r.BridgeID, "existing", m, m.Existing, m.Assessment.Existing)
			appendMemberResult(e, runID, r.BridgeID, "proposed", m, m.Proposed, m.Assessment.Proposed)
		}
	}
	return e.end()
}

// encodeMemberAssessments encodes the results' member_assessments rows, one a member.
func encodeMemberAssessments(e *copyEncoder, runID int64, results []screening.Result) []byte {
	e.begin()
	for _, r := range results {
		for _, m := range r.Members {
			appendMemberAssessment(e, runID, r.BridgeID, m)
		}
	}
	return e.end()
}

// bridgeUpdates gathers run_bridges columns for one UPDATE ... FROM unnest.
type bridgeUpdates struct {
	ids, status, errs, flags, counts, gtrain, gsense, gdir, hashes []string
	worst                                                          []*string
	rfe, rfp, inc, head, ghead, gfrom, gto                         []*float64
}

func (u *bridgeUpdates) add(r screening.Result, hash string) {
	u.ids = append(u.ids, r.BridgeID)
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
func appendMemberResult(e *copyEncoder, runID int64, bridge, scenario string, m screening.MemberResult, env screening.Envelope, rfs []rating.Factor) {
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
	e.int8(runID)
	e.text(bridge)
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
func appendMemberAssessment(e *copyEncoder, runID int64, bridge string, m screening.MemberResult) {
	a := m.Assessment
	sense := ""
	if a.HasPr {
		sense = a.WorstPr.Sense.String()
	}
	e.row(len(memberAssessmentColumns))
	e.int8(runID)
	e.text(bridge)
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
