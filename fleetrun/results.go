package fleetrun

import (
	"bytes"
	"context"
	"crypto/sha256"
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgtype"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/store"
)

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
	still, err := store.LockPendingBridges(ctx, tx, runID, ids)
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
	outcomes := make([]store.BridgeOutcome, len(written))
	for i, r := range written {
		outcomes[i] = outcome(r, hashes[r.BridgeID], sets[i])
	}
	t1 := time.Now()
	if err := store.SetOutcomes(ctx, tx, runID, outcomes); err != nil {
		return 0, err
	}
	tm.Copy, tm.Update = t1.Sub(t0), time.Since(t1)
	return len(outcomes), nil
}

// storeSets finds or stores the result set of each screened result (nil for a bridge that
// failed) and returns the sets' ids in the results' order. A set is known by its bridge and
// the digest of its rows; one with the same content stored before (by any run) is reused and
// nothing is written for it. Two transactions storing the same set at once store it once:
// the second one's insert waits on the unique key for the first to commit, then finds its
// row.
func storeSets(ctx context.Context, tx pgx.Tx, results []screening.Result) ([]*int64, error) {
	e := resultEncoders.Get().(*resultEncoder)
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
			keys = append(keys, key{r.BridgeID, e.setDigest(r), i})
		}
	}
	resultEncoders.Put(e)
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
	type found struct {
		id  int64
		new bool
	}
	byKey := map[string]found{}
	// A set found in conflict by the insert may be deleted by a prune that commits before the
	// share below locks it; the insert then stores it anew. Twice is enough: a prune deletes
	// only sets no run names, and once this transaction has stored or locked a set it stays.
	for try := 0; try < 3 && len(byKey) < len(keys); try++ {
		var missB []string
		var missD [][]byte
		for i := range bridges {
			if _, ok := byKey[bridges[i]+"\x00"+string(digests[i])]; !ok {
				missB, missD = append(missB, bridges[i]), append(missD, digests[i])
			}
		}
		stored, err := store.InsertResultSets(ctx, tx, missB, missD)
		if err != nil {
			return nil, err
		}
		for _, s := range stored {
			byKey[s.BridgeID+"\x00"+string(s.Digest)] = found{s.ID, true}
		}
		if len(byKey) == len(keys) {
			break
		}
		shared, err := store.ShareResultSets(ctx, tx, missB, missD)
		if err != nil {
			return nil, err
		}
		for _, s := range shared {
			if _, ok := byKey[s.BridgeID+"\x00"+string(s.Digest)]; !ok {
				byKey[s.BridgeID+"\x00"+string(s.Digest)] = found{s.ID, false}
			}
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

// copyResults copies the results' member_results and member_assessments rows under their
// sets' ids, one table after the other through one encoder's buffer. After an error the
// encoder is dropped, not pooled: when the connection breaks, pgconn can return before its
// sender has stopped reading it.
func copyResults(ctx context.Context, tx pgx.Tx, results []screening.Result, setIDs []int64) error {
	e := resultEncoders.Get().(*resultEncoder)
	if err := store.CopyMemberResults(ctx, tx, e.memberResults(results, setIDs)); err != nil {
		return err
	}
	if err := store.CopyMemberAssessments(ctx, tx, e.memberAssessments(results, setIDs)); err != nil {
		return err
	}
	if err := store.CopyCategoryResults(ctx, tx, e.categoryResults(results, setIDs)); err != nil {
		return err
	}
	resultEncoders.Put(e)
	return nil
}

// resultEncoder turns screening results into the rows of member_results and
// member_assessments and encodes them (store.CopyEncoder). Its rows and flags are scratch,
// valid while one row is encoded; its encoder's buffer holds the stream until the next call.
type resultEncoder struct {
	copy  store.CopyEncoder
	mr    store.MemberResult
	ma    store.MemberAssessment
	cr    store.CategoryResult
	flags []string
}

// resultEncoders keeps encoders, and their 1 to 2 MB buffers, from one job to the next.
var resultEncoders = sync.Pool{New: func() any { return new(resultEncoder) }}

// setDigest is the SHA-256 of a screened bridge's member rows, both tables, as they are
// written but with set id 0: equal digests, equal stored results.
func (e *resultEncoder) setDigest(r screening.Result) [sha256.Size]byte {
	e.copy.Reset()
	for i, m := range r.Members {
		e.memberResult(0, "existing", m, m.Existing, m.Assessment.Existing, memberE(r, i))
		e.memberResult(0, "proposed", m, m.Proposed, m.Assessment.Proposed, memberE(r, i))
	}
	for _, m := range r.Members {
		e.memberAssessment(0, m)
	}
	e.categoryRows(0, r)
	return sha256.Sum256(e.copy.Bytes())
}

// memberResults encodes the results' member_results rows, both scenarios of each member,
// result i under set setIDs[i].
func (e *resultEncoder) memberResults(results []screening.Result, setIDs []int64) []byte {
	e.copy.Begin()
	for i, r := range results {
		for k, m := range r.Members {
			e.memberResult(setIDs[i], "existing", m, m.Existing, m.Assessment.Existing, memberE(r, k))
			e.memberResult(setIDs[i], "proposed", m, m.Proposed, m.Assessment.Proposed, memberE(r, k))
		}
	}
	return e.copy.End()
}

// memberAssessments encodes the results' member_assessments rows, one a member, result i
// under set setIDs[i].
func (e *resultEncoder) memberAssessments(results []screening.Result, setIDs []int64) []byte {
	e.copy.Begin()
	for i, r := range results {
		for _, m := range r.Members {
			e.memberAssessment(setIDs[i], m)
		}
	}
	return e.copy.End()
}

// memberResult encodes a member's member_results row under one scenario. Its forces and
// dynamic factor are stored as they are, NaN and ±Inf included; a factor without a finite
// value, and the placement of an extreme with no train on the bridge, are NULL.
func (e *resultEncoder) memberResult(setID int64, scenario string, m screening.MemberResult, env screening.Envelope, rfs []rating.Factor, eRating float64) {
	r := &e.mr
	*r = store.MemberResult{SetID: setID, Scenario: scenario, Member: m.Label, Kind: string(m.Kind),
		DeadKN: m.Dead, LiveMaxKN: env.Max.Value, LiveMinKN: env.Min.Value, Impact: env.Impact,
		Truss: m.Truss, MaxCase: env.MaxCase.String(), MinCase: env.MinCase.String(), Dynamic: screening.DynamicText(m, env),
		MaxShare: env.MaxShare, MinShare: env.MinShare, ERating: finite(eRating)}
	for _, f := range rfs {
		if f.Sense == rating.Tension {
			r.RFTension = finite(f.RF)
		} else {
			r.RFCompression = finite(f.RF)
		}
		r.Basis = f.Basis
	}
	r.MaxTrain, r.MinTrain = env.Max.Train, env.Min.Train
	if x := env.Max; x.Loaded {
		r.MaxHeadM, r.MaxDirection, r.MaxFromM, r.MaxToM = finite(x.HeadM), x.Direction.String(), finite(x.LoadedFromM), finite(x.LoadedToM)
		r.MaxCount = pgtype.Int4{Int32: int32(x.Count), Valid: true}
	}
	if x := env.Min; x.Loaded {
		r.MinHeadM, r.MinDirection, r.MinFromM, r.MinToM = finite(x.HeadM), x.Direction.String(), finite(x.LoadedFromM), finite(x.LoadedToM)
		r.MinCount = pgtype.Int4{Int32: int32(x.Count), Valid: true}
	}
	e.copy.MemberResult(r)
}

// memberAssessment encodes a member's member_assessments row.
func (e *resultEncoder) memberAssessment(setID int64, m screening.MemberResult) {
	a := m.Assessment
	e.flags = e.flags[:0]
	for _, f := range a.Flags {
		e.flags = append(e.flags, string(f))
	}
	e.flags = appendFatigueFlags(e.flags, m.Fatigue)
	e.ma = store.MemberAssessment{SetID: setID, Member: m.Label, DemandIncrease: finite(a.DemandIncrease), Flags: e.flags,
		Fatigue: fatigueColumns(m.Fatigue)}
	if a.HasEx {
		e.ma.RFExisting = finite(a.WorstEx.RF)
	}
	if a.HasPr {
		e.ma.RFProposed = finite(a.WorstPr.RF)
		e.ma.SenseProposed = m.SenseName(a.WorstPr.Sense)
	}
	e.ma.Other = otherTrussColumns(m.Other)
	e.copy.MemberAssessment(&e.ma)
}

// outcome is what a screened bridge's run_bridges row records: its summary and result set,
// or why it failed.
func outcome(r screening.Result, hash string, set *int64) store.BridgeOutcome {
	o := store.BridgeOutcome{BridgeID: r.BridgeID, InputHash: hash, SetID: set}
	if r.Err != nil {
		o.Status, o.Error = "failed", r.Err.Error()
		return o
	}
	s := r.Summary
	o.Status = "done"
	noRocking := r.NoRocking
	o.NoRocking = &noRocking
	if s.Worst >= 0 {
		o.WorstMember = &r.Members[s.Worst].Label
	}
	o.RFExisting = rfOrNil(s.WorstEx, s.Worst >= 0 && !math.IsInf(s.WorstEx.RF, 0))
	o.RFProposed = rfOrNil(s.WorstPr, s.Worst >= 0)
	o.DemandIncrease, o.Headroom = num(s.DemandIncrease), num(s.Headroom)
	o.FlagCounts = map[string]int{}
	unrated := int32(s.Unrated)
	o.UnratedMembers = &unrated
	for _, f := range rating.Flags {
		if n := s.FlagCounts[f]; n > 0 {
			o.Flags = append(o.Flags, string(f))
			o.FlagCounts[string(f)] = n
		}
	}
	if n := r.Network; n != nil {
		o.Categories = append([]string{}, n.Highest...)
		o.ERating = num(n.ERating)
		if o.ERating != nil {
			o.EMember = &n.EMember
		}
	}
	fatigueOutcome(&o, r)
	if g := r.Governing; g != nil && g.Loaded {
		o.GoverningTrain, o.GoverningSense, o.GoverningDirection = g.Train, r.Members[s.Worst].SenseName(s.WorstPr.Sense), g.Direction.String()
		o.GoverningHeadM, o.GoverningFromM, o.GoverningToM = num(g.HeadM), num(g.LoadedFromM), num(g.LoadedToM)
	}
	o.GoverningCase = governingCase(r)
	return o
}

// finite is a nullable number that holds only a finite value: NaN and ±Inf, which mean "no
// value" in the screening results, are NULL.
func finite(v float64) pgtype.Float8 {
	return pgtype.Float8{Float64: v, Valid: !math.IsNaN(v) && !math.IsInf(v, 0)}
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

// governingCase is the loading case of the worst member's governing proposed extreme.
func governingCase(r screening.Result) string {
	w := r.Summary.Worst
	if w < 0 {
		return ""
	}
	p := r.Members[w].Proposed
	if r.Summary.WorstPr.Sense == rating.Compression {
		return p.MinCase.String()
	}
	return p.MaxCase.String()
}
