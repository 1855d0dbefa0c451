package report

import (
	"time"

	"github.com/trussfleet/trussfleet/internal/ranking"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// Run describes the screening run a report shows.
type Run struct {
	ID             int64
	Status         string // running, completed, interrupted, failed
	StartedAt      time.Time
	FinishedAt     time.Time // zero while running
	ProgramVersion string
	ConfigHash     string
	// Scenarios maps "existing" and "proposed" to the names of their trains.
	Scenarios map[string][]string
	Dynamic   string // the dynamic allowance as configured, e.g. "phi3"
	Method    string // rating method, e.g. "working-stress"
	// Factors are the factored method's factors, shown in its rating equation; ignored
	// unless Factors.Factored (added by the report).
	Factors rating.Method
	// Trains holds the train definitions by each name in Scenarios (and, where different,
	// by the name the extremes give), so that Explain can show every train's extreme; nil
	// shows the governing trains only (added by the report).
	Trains map[string]*traffic.Train
	// Thresholds: RF below Flag is "exceeds", below Review is "review"; WorseFraction for "worse".
	Flag, Review, WorseFraction float64
	// ReversalFraction: the reversed force's least share of the larger force for
	// "new-reversal"; FlagUnrated: unrated members are flagged "no-capacity".
	ReversalFraction float64
	FlagUnrated      bool
	// FlagCounts counts members per flag over the run; BridgesFlagged the bridges with any flag.
	FlagCounts     map[string]int
	BridgesTotal   int
	BridgesFailed  int
	BridgesFlagged int
	// Fatigue is the run's fatigue plan (nil: the run checked no fatigue), for explaining a
	// member's fatigue arithmetic.
	Fatigue *screening.FatiguePlan
	// FloorLengths are the plan's floor determinant lengths (nil: floor.DefaultLengths), for
	// a floor element's fatigue arithmetic.
	FloorLengths *floor.Lengths
}

// BridgeRow is one line of the priority list (package internal/ranking, which store reads
// it into).
type BridgeRow = ranking.Row

// Bridge is a bridge page: its row, its geometry and every member's numbers.
type Bridge struct {
	Row BridgeRow
	// Truss is the geometry as screened; the report rebuilds the truss and its influence
	// lines from it (cheap and exact).
	Truss          truss.Params
	TrussShare     float64
	Tracks         int
	DeadLoadKNPerM float64
	Members        []Member

	// The cross-section (screening/section.go): 0 and nil where not given.
	Section Section
	// FloorNotes say what of the floor system was assumed or left unrated (package floor's
	// Notes in words); nil for a bridge whose floor is not rated.
	FloorNotes []string
	// Table is the joint table of a bridge whose truss type is "table" (nil otherwise).
	Table *truss.Table
	// YearBuilt as the inventory holds it now (0: not known), for the fatigue damage to date.
	YearBuilt int
	// Floor is the floor system as screening sees it, for a floor element's fatigue line
	// (floor.FatigueLine); nil where it is not rated.
	Floor *floor.System
}

// Section is a bridge's cross-section and what else its dynamic allowance and dead load rest
// on, as the inventory holds them.
type Section struct {
	TrussSpacingM     float64
	TrackOffsetsM     []float64
	TrussWeightKNPerM float64
	LineSpeedKmh      float64
	FirstFrequencyHz  float64
}

// Member is one member's rating arithmetic under both scenarios.
type Member struct {
	Label                  string
	Kind                   string
	Flags                  []string
	RFExisting, RFProposed *float64
	// SenseProposed is the sense of the proposed RF (tension or compression).
	SenseProposed string
	DeadKN        float64 // D
	// Capacities as held (nil when not held), before the condition factor.
	CapacityTensionKN, CapacityCompressionKN *float64
	ConditionFactor                          float64
	// Stored rating factor and its reference train, when the member is rated by the
	// load-effect ratio.
	StoredRF       *float64
	ReferenceTrain string
	// RatingSense is the sense the inventory says the stored RF was rated in ("" when not
	// given: the run took the sense the reference train governs).
	RatingSense        string
	Existing, Proposed Scenario

	// Truss is the main truss whose results these are, the one governing the member ("" in
	// runs from before the cross-section).
	Truss string
	// Fatigue is the member's stored fatigue outcome (Status "" where the run checked no
	// fatigue).
	Fatigue Fatigue
	// Other is the member's outcome on the truss that does not govern it; nil where one truss
	// was screened (other_truss.go).
	Other *OtherTruss
}

// Fatigue is a member's fatigue outcome as stored: status (no-data, below-cut-off, damaged),
// the detail used, yearly damages (Miner sums) existing and proposed, their ratio, the damage
// to date, the remaining years and the year they run out (nil: never), the largest proposed
// stress range (MPa) and the proposed train doing most damage.
type Fatigue struct {
	Status                                        string
	CategoryMPa, AreaMM2                          *float64
	DamageExisting, DamageProposed, Ratio, ToDate *float64
	RemainingYears                                *float64
	EndYear                                       *int
	RangeProposedMPa                              *float64
	Train                                         string
	// SectionModulusMM3 is a floor element's (its stress is its moment over it; AreaMM2 nil).
	SectionModulusMM3 *float64
}

// Scenario is a member's live-load envelope under one scenario (kN after the truss share,
// before the dynamic allowance) and its rating factors.
type Scenario struct {
	LiveMaxKN, LiveMinKN float64 // L, tension positive
	Impact               float64 // 1 + I
	RFTension            *float64
	RFCompression        *float64
	Basis                string // "capacity" or "stored rating factor"
	// The extremes with their placements; Max/MinTrain is the train's definition for
	// drawing its axles on the influence line (nil when not known).
	Max, Min           envelope.Extreme
	MaxTrain, MinTrain *traffic.Train

	// The loading case of each extreme (truss, tracks, shares), the dynamic allowance in
	// words, and the factor on the governing train's own force that gives each extreme (0:
	// not stored; the bridge's truss share x tracks then applies).
	MaxCase, MinCase   string
	Dynamic            string
	MaxShare, MinShare float64
}

// shareOf is the factor on the governing train's own force that gives the extreme of the
// sense sign.
func (s Scenario) shareOf(sign float64, b Bridge) float64 {
	share := s.MaxShare
	if sign < 0 {
		share = s.MinShare
	}
	if share == 0 {
		return b.liveShare()
	}
	return share
}
