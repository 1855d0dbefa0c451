package traffic

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/internal/excerpt"
)

// DynamicKind selects a dynamic allowance formula.
type DynamicKind int

const (
	// NoDynamic applies no allowance: factor 1.
	NoDynamic DynamicKind = iota
	// FixedDynamic adds a fixed fraction: factor 1 + Fraction.
	FixedDynamic
	// Phi2 is EN 1991-2's dynamic factor for carefully maintained track.
	Phi2
	// Phi3 is EN 1991-2's dynamic factor for track of standard maintenance.
	Phi3
	// AREMASteel is the AREMA impact percentage for steel spans.
	AREMASteel
)

// Dynamic is a dynamic allowance. Factor gives (1 + I), the multiplier on the static live-load
// effect. The determinant length is the span passed to Factor unless LengthM is set.
type Dynamic struct {
	Kind DynamicKind
	// Fraction is the added fraction of FixedDynamic (0.2 for 20 %).
	Fraction float64
	// LengthM overrides the determinant length (EN 1991-2 L_phi; AREMA span length); 0: span.
	LengthM float64
	// SpacingM is the distance between trusses for AREMA's rocking effect (100/S percent,
	// S in ft); 0 leaves the rocking effect out.
	SpacingM float64
}

// Factor returns (1 + I) for a member of a span of spanM metres.
//
// Formulas from memory (check against the edition in force):
//   - EN 1991-2 6.4.5.2: Phi2 = 1.44/(sqrt(L) - 0.2) + 0.82 within [1.00, 1.67];
//     Phi3 = 2.16/(sqrt(L) - 0.2) + 0.73 within [1.00, 2.00], L in m.
//   - AREMA chapter 15, steel spans, percent of live load, L in ft: 40 - 3L²/1600 for
//     L < 80, 16 + 600/(L - 30) otherwise; plus 100/S for rocking, S in ft.
func (d Dynamic) Factor(spanM float64) float64 {
	l := spanM
	if d.LengthM > 0 {
		l = d.LengthM
	}
	switch d.Kind {
	case FixedDynamic:
		return 1 + d.Fraction
	case Phi2:
		return phi(l, 1.44, 0.82, 1.67)
	case Phi3:
		return phi(l, 2.16, 0.73, 2.00)
	case AREMASteel:
		lf := l / MPerFt
		pct := 16 + 600/(lf-30)
		if lf < 80 {
			pct = 40 - 3*lf*lf/1600
		}
		if d.SpacingM > 0 {
			pct += 100 / (d.SpacingM / MPerFt)
		}
		return 1 + pct/100
	}
	return 1
}

func phi(l, a, b, upper float64) float64 {
	den := math.Sqrt(l) - 0.2
	if den <= 0 {
		return upper
	}
	return min(max(a/den+b, 1), upper)
}

// String gives the allowance in the syntax ParseDynamic reads.
func (d Dynamic) String() string {
	var s string
	var args []string
	switch d.Kind {
	case NoDynamic:
		return "none"
	case FixedDynamic:
		return "fixed:" + strconv.FormatFloat(d.Fraction, 'g', -1, 64)
	case Phi2:
		s = "phi2"
	case Phi3:
		s = "phi3"
	case AREMASteel:
		s = "arema"
		if d.SpacingM > 0 {
			args = append(args, "s="+strconv.FormatFloat(d.SpacingM, 'g', -1, 64))
		}
	}
	if d.LengthM > 0 {
		args = append(args, "l="+strconv.FormatFloat(d.LengthM, 'g', -1, 64))
	}
	if len(args) > 0 {
		s += ":" + strings.Join(args, ",")
	}
	return s
}

// maxFixedFraction bounds a fixed allowance: beyond doubling the live load the number is a
// typing error, not an allowance.
const maxFixedFraction = 2.0

// Bounds of the lengths an allowance takes, m: the determinant length l of a truss member
// is at most a few spans (a span is at most 400 m), and trusses stand a track's width or
// more apart, so that AREMA's rocking effect, 100/S percent with S in ft, stays below a
// third of the live load.
const minTrussSpacingM = 1.0

var dynamicLengthMax = map[string]float64{"l": 2000, "s": 50}

const dynamicSyntax = "none, fixed:FRACTION (e.g. fixed:0.2), phi2[:l=M], phi3[:l=M], arema[:l=M,s=M] (l: determinant length, default the span; s: distance between trusses for the rocking effect)"

// ParseDynamic reads an allowance: "none", "fixed:0.2", "phi2", "phi3", "arema", optionally
// with a determinant length "phi2:l=12.5" and, for AREMA, the truss spacing "arema:s=5.2".
func ParseDynamic(s string) (Dynamic, error) {
	name, args, hasArgs := strings.Cut(strings.ToLower(strings.TrimSpace(s)), ":")
	var d Dynamic
	allowed := map[string]bool{"l": true}
	switch name {
	case "", "none":
		if hasArgs {
			return d, fmt.Errorf("dynamic allowance %q: none takes no parameters", excerpt.Cut(s))
		}
		return d, nil
	case "fixed":
		f, err := strconv.ParseFloat(args, 64)
		if err != nil || !(f >= 0 && f <= maxFixedFraction) {
			return d, fmt.Errorf("dynamic allowance %q: fixed needs a fraction from 0 to %g, e.g. fixed:0.2", excerpt.Cut(s), maxFixedFraction)
		}
		return Dynamic{Kind: FixedDynamic, Fraction: f}, nil
	case "phi2":
		d.Kind = Phi2
	case "phi3":
		d.Kind = Phi3
	case "arema":
		d.Kind = AREMASteel
		allowed["s"] = true
	default:
		return d, fmt.Errorf("dynamic allowance %q: unknown; allowed: %s", excerpt.Cut(s), dynamicSyntax)
	}
	if !hasArgs {
		return d, nil
	}
	for kv := range strings.SplitSeq(args, ",") {
		k, v, _ := strings.Cut(kv, "=")
		f, err := strconv.ParseFloat(v, 64)
		if !allowed[k] {
			return d, fmt.Errorf("dynamic allowance %q: unknown parameter %q; allowed: %s", excerpt.Cut(s), excerpt.Cut(kv), dynamicSyntax)
		}
		if err != nil || !(f > 0) || !(f <= dynamicLengthMax[k]) {
			return d, fmt.Errorf("dynamic allowance %q: %s must be a positive length in m, at most %g, got %q", excerpt.Cut(s), k, dynamicLengthMax[k], excerpt.Cut(v))
		}
		if k == "s" && f < minTrussSpacingM {
			return d, fmt.Errorf("dynamic allowance %q: s, the distance between trusses, must be at least %g m, got %q", excerpt.Cut(s), minTrussSpacingM, excerpt.Cut(v))
		}
		if k == "l" {
			d.LengthM = f
		} else {
			d.SpacingM = f
		}
	}
	return d, nil
}
