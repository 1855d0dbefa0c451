package screening

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"sort"
	"strconv"

	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/rating"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// TrainRef is a train as a run used it: the name it was asked for by, and either the built-in
// spec or the train file's text, so that the run can be repeated from its record alone.
type TrainRef struct {
	// Asked is how the configuration or the inventory named the train.
	Asked string `json:"asked"`
	// Name is the train's own name.
	Name string `json:"name"`
	// Builtin is the spec of a built-in model ("lm71:alpha=1"); Source the YAML of a train
	// file. Exactly one is set.
	Builtin  string `json:"builtin,omitempty"`
	Source   string `json:"source,omitempty"`
	FileName string `json:"file_name,omitempty"`
}

// Train rebuilds the train.
func (r TrainRef) Train() (*traffic.Train, error) {
	if r.Builtin != "" {
		t, ok, err := traffic.Builtin(r.Builtin)
		if !ok && err == nil {
			err = fmt.Errorf("train %q: %q is no built-in model", r.Asked, r.Builtin)
		}
		return t, err
	}
	return traffic.ParseTrainFile(r.FileName, []byte(r.Source))
}

// Plan is everything a run computes from besides the inventory: the resolved trains and the
// rating settings. It is stored with the run (as JSON) and hashed for incremental runs.
type Plan struct {
	Existing   []TrainRef `json:"existing"`
	Proposed   []TrainRef `json:"proposed"`
	References []TrainRef `json:"references"`
	Dynamic    string     `json:"dynamic"`
	Method     string     `json:"method"` // working-stress or factored
	Phi        float64    `json:"phi"`
	GammaD     float64    `json:"gamma_d"`
	GammaL     float64    `json:"gamma_l"`
	GammaDFav  float64    `json:"gamma_d_favourable"`
	Flag       float64    `json:"flag"`
	Review     float64    `json:"review"`
	Worse      float64    `json:"worse_fraction"`
	// Reversal is the share of a member's larger force its reversed force must reach for a
	// reversal to count; FlagUnrated flags unrated members.
	Reversal    float64 `json:"reversal_fraction"`
	FlagUnrated bool    `json:"flag_unrated"`
	// The cross-section (plan_section.go): the multiple-presence rule ("": EN 1991-2) and,
	// per scenario, the tracks (from 1) a train, by the name asked, is kept to.
	Presence       string           `json:"multiple_presence,omitempty"`
	ExistingTracks map[string][]int `json:"existing_tracks,omitempty"`
	ProposedTracks map[string][]int `json:"proposed_tracks,omitempty"`
	// Lengths is the rule for members' determinant lengths ("": by member; dynamic.go).
	Lengths string `json:"dynamic_lengths,omitempty"`
	// Trains at speed (speed.go), by the name asked, per scenario: a speed in km/h, or the
	// bridge's line speed.
	ExistingSpeeds    map[string]float64 `json:"existing_speeds_kmh,omitempty"`
	ProposedSpeeds    map[string]float64 `json:"proposed_speeds_kmh,omitempty"`
	ExistingLineSpeed []string           `json:"existing_at_line_speed,omitempty"`
	ProposedLineSpeed []string           `json:"proposed_at_line_speed,omitempty"`
	// FloorLengths are the floor elements' determinant lengths where they differ from
	// floor.DefaultLengths (nil otherwise, which keeps the plans of earlier runs' hashes).
	FloorLengths *floor.Lengths `json:"floor_lengths,omitempty"`
	// Network rates every bridge by line category and Cooper E rating as well (9 sweeps a
	// bridge more; screening/categories.go).
	Network bool `json:"network"`
	// Fatigue holds the fatigue settings and traffic; nil checks no fatigue (and leaves the
	// hash of a plan without it as it was).
	Fatigue *FatiguePlan `json:"fatigue,omitempty"`
}

// MethodVersion numbers the screening's computation: raise it with every change that gives
// other results for the same inventory and plan (a new check, a corrected formula, a result
// column filled differently). It is part of every plan's hash, so a run with --changed after
// such a change screens every bridge again instead of carrying older results forward.
// 2: the floor system's fatigue check. 3: a passage's cycles counted as one of many
// (fatigue.RainflowRepeated). 4: the sweeps' limits placed within the next event, rakes swept
// by windows, rounding noise of slope changes judged per vertex (forces change by rounding;
// a placement may name another of equal force).
const MethodVersion = 4

// Hash is a stable digest of the plan and of the method (MethodVersion) that computes it.
func (p Plan) Hash() string {
	return p.hashWith(MethodVersion)
}

func (p Plan) hashWith(method int) string {
	b, err := json.Marshal(p)
	if err != nil {
		panic(err) // a Plan holds only strings and numbers
	}
	s := sha256.Sum256(append([]byte("trussfleet method "+strconv.Itoa(method)+"\n"), b...))
	return hex.EncodeToString(s[:])
}

// Settings prepares the plan's trains and rating settings for ScreenBridge.
func (p Plan) Settings() (*Settings, error) {
	build := func(refs []TrainRef) ([]*traffic.Train, error) {
		var out []*traffic.Train
		for _, r := range refs {
			t, err := r.Train()
			if err != nil {
				return nil, err
			}
			out = append(out, t)
		}
		return out, nil
	}
	s := &Settings{References: map[string]*envelope.Load{}}
	ex, err := build(p.Existing)
	if err != nil {
		return nil, fmt.Errorf("existing traffic: %w", err)
	}
	if s.Existing, err = NewScenario("existing", ex); err != nil {
		return nil, err
	}
	pr, err := build(p.Proposed)
	if err != nil {
		return nil, fmt.Errorf("proposed traffic: %w", err)
	}
	if s.Proposed, err = NewScenario("proposed", pr); err != nil {
		return nil, err
	}
	for _, r := range p.References {
		t, err := r.Train()
		if err != nil {
			return nil, fmt.Errorf("reference train: %w", err)
		}
		ld, err := envelope.Prepare(t)
		if err != nil {
			return nil, fmt.Errorf("reference train %s: %w", r.Asked, err)
		}
		s.References[r.Asked] = ld
	}
	if s.Dynamic, err = traffic.ParseDynamic(p.Dynamic); err != nil {
		return nil, fmt.Errorf("dynamic allowance: %w", err)
	}
	s.Method = rating.WorkingStress
	switch p.Method {
	case "working-stress", "":
	case "factored":
		s.Method = rating.Method{Factored: true, Phi: p.Phi, GammaD: p.GammaD, GammaL: p.GammaL, GammaDFavourable: p.GammaDFav}
		if err := s.Method.Validate(); err != nil {
			return nil, err
		}
	default:
		return nil, fmt.Errorf("rating method %q: allowed working-stress, factored", p.Method)
	}
	if err := p.sectionSettings(s); err != nil {
		return nil, err
	}
	if p.FloorLengths != nil {
		if err := p.FloorLengths.Validate(); err != nil {
			return nil, err
		}
		l := *p.FloorLengths
		s.FloorLengths = &l
	}
	if p.Network {
		if s.Network, err = NewNetworkTrains(); err != nil {
			return nil, err
		}
	}
	s.Thresholds = rating.Thresholds{Flag: p.Flag, Review: p.Review, WorseFraction: p.Worse,
		ReversalFraction: p.Reversal, FlagUnrated: p.FlagUnrated}
	if s.Fatigue, err = p.fatigueSettings(); err != nil {
		return nil, err
	}
	return s, nil
}

// TrainNames lists a scenario's train names.
func TrainNames(refs []TrainRef) []string {
	out := make([]string, len(refs))
	for i, r := range refs {
		out[i] = r.Name
	}
	return out
}

// SortRefs orders train references by the name asked, for a stable plan.
func SortRefs(refs []TrainRef) {
	sort.Slice(refs, func(i, j int) bool { return refs[i].Asked < refs[j].Asked })
}
