package report

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/internal/csvtest"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// The helpers here screen small invented bridges of the fictional Northmoor & Eastfell
// Railway with the real screening code and turn the results into the report model, the way
// the store does for a run.

// invented is one invented bridge with the inventory text the report shows.
type invented struct {
	screening.Bridge
	Name, Line    string
	ChainageKm    float64
	LastInspected string
}

// fixture is a screened set of bridges in the report model.
type fixture struct {
	Run     Run
	Rows    []BridgeRow
	Bridges map[string]Bridge
	// Inputs keeps what was screened, for checks against it.
	Inputs   map[string]invented
	Settings *screening.Settings
}

func (f *fixture) bridge(id string) (Bridge, error) {
	b, ok := f.Bridges[id]
	if !ok {
		return Bridge{}, fmt.Errorf("no bridge %q", id)
	}
	return b, nil
}

// demoTrains are the default configuration's scenarios (configs/default.yaml).
var demoTrains = map[string][]string{
	"existing": {"northmoor-freight-today", "eastfell-multiple-unit"},
	"proposed": {"northmoor-freight-proposed", "eastfell-multiple-unit"},
}

func parseTrain(t testing.TB, spec string) *traffic.Train {
	t.Helper()
	tr, err := traffic.ParseSpec(spec, configs.Trains())
	if err != nil {
		t.Fatal(err)
	}
	return tr
}

// screenFleet screens the bridges with the demo scenarios (phi3, working stress, thresholds
// 1.00 / 1.10 / 20 %) and converts the results; refs are extra reference trains for stored
// rating factors.
func screenFleet(t testing.TB, bridges []invented, refs ...*traffic.Train) *fixture {
	t.Helper()
	byName := map[string]*traffic.Train{}
	sc := map[string]screening.Scenario{}
	for _, name := range []string{"existing", "proposed"} {
		var trains []*traffic.Train
		for _, spec := range demoTrains[name] {
			tr := parseTrain(t, spec)
			byName[tr.Name], byName[spec] = tr, tr
			trains = append(trains, tr)
		}
		s, err := screening.NewScenario(name, trains)
		if err != nil {
			t.Fatal(err)
		}
		sc[name] = s
	}
	set := &screening.Settings{
		Existing: sc["existing"], Proposed: sc["proposed"],
		References: map[string]*envelope.Load{},
		Dynamic:    traffic.Dynamic{Kind: traffic.Phi3},
		Method:     rating.WorkingStress,
		Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.2, ReversalFraction: 0.1},
	}
	var err error
	if set.Network, err = screening.NewNetworkTrains(); err != nil {
		t.Fatal(err)
	}
	for _, r := range refs {
		ld, err := envelope.Prepare(r)
		if err != nil {
			t.Fatal(err)
		}
		set.References[r.Name] = ld
	}
	f := &fixture{Bridges: map[string]Bridge{}, Inputs: map[string]invented{}, Settings: set}
	f.Run = Run{
		ID: 7, Status: "completed", ProgramVersion: "dev",
		StartedAt:  time.Date(2031, 3, 4, 1, 0, 0, 0, time.UTC),
		FinishedAt: time.Date(2031, 3, 4, 1, 2, 0, 0, time.UTC),
		ConfigHash: "c0ffee12", Scenarios: demoTrains, Dynamic: "phi3", Method: "working-stress",
		Factors: rating.WorkingStress, Trains: byName,
		Flag: 1, Review: 1.1, WorseFraction: 0.2, ReversalFraction: 0.1, FlagCounts: map[string]int{},
	}
	results := make([]screening.Result, len(bridges))
	for i, b := range bridges {
		results[i] = screening.ScreenBridge(b.Bridge, set)
		f.Inputs[b.ID] = b
	}
	order := rating.RankOrder(len(bridges), func(i int) rating.Bridge {
		if results[i].Err != nil {
			return rating.Bridge{Worst: -1}
		}
		return results[i].Summary
	})
	rank := 0
	for _, i := range order {
		b, res := bridges[i], results[i]
		row, detail := convert(b, res, byName)
		if res.Err == nil {
			rank++
			row.Rank = rank
		} else {
			f.Run.BridgesFailed++
		}
		if len(row.Flags) > 0 {
			f.Run.BridgesFlagged++
		}
		for k, n := range row.FlagCounts {
			f.Run.FlagCounts[k] += n
		}
		f.Rows = append(f.Rows, row)
		f.Bridges[b.ID] = detail
	}
	f.Run.BridgesTotal = len(bridges)
	return f
}

func convert(b invented, res screening.Result, trains map[string]*traffic.Train) (BridgeRow, Bridge) {
	row := BridgeRow{
		BridgeID: b.ID, Name: b.Name, Line: b.Line, ChainageKm: &b.ChainageKm,
		TrussType: b.Truss.Type, SpanM: b.Truss.SpanM, Panels: b.Truss.Panels,
		LastInspected: b.LastInspected, Status: "done", FlagCounts: map[string]int{},
	}
	d := Bridge{Truss: b.Truss, TrussShare: b.TrussShare, Tracks: b.Tracks, DeadLoadKNPerM: b.DeadLoadKNPerM,
		Section: Section{TrussSpacingM: b.TrussSpacingM, TrackOffsetsM: b.TrackOffsetsM, TrussWeightKNPerM: b.TrussWeightKNPerM,
			LineSpeedKmh: b.LineSpeedKmh, FirstFrequencyHz: b.FirstFrequencyHz}}
	if res.Err != nil {
		row.Status, row.Error = "failed", res.Err.Error()
		d.Row = row
		return row, d
	}
	seen := map[rating.Flag]bool{}
	for _, m := range res.Members {
		for _, fl := range m.Assessment.Flags {
			seen[fl] = true
		}
		d.Members = append(d.Members, memberOf(m, b.Members[m.Label], trains))
	}
	for _, fl := range rating.Flags {
		if seen[fl] {
			row.Flags = append(row.Flags, string(fl))
		}
	}
	for fl, n := range res.Summary.FlagCounts {
		row.FlagCounts[string(fl)] = n
	}
	s := res.Summary
	row.DemandIncrease, row.Unrated = s.DemandIncrease, s.Unrated
	if s.Worst >= 0 {
		row.WorstMember = res.Members[s.Worst].Label
		row.RFProposed = ptr(s.WorstPr.RF)
		row.Headroom = ptr(s.Headroom)
		if !math.IsInf(s.WorstEx.RF, 0) && s.WorstEx.RF != 0 {
			row.RFExisting = ptr(s.WorstEx.RF)
			row.Change = ptr(s.WorstPr.RF/s.WorstEx.RF - 1)
		}
		row.GoverningSense = s.WorstPr.Sense.String()
	}
	if n := res.Network; n != nil {
		row.Categories = append([]string{}, n.Highest...)
		if !math.IsNaN(n.ERating) {
			row.ERating, row.EMember = ptr(n.ERating), n.EMember
		}
	}
	row.NoRocking = res.NoRocking
	if s.Worst >= 0 {
		row.GoverningCase = res.Members[s.Worst].Proposed.MaxCase.String()
		if s.WorstPr.Sense == rating.Compression {
			row.GoverningCase = res.Members[s.Worst].Proposed.MinCase.String()
		}
	}
	if g := res.Governing; g != nil {
		row.GoverningTrain, row.GoverningDirection = g.Train, g.Direction.String()
		row.GoverningHeadM, row.GoverningFromM, row.GoverningToM = ptr(g.HeadM), ptr(g.LoadedFromM), ptr(g.LoadedToM)
	}
	d.Row = row
	return row, d
}

func memberOf(m screening.MemberResult, inv rating.Member, trains map[string]*traffic.Train) Member {
	a := m.Assessment
	out := Member{Label: m.Label, Kind: string(m.Kind), DeadKN: m.Dead, ConditionFactor: inv.ConditionFactor, Truss: m.Truss}
	for _, fl := range a.Flags {
		out.Flags = append(out.Flags, string(fl))
	}
	if a.HasEx {
		out.RFExisting = ptr(a.WorstEx.RF)
	}
	if a.HasPr {
		out.RFProposed = ptr(a.WorstPr.RF)
		out.SenseProposed = a.WorstPr.Sense.String()
	}
	if inv.HasCapacity(rating.Tension) {
		out.CapacityTensionKN = ptr(inv.CapacityTension)
	}
	if inv.HasCapacity(rating.Compression) {
		out.CapacityCompressionKN = ptr(inv.CapacityCompression)
	}
	if inv.HasStoredRating() {
		out.StoredRF, out.ReferenceTrain = ptr(inv.RatingFactor), inv.ReferenceTrain
	}
	out.Existing = scenarioOf(m.Existing, a.Existing, trains)
	out.Proposed = scenarioOf(m.Proposed, a.Proposed, trains)
	if o := m.Other; o != nil {
		out.Other = &OtherTruss{Truss: o.Truss}
		if o.HasEx {
			out.Other.RFExisting = ptr(o.RFExisting)
		}
		if o.HasPr {
			out.Other.RFProposed = ptr(o.RFProposed)
		}
	}
	for _, s := range []struct {
		out *Scenario
		e   screening.Envelope
	}{{&out.Existing, m.Existing}, {&out.Proposed, m.Proposed}} {
		s.out.MaxCase, s.out.MinCase, s.out.MaxShare, s.out.MinShare = s.e.MaxCase.String(), s.e.MinCase.String(), s.e.MaxShare, s.e.MinShare
		s.out.Dynamic = screening.DynamicText(m, s.e)
	}
	return out
}

func scenarioOf(e screening.Envelope, fs []rating.Factor, trains map[string]*traffic.Train) Scenario {
	s := Scenario{LiveMaxKN: e.Max.Value, LiveMinKN: e.Min.Value, Impact: e.Impact, Max: e.Max, Min: e.Min,
		MaxTrain: trains[e.Max.Train], MinTrain: trains[e.Min.Train]}
	for _, f := range fs {
		s.Basis = f.Basis
		if f.Sense == rating.Tension {
			s.RFTension = ptr(f.RF)
		} else {
			s.RFCompression = ptr(f.RF)
		}
	}
	return s
}

// pratt48 is an invented 48 m, 8-panel Pratt through truss, 6 m deep, one track between
// two trusses; every member holds capacity k times its existing demand (at least 300 kN),
// so that k < 1 flags it under today's traffic too.
func pratt48(t testing.TB, id, name string, k float64) invented {
	t.Helper()
	b := invented{
		Bridge: screening.Bridge{
			ID:         id,
			Truss:      truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6},
			TrussShare: 0.5, Tracks: 1, DeadLoadKNPerM: 18,
		},
		Name: name, Line: "Northmoor Main Line", ChainageKm: 12.345, LastInspected: "2029-06-01",
	}
	return withCapacities(t, b, k)
}

// withCapacities sets every member's capacities to k times its demand under the existing
// traffic, so that the proposed traffic's rise decides the flags.
func withCapacities(t testing.TB, b invented, k float64) invented {
	t.Helper()
	probe := b
	probe.Members = nil
	f := screenFleet(t, []invented{probe})
	d := f.Bridges[b.ID]
	if f.Rows[0].Error != "" {
		return b
	}
	b.Members = map[string]rating.Member{}
	for _, m := range d.Members {
		e := m.Existing
		ct := math.Max(300, k*(m.DeadKN+e.LiveMaxKN*e.Impact))
		cc := math.Max(300, k*-(m.DeadKN+e.LiveMinKN*e.Impact))
		b.Members[m.Label] = rating.Member{CapacityTension: ct, CapacityCompression: cc, ConditionFactor: 0.9}
	}
	return b
}

// demoFleet is the invented demo fleet of fleetgen (the same one `trussfleet fleet generate`
// writes), read back from its CSV and screened with the demo scenarios.
func demoFleet(t testing.TB, n int) *fixture {
	t.Helper()
	ref := parseTrain(t, "northmoor-freight-today")
	opt := fleetgen.Defaults(n)
	opt.Reference = ref
	var bb, mb bytes.Buffer
	if err := fleetgen.Generate(opt, &bb, &mb); err != nil {
		t.Fatal(err)
	}
	bridges := csvtest.Rows(t, &bb)
	members := csvtest.Rows(t, &mb)
	var fleet []invented
	byID := map[string]int{}
	fl := func(s string) float64 {
		v, _ := strconv.ParseFloat(s, 64)
		return v
	}
	floats := func(s string) []float64 {
		var out []float64
		for _, f := range strings.Fields(s) {
			out = append(out, fl(f))
		}
		return out
	}
	for _, r := range bridges {
		panels, _ := strconv.Atoi(r["panels"])
		tracks, _ := strconv.Atoi(r["tracks"])
		byID[r["bridge_id"]] = len(fleet)
		spans, _ := strconv.Atoi(r["spans"])
		fleet = append(fleet, invented{
			Bridge: screening.Bridge{
				ID: r["bridge_id"],
				Truss: truss.Params{Type: r["truss_type"], SpanM: fl(r["span_m"]), Panels: panels, DepthM: fl(r["depth_m"]), Deck: r["deck"], EndPosts: r["end_posts"],
					DepthsM: floats(r["depths_m"]), EndDepthM: fl(r["end_depth_m"]), Spans: spans},
				TrussShare: fl(r["truss_share"]), Tracks: tracks, DeadLoadKNPerM: fl(r["dead_load_kn_per_m"]),
				Members: map[string]rating.Member{},
				// The cross-section, where the row gives it (docs/inventory.md).
				TrussSpacingM: fl(r["truss_spacing_m"]),
				LineSpeedKmh:  fl(r["line_speed_kmh"]), TrussWeightKNPerM: fl(r["truss_weight_kn_per_m"]),
			},
			Name: r["name"], Line: r["line"], ChainageKm: fl(r["chainage_km"]), LastInspected: r["last_inspected"],
		})
	}
	for _, r := range bridges {
		if r["stringer_spacing_m"] != "" {
			fleet[byID[r["bridge_id"]]].Floor = screening.FloorSystem{Rate: true, StringerSpacingM: fl(r["stringer_spacing_m"]),
				StringerDeadKNPerM: fl(r["stringer_dead_kn_per_m"]), FloorBeamDeadKNPerM: fl(r["floor_beam_dead_kn_per_m"])}
		}
		if o := r["track_offsets_m"]; o != "" {
			b := &fleet[byID[r["bridge_id"]]]
			var err error
			if b.TrackOffsetsM, err = screening.ParseOffsets(o); err != nil {
				t.Fatal(err)
			}
		}
	}
	for _, r := range members {
		b := &fleet[byID[r["bridge_id"]]]
		if floor.IsLabel(r["member"]) {
			// A floor element's two effects (as fleetrun reads them from the store).
			b.Members[r["member"]+floor.Moment.Suffix()] = rating.Member{CapacityTension: fl(r["capacity_moment_knm"]), ConditionFactor: fl(r["condition_factor"])}
			b.Members[r["member"]+floor.Shear.Suffix()] = rating.Member{CapacityTension: fl(r["capacity_shear_kn"]), ConditionFactor: fl(r["condition_factor"])}
			continue
		}
		b.Members[r["member"]] = rating.Member{
			CapacityTension: fl(r["capacity_tension_kn"]), CapacityCompression: fl(r["capacity_compression_kn"]),
			ConditionFactor: fl(r["condition_factor"]), RatingFactor: fl(r["rating_factor"]), ReferenceTrain: r["reference_train"],
		}
	}
	return screenFleet(t, fleet, ref)
}
