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
	// RatingFactor is a stored rating factor for ReferenceTrain, used where no capacity is held.
	RatingFactor   float64
	ReferenceTrain string
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

// FromStoredRating rates a member by the load-effect ratio against its reference train:
// RF = RF_ref · L_ref(1 + I_ref) / (L (1 + I)), in each sense the reference train loads.
// A stored rating factor is the lowest over the senses the reference loading checked, so in
// the sense it did not govern it understates that sense's own factor: the ratio is then
// conservative. A sense the reference train hardly loads (below minorShare of its larger
// effect) is not covered by the stored rating: where the new loading acts in it by more than
// that share of its own larger effect, it is reported as missing.
func FromStoredRating(m Member, ref, d Demand) (rfs []Factor, missing []Sense) {
	refScale := math.Max(ref.live(Tension), ref.live(Compression))
	scale := math.Max(d.live(Tension), d.live(Compression))
	for _, s := range [...]Sense{Tension, Compression} {
		l := d.live(s)
		if l <= negligible*scale || l <= 0 {
			continue
		}
		lref := ref.live(s)
		if !(refScale > 0) || lref < minorShare*refScale {
			if l >= minorShare*scale {
				missing = append(missing, s)
			}
			continue
		}
		rfs = append(rfs, Factor{Sense: s, RF: m.RatingFactor * lref / l, Basis: FromRatio})
	}
	return rfs, missing
}

// minorShare is the share of a loading's larger live effect below which its other sense is
// taken as not checked by a stored rating.
const minorShare = 0.05

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
