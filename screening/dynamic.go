package screening

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

// Dynamic allowance member by member (values from memory; check the edition in force).
//
// The determinant length (EN 1991-2, L_phi) or loaded length (AREMA, L) depends on what a
// member carries. A main truss member carries the whole span: the span. A hanger carries one
// floor beam's load, and so does any member whose influence line is non-zero only over the
// two panels next to one panel point (a sub-tie or sub-diagonal of a subdivided panel, the
// Pratt hanger): EN 1991-2 Table 6.2 takes for hangers the length of the cross girder they
// carry, twice its span (the truss spacing b); AREMA the longer adjacent stringer (panel)
// length. Where b is not known, EN hangers take the longer adjacent panel length: shorter than
// 2b in trusses of usual proportions, so the factor is not understated.
//
// AREMA's rocking effect, 100/S percent with S the truss spacing in ft, is added wherever S is
// known: the bridge's truss spacing, or else the allowance's own s= (one for the fleet).

// Determinant-length rules of a run.
const (
	// LengthsByMember applies the rules above.
	LengthsByMember = "by-member"
	// LengthsSpan takes the span for every member (as screening did before).
	LengthsSpan = "span"
)

// ParseLengths reads the rule's name; "" gives LengthsByMember.
func ParseLengths(s string) (string, error) {
	switch s {
	case "", LengthsByMember:
		return LengthsByMember, nil
	case LengthsSpan:
		return s, nil
	}
	return "", fmt.Errorf("dynamic_lengths %q: allowed %s, %s", s, LengthsByMember, LengthsSpan)
}

// MemberDynamic is a member's dynamic allowance and its inputs.
type MemberDynamic struct {
	Impact  float64 // 1 + I
	LengthM float64 // the determinant or loaded length used
	// Local says the member carries one panel point's floor-beam load (a hanger).
	Local bool
	// Rocking says AREMA's rocking term is in Impact; NoRocking that it could not be, as the
	// truss spacing is not known.
	Rocking, NoRocking bool
	// Basis says in words which allowance, which length and why.
	Basis string
}

// localPoint gives the deck panel point whose load alone a member carries (its influence line
// is non-zero at that panel point only, so only over the two panels next to it), or -1.
func localPoint(ords []float64) int {
	const tiny = 1e-9
	k := -1
	for i, y := range ords {
		if math.Abs(y) > tiny {
			if k >= 0 {
				return -1
			}
			k = i
		}
	}
	return k
}

// memberDynamics gives each member's allowance under d for the bridge.
func memberDynamics(lines *analysis.Lines, b Bridge, d traffic.Dynamic, rule string, spansM []float64) ([]MemberDynamic, error) {
	span, whySpan := lines.SpanM, "span"
	if len(spansM) > 1 {
		span, whySpan = d.LengthFor(spansM), fmt.Sprintf("continuous over %d spans", len(spansM))
	}
	out := make([]MemberDynamic, len(lines.Members))
	for i, l := range lines.Members {
		md := MemberDynamic{LengthM: span}
		why := whySpan
		dd := d
		k := localPoint(l.Ordinates)
		md.Local = k >= 0
		if md.Local && rule != LengthsSpan {
			panel := 0.0
			if k > 0 {
				panel = lines.X[k] - lines.X[k-1]
			}
			if k+1 < len(lines.X) {
				panel = max(panel, lines.X[k+1]-lines.X[k])
			}
			md.LengthM, why = panel, "hanger: longer adjacent panel"
			if (d.Kind == traffic.Phi2 || d.Kind == traffic.Phi3) && b.TrussSpacingM > 0 {
				md.LengthM, why = 2*b.TrussSpacingM, "hanger: 2 × truss spacing"
			}
		}
		if d.LengthM > 0 {
			md.LengthM, why = d.LengthM, "set"
		}
		dd.LengthM = md.LengthM
		if d.Kind == traffic.AREMASteel {
			if b.TrussSpacingM > 0 {
				dd.SpacingM = b.TrussSpacingM // the bridge's own spacing before the fleet's s=
			}
			md.Rocking, md.NoRocking = dd.SpacingM > 0, dd.SpacingM == 0
		}
		md.Impact = dd.Factor(span)
		kind, _, _ := strings.Cut(d.String(), ":")
		md.Basis = fmt.Sprintf("%s, length %s m (%s)", kind, strconv.FormatFloat(md.LengthM, 'f', 2, 64), why)
		switch {
		case md.Rocking:
			md.Basis += fmt.Sprintf(", rocking with trusses %s m apart", strconv.FormatFloat(dd.SpacingM, 'f', 2, 64))
		case md.NoRocking:
			md.Basis += ", no rocking term (truss spacing not known)"
		}
		if !(md.Impact >= 1) || math.IsInf(md.Impact, 0) {
			return nil, fmt.Errorf("dynamic allowance %s gives 1 + I = %v for member %s (length %g m)", d, md.Impact, l.Label, md.LengthM)
		}
		out[i] = md
	}
	return out, nil
}

// DynamicText describes a member's allowance under a scenario: its basis, and the Annex C
// factor of the trains at speed behind its extremes, if any ("" for none).
func DynamicText(m MemberResult, e Envelope) string {
	out := m.Dynamic.Basis
	for _, f := range []SpeedFactor{e.MaxSpeed, e.MinSpeed} {
		if f.Factor > 0 && !strings.Contains(out, "train "+f.Train+" ") {
			out += "; " + f.String()
		}
	}
	return out
}
