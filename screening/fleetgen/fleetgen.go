package fleetgen

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"time"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// Options control the invented fleet.
type Options struct {
	Bridges int
	Seed    uint64
	// Reference is the train that stored rating factors refer to, and its name as the
	// inventory writes it.
	Reference *traffic.Train
	// StoredRatingShare is the share of bridges that hold stored rating factors instead of
	// capacities.
	StoredRatingShare float64
	// MarginLow and MarginHigh bound a bridge's design margin over its design loading.
	MarginLow, MarginHigh float64
	// Tables, when set, receives the joint tables (trusses.csv) of the bridges the
	// generator gives as tables; without it none is.
	Tables io.Writer
	// FloorShare is the share of bridges whose floor system (stringers and floor beams) the
	// inventory describes (floor.go).
	FloorShare float64
}

// Defaults gives the options the demo uses, apart from the reference train.
func Defaults(n int) Options {
	return Options{Bridges: n, Seed: 1893, StoredRatingShare: 0.3, MarginLow: 0.7, MarginHigh: 1.3, FloorShare: 0.3}
}

var (
	lines    = []string{"Northmoor Main Line", "Eastfell Valley Branch", "Quarnmoss Loop", "Skarvrigg Mineral Line", "Thraskwater Junction Spur"}
	prefixes = []string{"Quarn", "Thrask", "Vell", "Ombry", "Skarv", "Drav", "Zenn", "Prell", "Ulth", "Kest", "Brogg", "Ysk", "Carrod", "Mirren", "Fask", "Gwarr"}
	suffixes = []string{"rigg", "holt", "brae", "sett", "wath", "syke", "thorpe", "gill", "scar", "ness", "mire", "haugh"}
	kinds    = []string{"Viaduct", "Bridge", "Underbridge", "Girders"}
)

// BridgeHeader and MemberHeader are the CSV columns written.
var (
	BridgeHeader = []string{"bridge_id", "name", "line", "chainage_km", "truss_type", "span_m", "panels", "depth_m", "deck", "end_posts", "trusses", "truss_share", "tracks", "dead_load_kn_per_m", "year_built", "latitude", "longitude", "last_inspected",
		"truss_spacing_m", "track_offsets_m", "line_speed_kmh", "first_frequency_hz", "truss_weight_kn_per_m",
		"depths_m", "end_depth_m", "spans", "stringer_spacing_m", "stringer_dead_kn_per_m", "floor_beam_dead_kn_per_m"}
	MemberHeader = []string{"bridge_id", "member", "capacity_tension_kn", "capacity_compression_kn", "rating_factor", "reference_train", "condition_factor", "area_mm2", "fatigue_category",
		"capacity_moment_knm", "capacity_shear_kn", "section_modulus_mm3"}
)

// Generate writes the bridges and members CSV files of an invented fleet.
func Generate(opt Options, bridgesOut, membersOut io.Writer) error {
	if opt.Reference == nil {
		return fmt.Errorf("fleetgen: a reference train is needed for stored rating factors")
	}
	r := rand.New(rand.NewPCG(opt.Seed, opt.Seed^0x9e3779b97f4a7c15))
	bw, mw := csv.NewWriter(bridgesOut), csv.NewWriter(membersOut)
	if err := bw.Write(BridgeHeader); err != nil {
		return err
	}
	if err := mw.Write(MemberHeader); err != nil {
		return err
	}
	chainage := make([]float64, len(lines))
	dyn := traffic.Dynamic{Kind: traffic.AREMASteel}
	ref, err := screening.NewScenario("reference", []*traffic.Train{opt.Reference})
	if err != nil {
		return err
	}
	var w screening.Screener
	byEra := map[float64]*screening.Settings{}
	tw := newTableWriter(opt.Tables)
	fr := floorRand(opt.Seed)
	for i := 0; i < opt.Bridges; i++ {
		li := r.IntN(len(lines))
		chainage[li] += 0.4 + r.Float64()*6
		b, row := inventBridge(r, i, li, chainage[li])
		if err := inventForm(r, &b, row, tw); err != nil {
			return err
		}
		row = inventFloor(fr, opt.FloorShare, &b, row)
		year, _ := strconv.Atoi(row[14])
		set, ok := byEra[designE(year)]
		if !ok {
			var err error
			if set, err = settings(traffic.Cooper(designE(year)), ref, dyn); err != nil {
				return err
			}
			byEra[designE(year)] = set
		}
		res := w.Screen(b, set)
		if res.Err != nil {
			// The generator draws only valid geometry; a failure here is a bug in it.
			return fmt.Errorf("fleetgen: bridge %s: %w", b.ID, res.Err)
		}
		if err := bw.Write(row); err != nil {
			return err
		}
		stored := r.Float64() < opt.StoredRatingShare
		margin := opt.MarginLow + r.Float64()*(opt.MarginHigh-opt.MarginLow)
		if err := writeMembers(mw, r, b, year, res, margin, stored, opt.Reference.Name); err != nil {
			return err
		}
		if err := writeFloor(mw, fr, b, res, margin); err != nil {
			return err
		}
	}
	bw.Flush()
	mw.Flush()
	if err := tw.flush(); err != nil {
		return err
	}
	if err := bw.Error(); err != nil {
		return err
	}
	return mw.Error()
}

// settings compares the design loading (as "existing") with the reference train (as
// "proposed"): the generator needs both envelopes of every member.
func settings(design *traffic.Train, ref screening.Scenario, dyn traffic.Dynamic) (*screening.Settings, error) {
	d, err := screening.NewScenario("design", []*traffic.Train{design})
	if err != nil {
		return nil, err
	}
	return &screening.Settings{
		Existing: d, Proposed: ref, Dynamic: dyn, Method: rating.WorkingStress,
		Thresholds: rating.Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.1},
	}, nil
}

// designE is the Cooper rating of the design loading of a bridge's era (an invented but
// plausible history of the fictional railway's design standards).
func designE(year int) float64 {
	switch {
	case year < 1900:
		return 40
	case year < 1920:
		return 50
	case year < 1945:
		return 60
	default:
		return 72
	}
}

func inventBridge(r *rand.Rand, i, line int, chainage float64) (screening.Bridge, []string) {
	types := []string{"pratt", "pratt", "pratt", "howe", "warren", "warren", "warren-verticals", "warren-verticals"}
	typ := types[r.IntN(len(types))]
	n := 6 + 2*r.IntN(6) // 6..16
	if typ == "warren" {
		n = 6 + r.IntN(11)
	}
	panel := 4.5 + r.Float64()*3.5
	span := round(float64(n)*panel, 0.1)
	depth := round(span/(6+r.Float64()*4), 0.1)
	depth = max(depth, round(panel*0.8, 0.1))
	deck := "through"
	if (typ == "pratt" || typ == "howe") && r.Float64() < 0.2 {
		deck = "deck"
	}
	tracks := 1
	if r.Float64() < 0.1 {
		tracks = 2
	}
	year := 1890 + r.IntN(75)
	dead := round(9+0.14*span+r.Float64()*4, 0.1) * float64(tracks)
	id := fmt.Sprintf("NER-%05d", i+1)
	name := prefixes[r.IntN(len(prefixes))] + suffixes[r.IntN(len(suffixes))] + " " + kinds[r.IntN(len(kinds))]
	inspected := time.Date(2019, 1, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, r.IntN(7*365)).Format("2006-01-02")
	b := screening.Bridge{
		ID:    id,
		Truss: truss.Params{Type: typ, SpanM: span, Panels: n, DepthM: depth, Deck: deck},
		// One track centred between two trusses: half its load to each (common practice).
		TrussShare: 0.5, Tracks: tracks, DeadLoadKNPerM: dead,
	}
	row := []string{id, name, lines[line], f(round(chainage, 0.001)), typ, f(span), strconv.Itoa(n), f(depth), deck, "", "2", "0.5",
		strconv.Itoa(tracks), f(dead), strconv.Itoa(year), "", "", inspected, "", "", "", "", "", "", "", ""}
	lat, lon := place(line, chainage)
	row[BridgeColumn("latitude")], row[BridgeColumn("longitude")] = f(round(lat, 1e-5)), f(round(lon, 1e-5))
	withSection(&b, row, i, tracks)
	return b, row
}

// place puts a bridge on the map: the invented railway's lines run out from one junction,
// each on a bearing of its own, and a bridge stands its chainage along its line. A line
// longer than lapKm (a large benchmark fleet's lines run to thousands of kilometres) folds
// back and forth beside itself, lapGapKm further out at each lap, so that every position
// stays a valid one near the junction. The junction's position is arbitrary (invented, like
// the railway: no real line or bridge is there); the positions only let the map export show
// the fleet.
func place(line int, chainageKm float64) (lat, lon float64) {
	const junctionLat, junctionLon = 61.3, 9.2 // degrees, WGS 84
	const kmPerDegree = 111.32                 // along a meridian (common practice)
	const lapKm, lapGapKm = 400.0, 6.0
	lap := math.Floor(chainageKm / lapKm)
	along := chainageKm - lap*lapKm
	if int(lap)%2 == 1 {
		along = lapKm - along // the way back
	}
	side := lap * lapGapKm
	bearing := (25 + 70*float64(line)) * math.Pi / 180
	north := along*math.Cos(bearing) - side*math.Sin(bearing)
	east := along*math.Sin(bearing) + side*math.Cos(bearing)
	lat = junctionLat + north/kmPerDegree
	lon = junctionLon + east/(kmPerDegree*math.Cos(junctionLat*math.Pi/180))
	return lat, lon
}

// withSection gives some bridges a cross-section, chosen by their number so that the random
// draws, and so every other bridge, stay as they were: each two-track bridge its tracks at
// ±2.25 m between trusses 9.4 m apart (symmetric: each truss takes half of each track's
// load, as the average share did), and every seventh single-track bridge an eccentric track
// 0.6 m towards truss A between trusses 5.2 m apart, a line speed, and the truss's own weight
// as a third of its dead load. Invented values of the demo railway.
func withSection(b *screening.Bridge, row []string, i, tracks int) {
	// The columns of BridgeHeader.
	share, nTracks, spacing, offsets := BridgeColumn("truss_share"), BridgeColumn("tracks"), BridgeColumn("truss_spacing_m"), BridgeColumn("track_offsets_m")
	speed, weight := BridgeColumn("line_speed_kmh"), BridgeColumn("truss_weight_kn_per_m")
	switch {
	case tracks == 2:
		b.TrussSpacingM, b.TrackOffsetsM = 9.4, []float64{-2.25, 2.25}
		row[spacing], row[offsets] = "9.4", "-2.25 2.25"
	case i%7 == 3:
		b.TrussSpacingM, b.TrackOffsetsM, b.LineSpeedKmh = 5.2, []float64{0.6}, 100
		b.TrussWeightKNPerM = round(b.DeadLoadKNPerM/3, 0.1)
		row[spacing], row[offsets], row[speed], row[weight] = "5.2", "0.6", "100", f(b.TrussWeightKNPerM)
	default:
		return
	}
	row[share], row[nTracks] = "", ""
}

func writeMembers(w *csv.Writer, r *rand.Rand, b screening.Bridge, year int, res screening.Result, margin float64, stored bool, refName string) error {
	// The smallest section an old truss would use, as a share of its largest member demand.
	largest := 0.0
	for _, m := range res.Members {
		if m.Effect != "" {
			continue // a floor element (floor.go)
		}
		largest = math.Max(largest, demandT(m.Dead, m.Existing))
		largest = math.Max(largest, demandC(m.Dead, m.Existing))
	}
	floor := 0.12 * largest
	for _, m := range res.Members {
		if m.Effect != "" {
			continue
		}
		k := margin * (0.95 + 0.25*r.Float64())
		// A member that the design left short for today's traffic (the reference train) was
		// strengthened to carry it with a little to spare.
		spare := 1.03 + 0.3*r.Float64()
		ct := round(math.Max(math.Max(demandT(m.Dead, m.Existing)*k, demandT(m.Dead, m.Proposed)*spare), floor), 1)
		cc := round(math.Max(math.Max(demandC(m.Dead, m.Existing)*k, demandC(m.Dead, m.Proposed)*spare), floor), 1)
		cond := 1.0
		if year < 1925 && r.Float64() < 0.25 {
			cond = round(0.8+0.18*r.Float64(), 0.01)
		}
		area := round(math.Max(ct, cc)/0.165, 100) // mm² at about 165 MPa working stress
		row := []string{b.ID, m.Label, f(ct), f(cc), "", "", f(cond), f(area), "71", "", "", ""}
		if stored {
			rf, ok := storedRF(m, ct*cond, cc*cond)
			if !ok {
				continue // a member the reference train does not load: nothing to store
			}
			row = []string{b.ID, m.Label, "", "", f(round(rf, 0.01)), refName, "1", f(area), "71", "", "", ""}
		}
		if err := w.Write(row); err != nil {
			return err
		}
	}
	return nil
}

// demandT and demandC are the forces in each sense, dead plus live with impact, under the
// loading of e (Existing holds the design loading here, Proposed the reference train).
func demandT(dead float64, e screening.Envelope) float64 {
	return math.Max(0, dead+e.Max.Value*e.Impact)
}

func demandC(dead float64, e screening.Envelope) float64 {
	return math.Max(0, -(dead + e.Min.Value*e.Impact))
}

// storedRF is the rating factor an earlier rating would have stored for the reference train
// (Proposed holds it here): RF = (C − D)/(L(1 + I)) in the sense the train governs.
func storedRF(m screening.MemberResult, ct, cc float64) (float64, bool) {
	e := m.Proposed
	lt, lc := e.Max.Value*e.Impact, -e.Min.Value*e.Impact
	switch {
	case lt <= 0 && lc <= 0:
		return 0, false
	case lt >= lc:
		return (ct - m.Dead) / lt, (ct-m.Dead)/lt > 0
	default:
		return (cc + m.Dead) / lc, (cc+m.Dead)/lc > 0
	}
}

func round(v, step float64) float64 { return math.Round(v/step) * step }

func f(v float64) string { return strconv.FormatFloat(v, 'g', 12, 64) }
