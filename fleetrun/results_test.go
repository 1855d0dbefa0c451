package fleetrun_test

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgtype"
	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/fleetrun"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// The reference for the result rows is the way writeResults wrote them before it encoded
// them itself: one []any a row, handed to pgx's CopyFrom (pgx.CopyFromRows), which encodes
// every value through its type map. These functions are that code as it was; its num and
// rfOrNil, which turn NaN and ±Inf into NULL, are still the package's (for run_bridges).

// referenceRows builds the member_results and member_assessments rows of results, as []any,
// result i under set setIDs[i].
func referenceRows(setIDs []int64, results []screening.Result) (mr, ma [][]any) {
	for i, r := range results {
		for k, m := range r.Members {
			e := math.NaN()
			if r.Network != nil {
				e = r.Network.MemberE[k]
			}
			mr = append(mr, append(memberResultRow(setIDs[i], "existing", m, m.Existing, m.Assessment.Existing), fleetrun.Num(e)))
			mr = append(mr, append(memberResultRow(setIDs[i], "proposed", m, m.Proposed, m.Assessment.Proposed), fleetrun.Num(e)))
			a := m.Assessment
			flags := make([]string, len(a.Flags))
			for i, f := range a.Flags {
				flags[i] = string(f)
			}
			fat := fatigueRow(m.Fatigue)
			if m.Fatigue != nil {
				for _, f := range m.Fatigue.Flags {
					flags = append(flags, string(f))
				}
			}
			sense := ""
			if a.HasPr {
				sense = a.WorstPr.Sense.String()
			}
			ma = append(ma, append([]any{setIDs[i], m.Label, fleetrun.RFOrNil(a.WorstEx, a.HasEx), fleetrun.RFOrNil(a.WorstPr, a.HasPr),
				sense, fleetrun.Num(a.DemandIncrease), flags}, append(append(fat, otherRow(m.Other)...), sectionModulusCell(m.Fatigue))...))
		}
	}
	return mr, ma
}

// categoryRows builds the category_results rows of results, as []any, straight from the
// screening results (the reference the encoder is compared with).
func categoryRows(setIDs []int64, results []screening.Result) (cr [][]any) {
	for i, r := range results {
		if r.Network == nil {
			continue
		}
		for _, c := range r.Network.Categories {
			status := map[bool]string{true: "passes", false: "fails"}[c.Pass]
			if c.Carried {
				status = "carried"
			}
			cr = append(cr, []any{setIDs[i], c.Category, status, fleetrun.Num(c.RF), c.Member, string(c.Limit)})
		}
	}
	return cr
}

// fatigueRow is a member's fatigue columns as the reference rows hold them: "" and NULLs
// without a check, the status alone without data, numbers without a finite value NULL, the
// end year NULL for 0 (never).
func fatigueRow(r *fatigue.Result) []any {
	row := []any{"", nil, nil, nil, nil, nil, nil, nil, nil, nil, nil, ""}
	if r == nil {
		return row
	}
	row[0] = string(r.Status)
	if r.Status == fatigue.NoData {
		return row
	}
	var end *int32
	if r.EndYear != 0 {
		y := int32(r.EndYear)
		end = &y
	}
	area := fleetrun.Num(r.AreaMM2)
	if r.SectionModulusMM3 > 0 { // a floor element: no area
		area = nil
	}
	return []any{string(r.Status), fleetrun.Num(r.CategoryMPa), area, fleetrun.Num(r.PerYearExisting),
		fleetrun.Num(r.PerYearProposed), fleetrun.Num(r.Ratio), fleetrun.Num(r.ToDate), fleetrun.Num(r.RemainingYears), end,
		fleetrun.Num(r.MaxRangeExistingMPa), fleetrun.Num(r.MaxRangeProposedMPa), r.Governing}
}

// sectionModulusCell is a floor element's section modulus as member_assessments stores it
// (migration 018): NULL for a truss member and where no check was made.
func sectionModulusCell(r *fatigue.Result) *float64 {
	if r == nil || r.Status == fatigue.NoData || !(r.SectionModulusMM3 > 0) {
		return nil
	}
	return fleetrun.Num(r.SectionModulusMM3)
}

func memberResultRow(setID int64, scenario string, m screening.MemberResult, e screening.Envelope, rfs []rating.Factor) []any {
	var rt, rc *float64
	basis := ""
	for _, f := range rfs {
		v := fleetrun.Num(f.RF)
		if f.Sense == rating.Tension {
			rt = v
		} else {
			rc = v
		}
		basis = f.Basis
	}
	return []any{setID, scenario, m.Label, string(m.Kind), m.Dead, e.Max.Value, e.Min.Value, e.Impact, rt, rc, basis,
		e.Max.Train, placementNum(e.Max.Loaded, e.Max.HeadM), dirText(e.Max.Loaded, e.Max.Direction.String()),
		placementNum(e.Max.Loaded, e.Max.LoadedFromM), placementNum(e.Max.Loaded, e.Max.LoadedToM),
		e.Min.Train, placementNum(e.Min.Loaded, e.Min.HeadM), dirText(e.Min.Loaded, e.Min.Direction.String()),
		placementNum(e.Min.Loaded, e.Min.LoadedFromM), placementNum(e.Min.Loaded, e.Min.LoadedToM),
		countOf(e.Max), countOf(e.Min), m.Truss, e.MaxCase.String(), e.MinCase.String(), screening.DynamicText(m, e),
		e.MaxShare, e.MinShare}
}

// setIDs gives n set ids above 32 bits, as a long-lived database reaches.
func setIDs(n int) []int64 {
	ids := make([]int64, n)
	for i := range ids {
		ids[i] = 1<<40 + 7 + int64(i)
	}
	return ids
}

func countOf(e screening.Extreme) *int32 {
	if !e.Loaded {
		return nil
	}
	n := int32(e.Count)
	return &n
}

func placementNum(loaded bool, v float64) *float64 {
	if !loaded {
		return nil
	}
	return fleetrun.Num(v)
}

func dirText(loaded bool, d string) string {
	if !loaded {
		return ""
	}
	return d
}

// Type OIDs of the result tables' columns, from PostgreSQL's pg_type catalogue, in the
// order of the column lists: what pgx's CopyFrom learns by describing the table.
var (
	memberResultOIDs = []uint32{pgtype.Int8OID, pgtype.TextOID, pgtype.TextOID, pgtype.TextOID,
		pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID,
		pgtype.TextOID, pgtype.TextOID, pgtype.Float8OID, pgtype.TextOID, pgtype.Float8OID, pgtype.Float8OID,
		pgtype.TextOID, pgtype.Float8OID, pgtype.TextOID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Int4OID, pgtype.Int4OID,
		pgtype.TextOID, pgtype.TextOID, pgtype.TextOID, pgtype.TextOID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID}
	categoryResultOIDs   = []uint32{pgtype.Int8OID, pgtype.TextOID, pgtype.TextOID, pgtype.Float8OID, pgtype.TextOID, pgtype.TextOID}
	memberAssessmentOIDs = []uint32{pgtype.Int8OID, pgtype.TextOID, pgtype.Float8OID, pgtype.Float8OID,
		pgtype.TextOID, pgtype.Float8OID, pgtype.TextArrayOID,
		// the fatigue columns (migration 016)
		pgtype.TextOID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID, pgtype.Float8OID,
		pgtype.Float8OID, pgtype.Float8OID, pgtype.Int4OID, pgtype.Float8OID, pgtype.Float8OID, pgtype.TextOID,
		// the other truss (migration 017)
		pgtype.TextOID, pgtype.Float8OID, pgtype.Float8OID,
		// a floor element's section modulus (migration 018)
		pgtype.Float8OID}
)

// pgxCopyStream encodes rows as pgx v5's CopyFrom does before it sends them (copy_from.go,
// copyFrom.run and buildCopyBuf; values.go, encodeCopyValue): the header, then each row's
// field count and each value through pgtype.Map.Encode in binary behind its length, -1 for
// NULL. pgx sends no trailer; the server takes the end of the data as the end.
func pgxCopyStream(buf []byte, m *pgtype.Map, oids []uint32, rows [][]any) ([]byte, error) {
	buf = append(buf[:0], "PGCOPY\n\377\r\n\000"...)
	buf = append(buf, 0, 0, 0, 0, 0, 0, 0, 0)
	for _, row := range rows {
		buf = append(buf, byte(len(row)>>8), byte(len(row)))
		for i, v := range row {
			at := len(buf)
			buf = append(buf, 0xff, 0xff, 0xff, 0xff)
			out, err := m.Encode(oids[i], pgtype.BinaryFormatCode, v, buf)
			if err != nil {
				return nil, fmt.Errorf("column %d, value %v: %w", i, v, err)
			}
			if out != nil {
				buf = out
				n := len(buf) - at - 4
				buf[at], buf[at+1], buf[at+2], buf[at+3] = byte(n>>24), byte(n>>16), byte(n>>8), byte(n)
			}
		}
	}
	return buf, nil
}

// loadedAt is an extreme with a train on the bridge.
func loadedAt(value float64, train string, dir envelope.Direction, headM, fromM, toM float64, count int) screening.Extreme {
	return screening.Extreme{Value: value, Train: train, Placement: envelope.Placement{Loaded: true, Direction: dir,
		HeadM: headM, Count: count, LoadedFromM: fromM, LoadedToM: toM}}
}

// edgeResults are invented results that reach every special case of the rows: NaN and ±Inf
// stored as they are (forces) and as NULL (factors, placements), extremes with no train,
// members with no factors, empty and non-empty flags, text beyond ASCII, a failed bridge
// (no rows), and a bridge not pending in the run (testRunID's setup marks it done).
func edgeResults() []screening.Result {
	nan, inf := math.NaN(), math.Inf(1)
	negZero := math.Copysign(0, -1)
	unloaded := screening.Extreme{Train: "Ærøvik Güterzug"}
	return []screening.Result{
		{BridgeID: "ØSBY-001", Members: []screening.MemberResult{
			{Label: "U1-U2", Kind: truss.TopChord, Dead: -812.5,
				Existing: screening.Envelope{Max: loadedAt(0, "Ærøvik Güterzug", envelope.LeftToRight, 0, 0, 0, 0),
					Min: loadedAt(-1402.25, "Ærøvik Güterzug", envelope.RightToLeft, 61.5, 0, 48, 17), Impact: 1.21},
				Proposed: screening.Envelope{Max: unloaded, Min: loadedAt(-1688, "急行「霧島」", envelope.LeftToRight, 88.4, 3.5, 48, 60), Impact: 1.21},
				Assessment: rating.Assessment{
					Existing: []rating.Factor{{Sense: rating.Compression, RF: 1.43, Basis: rating.FromCapacity}},
					Proposed: []rating.Factor{{Sense: rating.Compression, RF: 0.97, Basis: rating.FromCapacity}},
					WorstEx:  rating.Factor{Sense: rating.Compression, RF: 1.43}, HasEx: true,
					WorstPr: rating.Factor{Sense: rating.Compression, RF: 0.97}, HasPr: true,
					DemandIncrease: 0.2, Flags: []rating.Flag{rating.Exceeds, rating.Worse}},
				Other: &screening.OtherTruss{Truss: "B", RFExisting: nan, RFProposed: 1.125, HasEx: true, HasPr: true}},
			{Label: "L0–U1", Kind: truss.EndPost, Dead: nan,
				Existing: screening.Envelope{Max: loadedAt(inf, "Brøgg shuttle ✓", envelope.RightToLeft, nan, -inf, inf, 3),
					Min: screening.Extreme{Value: -inf}, Impact: nan},
				Proposed: screening.Envelope{Max: loadedAt(negZero, "", envelope.LeftToRight, -inf, nan, 12, 0),
					Min: unloaded, Impact: inf},
				Assessment: rating.Assessment{
					Existing: []rating.Factor{{Sense: rating.Tension, RF: inf, Basis: rating.FromCapacity},
						{Sense: rating.Compression, RF: nan, Basis: rating.FromCapacity}},
					Proposed: []rating.Factor{{Sense: rating.Tension, RF: -inf, Basis: rating.FromRatio}},
					WorstPr:  rating.Factor{Sense: rating.Tension, RF: inf}, HasPr: true}},
			{Label: "Ω3-Ω4", Kind: truss.Vertical, Dead: negZero,
				Assessment: rating.Assessment{WorstEx: rating.Factor{RF: nan}, HasEx: true, DemandIncrease: negZero,
					Flags: []rating.Flag{}},
				Fatigue: &fatigue.Result{Status: fatigue.Damaged, CategoryMPa: 71, AreaMM2: 12500, PerYearExisting: 1e-3,
					PerYearProposed: 3.2e-3, Ratio: 3.2, ToDate: 0.21, RemainingYears: 246.875, EndYear: 2272,
					MaxRangeExistingMPa: 61.5, MaxRangeProposedMPa: 80.25, Governing: "Ærøvik Güterzug",
					Flags: []fatigue.Flag{fatigue.FlagRise}}},
		}},
		{BridgeID: "FAIL-002", Err: errors.New("truss: a Pratt truss needs an even number of panels, got 7")},
		{BridgeID: "Þórsá-003", Members: []screening.MemberResult{
			{Label: "L3-U4", Kind: truss.Diagonal, Dead: 1e-300,
				Existing: screening.Envelope{Max: loadedAt(math.MaxFloat64, "Zenn mineral \"heavy\", 40 t", envelope.RightToLeft, 1e9, -1e-9, 1e-9, math.MaxInt32),
					Min: loadedAt(-math.SmallestNonzeroFloat64, "tab\there", envelope.LeftToRight, 5, 5, 5, 1), Impact: 1},
				Assessment: rating.Assessment{
					Existing: []rating.Factor{{Sense: rating.Tension, RF: 2.5, Basis: rating.FromRatio}},
					WorstEx:  rating.Factor{Sense: rating.Tension, RF: 2.5}, HasEx: true,
					WorstPr: rating.Factor{Sense: rating.Compression, RF: 1.05}, HasPr: true,
					DemandIncrease: -0.125, Flags: []rating.Flag{"naïve, {braced} \"quoted\" \\ flag", rating.NoCapacity, ""}},
				Fatigue: &fatigue.Result{Status: fatigue.BelowCutOff, CategoryMPa: 90, AreaMM2: 1e-300, RemainingYears: inf, Ratio: nan}},
		}},
		{BridgeID: "DONE-004", Members: []screening.MemberResult{{Label: "U0-U1", Kind: truss.TopChord, Dead: 1},
			{Label: "S1-2:M", Kind: "stringer", Effect: "moment", Dead: 9,
				Fatigue: &fatigue.Result{Status: fatigue.Damaged, CategoryMPa: 71, SectionModulusMM3: 3.15e6, PerYearExisting: 0.02,
					PerYearProposed: 0.05, Ratio: 2.5, ToDate: 1.4, RemainingYears: 0, EndYear: 2026, MaxRangeExistingMPa: 88.1,
					MaxRangeProposedMPa: 101.4, Governing: "Northmoor freight proposed", Flags: []fatigue.Flag{fatigue.FlagLife, fatigue.FlagRise}}}}},
	}
}

// jobResults screens n invented bridges under the example trains, as one job of a run does:
// Pratt, Howe, Warren and Warren-with-verticals spans of 10 to 16 panels, two in three with
// capacities (some flagged), the rest with none.
func jobResults(tb testing.TB, n int) []screening.Result {
	tb.Helper()
	var trains []*traffic.Train
	for _, spec := range []string{"northmoor-freight-today", "eastfell-multiple-unit", "northmoor-freight-proposed", "lm71:alpha=1"} {
		t, err := traffic.ParseSpec(spec, configs.Trains())
		if err != nil {
			tb.Fatal(err)
		}
		trains = append(trains, t)
	}
	ex, err := screening.NewScenario("existing", trains[:2])
	if err != nil {
		tb.Fatal(err)
	}
	pr, err := screening.NewScenario("proposed", trains[2:])
	if err != nil {
		tb.Fatal(err)
	}
	dyn, err := traffic.ParseDynamic("phi3")
	if err != nil {
		tb.Fatal(err)
	}
	set := &screening.Settings{Existing: ex, Proposed: pr, References: map[string]*envelope.Load{}, Dynamic: dyn,
		Method: rating.WorkingStress, Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2}}
	if set.Network, err = screening.NewNetworkTrains(); err != nil {
		tb.Fatal(err)
	}
	set.ShareTrains()
	types := []string{"pratt", "howe", "warren", "warren-verticals"}
	bridges := make([]screening.Bridge, n)
	for i := range bridges {
		panels := 10 + 2*(i%4)
		span := float64(panels) * (5 + 0.1*float64(i%7))
		bridges[i] = screening.Bridge{ID: fmt.Sprintf("JOB-%03d", i+1),
			Truss:      truss.Params{Type: types[i%len(types)], SpanM: span, Panels: panels, DepthM: span / 8, Deck: "through"},
			TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 12 + 0.15*span, Members: map[string]rating.Member{}}
	}
	// A first pass names the members; the second gives two bridges in three capacities.
	results, err := screening.ScreenAll(context.Background(), bridges, set, 2)
	if err != nil {
		tb.Fatal(err)
	}
	for i, r := range results {
		if i%3 == 2 {
			continue
		}
		for j, m := range r.Members {
			bridges[i].Members[m.Label] = rating.Member{CapacityTension: 1800 + 40*float64(j%9), CapacityCompression: 1400 + 35*float64(j%7),
				ConditionFactor: 0.9}
		}
	}
	if results, err = screening.ScreenAll(context.Background(), bridges, set, 2); err != nil {
		tb.Fatal(err)
	}
	return results
}

// asPostgresSendsEmptyArrays replaces every empty text array in rows by an array of no
// dimensions, which pgx then encodes as PostgreSQL's own array_send does (arrayfuncs.c): pgx
// gives an empty slice one dimension of length 0. Both forms are the empty array '{}' to the
// server (TestWriteResultsMatchesPgxCopy stores the one against the other).
func asPostgresSendsEmptyArrays(rows [][]any) {
	for _, row := range rows {
		for i, v := range row {
			if s, ok := v.([]string); ok && len(s) == 0 {
				row[i] = pgtype.Array[string]{Dims: []pgtype.ArrayDimension{}, Valid: true}
			}
		}
	}
}

// TestCopyEncoderMatchesPgxBytes: the streams writeResults sends are byte for byte the ones
// pgx builds from the same rows (reference: pgx v5's own binary COPY encoding, pgxCopyStream),
// but for the trailer, which pgx leaves out, and the form of an empty array (above). No
// server needed.
func TestCopyEncoderMatchesPgxBytes(t *testing.T) {
	results := append(edgeResults(), jobResults(t, 8)...)
	ids := setIDs(len(results))
	mr, ma := referenceRows(ids, results)
	asPostgresSendsEmptyArrays(ma)
	m := pgtype.NewMap()
	for _, c := range []struct {
		table string
		got   []byte
		oids  []uint32
		rows  [][]any
	}{
		{"member_results", fleetrun.EncodeMemberResults(nil, ids, results), memberResultOIDs, mr},
		{"member_assessments", fleetrun.EncodeMemberAssessments(nil, ids, results), memberAssessmentOIDs, ma},
		{"category_results", fleetrun.EncodeCategoryResults(nil, ids, results), categoryResultOIDs, categoryRows(ids, results)},
	} {
		want, err := pgxCopyStream(nil, m, c.oids, c.rows)
		if err != nil {
			t.Fatalf("%s: %v", c.table, err)
		}
		// PostgreSQL's binary COPY format (the COPY reference page, "Binary Format"): the
		// file trailer is a 16-bit word holding -1.
		want = append(want, 0xff, 0xff)
		if !bytes.Equal(c.got, want) {
			i := 0
			for i < min(len(c.got), len(want)) && c.got[i] == want[i] {
				i++
			}
			t.Errorf("%s: %d bytes, pgx %d; first difference at byte %d: % x, pgx % x", c.table, len(c.got), len(want), i,
				c.got[i:min(i+16, len(c.got))], want[i:min(i+16, len(want))])
		}
	}
}

// TestWriteResultsMatchesPgxCopy: writeResults stores exactly the rows that pgx's CopyFrom
// stores from the []any rows (reference: pgx v5's own binary COPY encoding, through the
// same server), compared in SQL both ways with EXCEPT ALL and by count: NaN and ±Inf, NULLs,
// empty and non-empty flags, text beyond ASCII; no rows for a failed bridge or one that is
// not pending.
func TestWriteResultsMatchesPgxCopy(t *testing.T) {
	ctx := context.Background()
	db := pgtest.DB(t)
	const runID = 1<<40 + 7
	results := append(edgeResults(), jobResults(t, 12)...)
	if _, err := db.Pool.Exec(ctx, `INSERT INTO runs (id, program_version, config, config_hash, trains)
		OVERRIDING SYSTEM VALUE VALUES ($1, 'test', '{}', '', '[]')`, runID); err != nil {
		t.Fatal(err)
	}
	var pending []screening.Result
	for _, r := range results {
		status := "pending"
		if r.BridgeID == "DONE-004" {
			status = "done"
		} else {
			pending = append(pending, r)
		}
		if _, err := db.Pool.Exec(ctx, `INSERT INTO run_bridges (run_id, bridge_id, input_hash, status)
			VALUES ($1, $2, '', $3)`, runID, r.BridgeID, status); err != nil {
			t.Fatal(err)
		}
	}
	for _, table := range []string{"member_results", "member_assessments", "category_results"} {
		if _, err := db.Pool.Exec(ctx, fmt.Sprintf("CREATE TABLE pgx_%s (LIKE %[1]s INCLUDING ALL)", table)); err != nil {
			t.Fatal(err)
		}
	}
	var written int
	err := pgx.BeginFunc(ctx, db.Pool, func(tx pgx.Tx) error {
		var err error
		written, err = fleetrun.WriteResults(ctx, tx, runID, results, nil, &fleetrun.ChunkTiming{})
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	if written != len(pending) {
		t.Errorf("writeResults wrote %d bridges, want the %d pending", written, len(pending))
	}
	// The sets writeResults stored, by bridge: the reference rows go under the same ids.
	ids := make([]int64, len(pending))
	for i, r := range pending {
		var set *int64
		if err := db.Pool.QueryRow(ctx, `SELECT set_id FROM run_bridges WHERE run_id = $1 AND bridge_id = $2`,
			runID, r.BridgeID).Scan(&set); err != nil {
			t.Fatal(err)
		}
		if set != nil {
			ids[i] = *set
		} else if r.Err == nil {
			t.Errorf("bridge %s screened but has no result set", r.BridgeID)
		}
	}
	mr, ma := referenceRows(ids, pending)
	cr := categoryRows(ids, pending)
	err = pgx.BeginFunc(ctx, db.Pool, func(tx pgx.Tx) error {
		if _, err := tx.CopyFrom(ctx, pgx.Identifier{"pgx_member_results"}, store.MemberResultColumns, pgx.CopyFromRows(mr)); err != nil {
			return err
		}
		if _, err := tx.CopyFrom(ctx, pgx.Identifier{"pgx_category_results"}, store.CategoryResultColumns, pgx.CopyFromRows(cr)); err != nil {
			return err
		}
		_, err := tx.CopyFrom(ctx, pgx.Identifier{"pgx_member_assessments"}, store.MemberAssessmentColumns, pgx.CopyFromRows(ma))
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		table string
		rows  int
	}{{"member_results", len(mr)}, {"member_assessments", len(ma)}, {"category_results", len(cr)}} {
		var onlyNew, onlyPgx, n, nPgx int
		err := db.Pool.QueryRow(ctx, fmt.Sprintf(`SELECT
			(SELECT count(*) FROM (TABLE %[1]s EXCEPT ALL TABLE pgx_%[1]s) x),
			(SELECT count(*) FROM (TABLE pgx_%[1]s EXCEPT ALL TABLE %[1]s) x),
			(SELECT count(*) FROM %[1]s), (SELECT count(*) FROM pgx_%[1]s)`, c.table)).Scan(&onlyNew, &onlyPgx, &n, &nPgx)
		if err != nil {
			t.Fatal(err)
		}
		// Reference: the rows pgx's CopyFrom stored from the same results.
		if onlyNew != 0 || onlyPgx != 0 || n != nPgx || n != c.rows {
			t.Errorf("%s: %d rows, pgx %d (%d built); %d only in ours, %d only in pgx's", c.table, n, nPgx, c.rows, onlyNew, onlyPgx)
		}
	}
	// The special cases are in the rows compared, not lost on the way (common practice: a
	// comparison of two empty sets proves nothing).
	var nanDead, nullRF, noTrain, emptyFlags, wide int
	err = db.Pool.QueryRow(ctx, `SELECT
		(SELECT count(*) FROM member_results WHERE dead_kn = 'NaN'),
		(SELECT count(*) FROM member_results WHERE rf_tension IS NULL AND rf_compression IS NULL),
		(SELECT count(*) FROM member_results WHERE max_count IS NULL AND max_direction = ''),
		(SELECT count(*) FROM member_assessments WHERE flags = '{}'),
		(SELECT count(*) FROM member_results WHERE member = 'Ω3-Ω4' OR max_train LIKE '%霧島%')`).
		Scan(&nanDead, &nullRF, &noTrain, &emptyFlags, &wide)
	if err != nil {
		t.Fatal(err)
	}
	if nanDead == 0 || nullRF == 0 || noTrain == 0 || emptyFlags == 0 || wide == 0 {
		t.Errorf("special cases stored: NaN dead load %d, no factor %d, no train %d, empty flags %d, non-ASCII %d; want each > 0",
			nanDead, nullRF, noTrain, emptyFlags, wide)
	}
	// Each screened bridge's row holds its network outcome as screened (nil categories for a
	// result without one, an empty list for one that carries none).
	rated := 0
	for _, r := range pending {
		if r.Err != nil {
			continue
		}
		var cats []string
		var e *float64
		if err := db.Pool.QueryRow(ctx, `SELECT categories, e_rating FROM run_bridges WHERE run_id = $1 AND bridge_id = $2`,
			runID, r.BridgeID).Scan(&cats, &e); err != nil {
			t.Fatal(err)
		}
		if r.Network == nil {
			if cats != nil || e != nil {
				t.Errorf("%s: categories %v, E rating %v without a network outcome", r.BridgeID, cats, e)
			}
			continue
		}
		rated++
		want := fleetrun.Num(r.Network.ERating)
		if strings.Join(cats, " ") != strings.Join(r.Network.Highest, " ") || cats == nil || (e == nil) != (want == nil) || (e != nil && *e != *want) {
			t.Errorf("%s: categories %v, E rating %v; screened %v, %v", r.BridgeID, cats, e, r.Network.Highest, r.Network.ERating)
		}
	}
	if rated == 0 {
		t.Error("no bridge with a network outcome among those written")
	}
}

// BenchmarkEncodeResults encodes the result rows of one job, 50 bridges, into a reused
// buffer: pgx-rows as writeResults did before (a []any a row, encoded by pgx's type map as
// its CopyFrom does, without its pipe and goroutine), binary-copy as it does now.
func BenchmarkEncodeResults(b *testing.B) {
	results := jobResults(b, 50)
	ids := setIDs(len(results))
	var buf []byte
	b.Run("pgx-rows", func(b *testing.B) {
		m := pgtype.NewMap()
		b.ReportAllocs()
		for b.Loop() {
			mr, ma := referenceRows(ids, results)
			var err error
			if buf, err = pgxCopyStream(buf, m, memberResultOIDs, mr); err != nil {
				b.Fatal(err)
			}
			if buf, err = pgxCopyStream(buf, m, memberAssessmentOIDs, ma); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("binary-copy", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			buf = fleetrun.EncodeMemberResults(buf, ids, results)
			buf = fleetrun.EncodeMemberAssessments(buf, ids, results)
		}
	})
	mr, ma := referenceRows(ids, results)
	b.Logf("one job: %d bridges, %d member_results and %d member_assessments rows, %d + %d bytes", len(results), len(mr), len(ma),
		len(fleetrun.EncodeMemberResults(nil, ids, results)), len(fleetrun.EncodeMemberAssessments(nil, ids, results)))
}

// otherRow is the other-truss columns of a member_assessments row, built from the screening
// result: "" and NULLs where one truss was screened.
func otherRow(o *screening.OtherTruss) []any {
	if o == nil {
		return []any{"", nil, nil}
	}
	var ex, pr *float64
	if o.HasEx {
		ex = fleetrun.Num(o.RFExisting)
	}
	if o.HasPr {
		pr = fleetrun.Num(o.RFProposed)
	}
	return []any{o.Truss, ex, pr}
}
