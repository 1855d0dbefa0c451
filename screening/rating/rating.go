package rating

import (
	"fmt"
	"math"
)

// Method is how capacity and demand are combined.
type Method struct {
	// Factored selects the factored form; otherwise working stress.
	Factored bool
	// Phi, GammaD, GammaL are the factored form's resistance, dead-load and live-load
	// factors; GammaDFavourable multiplies a dead-load force that relieves the sense checked.
	Phi, GammaD, GammaL, GammaDFavourable float64
}

// WorkingStress is the unfactored form.
var WorkingStress = Method{Phi: 1, GammaD: 1, GammaL: 1, GammaDFavourable: 1}

// Validate checks the factors of a factored method.
func (m Method) Validate() error {
	for name, v := range map[string]float64{"phi": m.Phi, "gamma_d": m.GammaD, "gamma_l": m.GammaL, "gamma_d_favourable": m.GammaDFavourable} {
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("rating factor %s must be positive and finite, got %v", name, v)
		}
	}
	return nil
}

// Sense is tension or compression.
type Sense int

// The two senses of an axial force.
const (
	Tension Sense = iota
	Compression
)

func (s Sense) String() string {
	if s == Compression {
		return "compression"
	}
	return "tension"
}

// Member is what the inventory holds about one member's capacity.
type Member struct {
	// CapacityTension and CapacityCompression in kN (magnitudes); zero or NaN: not held.
	CapacityTension, CapacityCompression float64
	// ConditionFactor scales the capacities (0 < f ≤ 1); zero means 1.
	ConditionFactor float64
	// RatingFactor is a stored rating factor for ReferenceTrain. It rates one sense only, the
	// sense it was rated in: RatingSense where RatingSenseGiven, otherwise the sense in which
	// the reference loading's dead plus live force governs (StoredSense). It is used in that
	// sense where the member holds no capacity in it.
	RatingFactor     float64
	ReferenceTrain   string
	RatingSense      Sense
	RatingSenseGiven bool
	// AreaMM2 (mm², 0: not held) and FatigueCategory (the inventory's text: a detail category
	// in MPa or "riveted"; "": not held) are for the fatigue check (screening/fatigue); the
	// rating does not use them.
	AreaMM2         float64
	FatigueCategory string
	// SectionModulusMM3 (mm³, 0: not held) stands for the area of a floor element, whose
	// fatigue stress is its moment over it (screening/floor_fatigue.go).
	SectionModulusMM3 float64
}

// StoredSense is the sense a member's stored rating factor rates: the one the inventory
// gives, or else the one in which the reference loading ref governs, that is the sense of the
// larger of |D + L_t(1 + I)| and |D − L_c(1 + I)| (a stored rating factor is the lowest over
// the senses its rating checked, and with one capacity per sense the sense of the larger total
// force is the one that governed; common practice). given says whether the inventory gave it.
func (m Member) StoredSense(ref Demand) (s Sense, given bool) {
	if m.RatingSenseGiven {
		return m.RatingSense, true
	}
	if ref.live(Compression)-ref.Dead > ref.Dead+ref.live(Tension) {
		return Compression, false
	}
	return Tension, false
}

// ParseSense reads "tension" or "compression".
func ParseSense(s string) (Sense, error) {
	switch s {
	case "tension":
		return Tension, nil
	case "compression":
		return Compression, nil
	}
	return Tension, fmt.Errorf("sense %q: allowed tension, compression", s)
}

// HasCapacity says whether the member holds a capacity in the sense.
func (m Member) HasCapacity(s Sense) bool {
	c := m.CapacityTension
	if s == Compression {
		c = m.CapacityCompression
	}
	return c > 0 && !math.IsInf(c, 0)
}

// HasStoredRating says whether the member holds a stored rating factor with its train.
func (m Member) HasStoredRating() bool {
	return m.RatingFactor > 0 && !math.IsInf(m.RatingFactor, 0) && m.ReferenceTrain != ""
}

// Demand is one member's load effects under one loading.
type Demand struct {
	Dead float64 // D, kN, tension positive
	// LiveMax ≥ 0 and LiveMin ≤ 0 are the live envelope, kN, before dynamic allowance.
	LiveMax, LiveMin float64
	// Impact is 1 + I.
	Impact float64
}

// live gives the live-load effect in the sense, as a magnitude, with dynamic allowance.
func (d Demand) live(s Sense) float64 {
	if s == Compression {
		return -d.LiveMin * d.Impact
	}
	return d.LiveMax * d.Impact
}

// dead gives the dead-load force acting in the sense (negative where it relieves it).
func (d Demand) dead(s Sense) float64 {
	if s == Compression {
		return -d.Dead
	}
	return d.Dead
}

// Reverses says whether D + L changes sign over the envelope (the member sees both tension
// and compression).
func (d Demand) Reverses() bool {
	return d.Dead+d.live(Tension) > 0 && d.Dead-d.live(Compression) < 0
}

// ReversalShare is the reversed force as a share of the member's larger force: with
// D + L(1 + I) ranging from a < 0 to b > 0, min(|a|, b) / max(|a|, b); 0 where the force keeps
// its sign.
func (d Demand) ReversalShare() float64 {
	if !d.Reverses() {
		return 0
	}
	t, c := d.Dead+d.live(Tension), d.live(Compression)-d.Dead
	return math.Min(t, c) / math.Max(t, c)
}

// Factor is a rating factor in one sense, with where it came from.
type Factor struct {
	Sense Sense
	RF    float64 // +Inf where the live load does not act in the sense
	// Basis says how RF was found: "capacity" or "stored rating factor".
	Basis string
}

// Source of a rating factor.
const (
	FromCapacity = "capacity"
	FromRatio    = "stored rating factor"
)

// negligible is the share of a member's larger live effect below which the other sense is
// taken as not loaded by traffic (rounding residue of the analysis).
const negligible = 1e-9

// FromCapacities rates a member that holds capacities, in each sense the live load acts in.
// A sense with live effect but no capacity is left out and reported as missing.
func FromCapacities(m Member, d Demand, meth Method) (rfs []Factor, missing []Sense) {
	cond := m.ConditionFactor
	if cond == 0 {
		cond = 1
	}
	scale := math.Max(d.live(Tension), d.live(Compression))
	for _, s := range [...]Sense{Tension, Compression} {
		l := d.live(s)
		if l <= negligible*scale || l <= 0 {
			continue
		}
		if !m.HasCapacity(s) {
			missing = append(missing, s)
			continue
		}
		c := m.CapacityTension
		if s == Compression {
			c = m.CapacityCompression
		}
		dead := d.dead(s)
		gd := meth.GammaD
		if dead < 0 {
			gd = meth.GammaDFavourable
		}
		rf := (meth.Phi*cond*c - gd*dead) / (meth.GammaL * l)
		rfs = append(rfs, Factor{Sense: s, RF: rf, Basis: FromCapacity})
	}
	return rfs, missing
}

// FromStoredRating rates a member by the load-effect ratio against its reference train,
// RF = RF_ref · L_ref(1 + I_ref) / (L (1 + I)), in the one sense the stored rating factor
// rates (Member.StoredSense). A stored rating factor says nothing of the other sense: that is
// left to FromCapacities, or unrated. The sense is reported as missing where the new loading
// acts in it but the reference train does not load it at all (no ratio can be formed).
func FromStoredRating(m Member, ref, d Demand) (rfs []Factor, missing []Sense) {
	s, _ := m.StoredSense(ref)
	scale := math.Max(d.live(Tension), d.live(Compression))
	l := d.live(s)
	if l <= negligible*scale || l <= 0 {
		return nil, nil
	}
	refScale := math.Max(ref.live(Tension), ref.live(Compression))
	lref := ref.live(s)
	if lref <= negligible*refScale || lref <= 0 {
		return nil, []Sense{s}
	}
	return []Factor{{Sense: s, RF: m.RatingFactor * lref / l, Basis: FromRatio}}, nil
}

// Worst gives the smallest of the factors (RF +Inf and ok false when there are none).
func Worst(rfs []Factor) (Factor, bool) {
	w := Factor{RF: math.Inf(1)}
	ok := false
	for _, f := range rfs {
		if !ok || f.RF < w.RF {
			w, ok = f, true
		}
	}
	return w, ok
}
