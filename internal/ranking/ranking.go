// Package ranking holds the line of a run's priority list: what package store reads for
// each bridge of a run, in priority order, and what the report (package screening/report),
// the priority list on the terminal and the exports show. It is a package of its own so that
// the store and the report share the line without either importing the other.
//
// The priority order (store/rank.go): each bridge's key is the lower of its lowest proposed
// rating factor and, where the run checks fatigue, its fatigue life index: the shortest
// remaining fatigue life of its members under the proposed traffic divided by the planning
// horizon (fatigue.horizon_years). Both are 1 at the point where the bridge falls short: an
// RF of 1 carries the proposed traffic exactly, a life index of 1 lasts exactly the horizon.
// Lowest key first; ties by the largest demand increase; bridges with neither number next,
// failed bridges last. Where the life index is the lower, fatigue governs the bridge's rank
// (Fatigue.Governs), and the outputs say so. rating.RankOrder orders the strength key alone.
package ranking

// Row is one line of a run's priority list.
type Row struct {
	Rank                   int
	BridgeID, Name, Line   string
	ChainageKm             *float64
	TrussType              string
	SpanM                  float64
	Panels                 int
	WorstMember            string
	RFExisting, RFProposed *float64 // nil: no member with capacity data
	// Change is RFProposed/RFExisting − 1 (negative when the RF falls).
	Change *float64
	// DemandIncrease is the largest member live-demand increase, as a fraction.
	DemandIncrease float64
	Headroom       *float64 // multiple of the proposed traffic carried at RF = 1
	Flags          []string // distinct flags of the bridge's members, in report order
	FlagCounts     map[string]int
	// Unrated counts the members the proposed traffic loads in a sense they hold no rating
	// for (no capacity, no stored rating factor rated in that sense).
	Unrated int
	// Governing train of the worst member and where it stood.
	GoverningTrain     string
	GoverningSense     string // tension or compression
	GoverningHeadM     *float64
	GoverningDirection string
	GoverningFromM     *float64
	GoverningToM       *float64
	LastInspected      string // YYYY-MM-DD or ""
	// Categories are the highest line categories the bridge carries (nil: the run did not
	// rate them; empty: none carried), ERating its Cooper E rating (nil: none) and EMember the
	// member that has it (screening/network).
	Categories []string
	ERating    *float64
	EMember    string
	// Latitude and Longitude locate the bridge (WGS 84 degrees; nil where the inventory has
	// none).
	Latitude, Longitude *float64
	// Status is "done" or "failed" (a result carried forward from an earlier run reads as
	// done); Error says why a bridge failed.
	Status, Error string

	// GoverningCase is the loading case of the governing extreme: the truss, the tracks
	// loaded and their shares. NoRocking says AREMA's rocking term was left out for want of
	// the truss spacing.
	GoverningCase string
	NoRocking     bool

	// Fatigue is the bridge's fatigue summary (zero where the run checked no fatigue).
	Fatigue Fatigue
}

// Fatigue is a bridge's fatigue summary in the priority list.
type Fatigue struct {
	// NoData counts the members without area or category (not checked); nil: the run
	// checked no fatigue.
	NoData *int
	// LifeYears is the shortest remaining fatigue life under the proposed traffic, Member its
	// member, LifeIndex that life over the planning horizon (nil: no life runs out).
	LifeYears, LifeIndex *float64
	Member               string
	// Governs: the life index is below the lowest proposed RF, so fatigue sets the rank.
	Governs bool
}
