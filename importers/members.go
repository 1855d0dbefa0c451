package importers

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/trussfleet/trussfleet/internal/excerpt"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// memberRecord is a members.csv row as text; ParseMembers checks and converts it.
type memberRecord struct {
	SrcLine                string `csv:"__line"`
	BridgeID               string `csv:"bridge_id"`
	Member                 string `csv:"member"`
	CapacityTensionKN      string `csv:"capacity_tension_kn"`
	CapacityTensionKip     string `csv:"capacity_tension_kip"`
	CapacityCompressionKN  string `csv:"capacity_compression_kn"`
	CapacityCompressionKip string `csv:"capacity_compression_kip"`
	RatingFactor           string `csv:"rating_factor"`
	ReferenceTrain         string `csv:"reference_train"`
	RatingSense            string `csv:"rating_sense"`
	ConditionFactor        string `csv:"condition_factor"`
	AreaMM2                string `csv:"area_mm2"`
	AreaIn2                string `csv:"area_in2"`
	FatigueCategory        string `csv:"fatigue_category"`
	// Truss is "A" or "B" for a row of one main truss's member, empty for both (section.go).
	Truss string `csv:"truss"`
	// A floor element's capacities (floor.go).
	CapacityMomentKNM   string `csv:"capacity_moment_knm"`
	CapacityMomentKipFt string `csv:"capacity_moment_kipft"`
	CapacityShearKN     string `csv:"capacity_shear_kn"`
	CapacityShearKip    string `csv:"capacity_shear_kip"`
	// A floor element's section modulus for its fatigue check (floor_fatigue.go).
	SectionModulusMM3 string `csv:"section_modulus_mm3"`
	SectionModulusIn3 string `csv:"section_modulus_in3"`
}

func (r memberRecord) srcLine() string { return r.SrcLine }

var (
	colTension     = column{name: "capacity_tension_kn", alt: "capacity_tension_kip", factor: kNPerKip}
	colCompression = column{name: "capacity_compression_kn", alt: "capacity_compression_kip", factor: kNPerKip}
	colArea        = column{name: "area_mm2", alt: "area_in2", factor: mm2PerIn2}

	// memberColumns are the columns of members.csv (docs/inventory.md).
	memberColumns = []column{
		{name: "bridge_id", required: true, maxChars: maxIDChars}, {name: "member", required: true, maxChars: maxIDChars},
		colTension, colCompression, {name: "rating_factor"}, {name: "reference_train", maxChars: maxNameChars},
		{name: "rating_sense", maxChars: maxNameChars}, {name: "condition_factor"}, colArea, {name: "fatigue_category", maxChars: maxFatigueCategory},
		{name: "truss"},
		colMoment, colShear, colSectionModulus,
	}
)

// Geometry tells the member parser about the stored bridges.
type Geometry interface {
	// Labels returns the member labels of a stored bridge, keyed by their upper-case form
	// (the file's case does not matter), in the geometry's order, a short description of the
	// truss, and false when no bridge of that id is stored.
	Labels(bridgeID string) (labels map[string]string, ordered []string, desc string, ok bool)
}

// TrainChecker, when the Geometry also implements it, tells whether a reference train can
// be resolved by a screening run (a stored train or a built-in model).
type TrainChecker interface {
	KnownTrain(name string) bool
}

// StoredGeometry builds each stored bridge's truss on first use and keeps its labels.
type StoredGeometry struct {
	bridges map[string]store.Bridge
	tables  map[string]*truss.Table // joint tables of "table" bridges (WithTables)
	cache   map[string]*labelSet
	trains  map[string]bool // nil: reference trains are not checked
}

// WithTrains makes the geometry check reference trains against the stored trains: by name,
// by file name, or by file name without .yaml, as a screening run resolves them.
func (g *StoredGeometry) WithTrains(trains []store.Train) *StoredGeometry {
	g.trains = map[string]bool{}
	for _, t := range trains {
		base := filepath.Base(t.FileName)
		for _, n := range []string{t.Name, t.FileName, base, strings.TrimSuffix(strings.TrimSuffix(base, ".yaml"), ".yml")} {
			g.trains[n] = true
		}
	}
	return g
}

// KnownTrain implements TrainChecker.
func (g *StoredGeometry) KnownTrain(name string) bool {
	if g.trains == nil || g.trains[name] {
		return true
	}
	_, ok, err := traffic.Builtin(name)
	return ok && err == nil
}

type labelSet struct {
	set     map[string]string
	ordered []string
	desc    string
}

// NewStoredGeometry indexes the bridges for label look-ups.
func NewStoredGeometry(bridges []store.Bridge) *StoredGeometry {
	g := &StoredGeometry{bridges: make(map[string]store.Bridge, len(bridges)), cache: map[string]*labelSet{}}
	for _, b := range bridges {
		g.bridges[b.BridgeID] = b
	}
	return g
}

// Labels implements Geometry.
func (g *StoredGeometry) Labels(bridgeID string) (map[string]string, []string, string, bool) {
	if ls, ok := g.cache[bridgeID]; ok {
		return ls.set, ls.ordered, ls.desc, true
	}
	b, ok := g.bridges[bridgeID]
	if !ok {
		return nil, nil, "", false
	}
	ls := &labelSet{set: map[string]string{}}
	p := geometryOf(b)
	ls.desc = fmt.Sprintf("%s %s truss, %d panels", b.TrussType, b.Deck, b.Panels)
	if t, _, err := screening.Geometry(p, g.tables[bridgeID]); err == nil {
		ls.ordered = t.Labels()
		for _, l := range ls.ordered {
			ls.set[strings.ToUpper(l)] = l
		}
		floorLabels(ls, len(t.DeckJoints)-1, b.Tracks)
	} else {
		// Stored bridges were built on import; one that no longer builds has no labels.
		ls.desc += fmt.Sprintf(" that cannot be built (%v)", err)
	}
	g.cache[bridgeID] = ls
	return ls.set, ls.ordered, ls.desc, true
}

// ParseMembers reads a members CSV file from r, checking every row against the stored
// bridges' geometry, and calls emit with each good row, as ParseBridges does.
func ParseMembers(file string, r io.Reader, geom Geometry, emit func(store.Staged[store.Member]) bool) (Report, error) {
	return parseMembers(file, r, "", geom, emit)
}

// parseMembers is ParseMembers reading the named sheet of a workbook ("": the first).
func parseMembers(file string, r io.Reader, sheet string, geom Geometry, emit func(store.Staged[store.Member]) bool) (Report, error) {
	return parseRows(file, r, sheet, memberColumns, func(rec memberRecord, p *row) bool {
		m, ok := parseMember(rec, p, geom)
		return !ok || emit(store.Staged[store.Member]{Line: p.line, Row: m})
	})
}

func parseMember(r memberRecord, p *row, geom Geometry) (store.Member, bool) {
	m := store.Member{
		BridgeID:        p.text("bridge_id", r.BridgeID, true),
		Member:          p.text("member", r.Member, true),
		FatigueCategory: r.FatigueCategory,
		ConditionFactor: 1,
	}
	m.CapacityTensionKN = p.quantity(colTension, r.CapacityTensionKN, r.CapacityTensionKip)
	p.positive(p.pick(colTension), pickRaw(p, colTension, r.CapacityTensionKN, r.CapacityTensionKip), m.CapacityTensionKN)
	p.atMost(p.pick(colTension), pickRaw(p, colTension, r.CapacityTensionKN, r.CapacityTensionKip), m.CapacityTensionKN, maxCapacityKN, "kN")
	m.CapacityCompressionKN = p.quantity(colCompression, r.CapacityCompressionKN, r.CapacityCompressionKip)
	p.positive(p.pick(colCompression), pickRaw(p, colCompression, r.CapacityCompressionKN, r.CapacityCompressionKip), m.CapacityCompressionKN)
	p.atMost(p.pick(colCompression), pickRaw(p, colCompression, r.CapacityCompressionKN, r.CapacityCompressionKip), m.CapacityCompressionKN, maxCapacityKN, "kN")
	m.AreaMM2 = p.quantity(colArea, r.AreaMM2, r.AreaIn2)
	p.positive(p.pick(colArea), pickRaw(p, colArea, r.AreaMM2, r.AreaIn2), m.AreaMM2)
	p.atMost(p.pick(colArea), pickRaw(p, colArea, r.AreaMM2, r.AreaIn2), m.AreaMM2, maxAreaMM2, "mm²")
	m.RatingFactor = p.number("rating_factor", r.RatingFactor, false)
	p.positive("rating_factor", r.RatingFactor, m.RatingFactor)
	p.atMost("rating_factor", r.RatingFactor, m.RatingFactor, maxRatingFactor, "")
	if r.ReferenceTrain != "" {
		m.ReferenceTrain = &r.ReferenceTrain
	}
	switch {
	case r.RatingFactor != "" && r.ReferenceTrain == "":
		p.fail("reference_train", r.ReferenceTrain, "a rating_factor needs the reference_train it was rated for")
	case r.RatingFactor == "" && r.ReferenceTrain != "":
		p.fail("rating_factor", r.RatingFactor, "reference_train %q is given without a rating_factor", excerpt.Cut(r.ReferenceTrain))
	}
	if r.RatingSense != "" {
		sense := strings.ToLower(strings.TrimSpace(r.RatingSense))
		switch {
		case sense != "tension" && sense != "compression" && sense != "moment" && sense != "shear":
			p.fail("rating_sense", r.RatingSense, "must be tension or compression (a floor element: moment or shear): the sense the rating_factor was rated in (leave it empty to take the sense its reference_train governs)")
		case r.RatingFactor == "":
			p.fail("rating_sense", r.RatingSense, "is given without a rating_factor")
		default:
			m.RatingSense = &sense
		}
	}
	if tc, ok := geom.(TrainChecker); ok && r.ReferenceTrain != "" && !tc.KnownTrain(r.ReferenceTrain) {
		p.fail("reference_train", r.ReferenceTrain, "not a stored train (import the train files first: trussfleet import trains DIR) nor a built-in model")
	}
	if f := p.number("condition_factor", r.ConditionFactor, false); f != nil {
		m.ConditionFactor = *f
		if !(*f > 0 && *f <= 1) {
			p.fail("condition_factor", r.ConditionFactor, "must be greater than 0 and at most 1 (1: no loss of capacity)")
		}
	}
	noCapacity := r.CapacityTensionKN == "" && r.CapacityTensionKip == "" &&
		r.CapacityCompressionKN == "" && r.CapacityCompressionKip == "" && r.RatingFactor == "" &&
		!hasFloorCapacity(r)
	if noCapacity {
		p.fail(p.pick(colTension), "", "no capacity: give capacity_tension and/or capacity_compression "+
			"(a floor element: capacity_moment and/or capacity_shear), or a rating_factor with its reference_train")
	}
	if m.BridgeID != "" && m.Member != "" {
		set, ordered, desc, ok := geom.Labels(m.BridgeID)
		switch {
		case !ok:
			p.fail("bridge_id", r.BridgeID, "no such bridge in the inventory (import its bridges.csv row first)")
		case set[strings.ToUpper(m.Member)] == "":
			p.fail("member", r.Member, "bridge %s (%s) has no member of that label; its members are: %s",
				m.BridgeID, desc, strings.Join(ordered, ", "))
		default:
			m.Member = set[strings.ToUpper(m.Member)]
			parseMemberFloor(r, p, &m)
		}
	}
	m.Truss = parseTruss(r, p)
	return m, p.ok
}
