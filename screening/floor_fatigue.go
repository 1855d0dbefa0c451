package screening

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/fatigue"
	"github.com/trussfleet/trussfleet/screening/floor"
)

// checkFloorFatigue runs the fatigue check of the rated floor system's elements on their
// bending moments (floor.FatigueLine: a stringer at mid-span, a floor beam under the stringer
// line where its largest live moment stands), with the same settings, trains, S-N curves and
// Miner's sums as the truss members: an element whose moment result holds a section modulus
// and a category is checked, its outcome set on that result (res.Members[first+i] for the
// floor's element i), one without them counts as no data. Shear is not checked: the details
// that shear loads (connections, out-of-plane bending) need a detail assessment.
func (w *Screener) checkFloorFatigue(b Bridge, s *Settings, spanM float64, first int, res *Result, sum *FatigueSummary) error {
	fr, f := w.floorRated, s.Fatigue
	if fr == nil || f == nil {
		return nil
	}
	lengths := floor.DefaultLengths
	if s.FloorLengths != nil {
		lengths = *s.FloorLengths
	}
	// Lines built so far, each from the start of its own panels: a passage's cycles do not
	// depend on where the line stands, so elements of equal panels share their passages.
	var built []*fatigue.Line
	for i, e := range fr.els {
		if e.Effect != floor.Moment {
			continue
		}
		k := first + i
		r := &fatigue.Result{Status: fatigue.NoData}
		res.Members[k].Fatigue = r
		inv := b.Members[e.Label]
		curve, ok, err := fatigueCurve(inv.FatigueCategory, inv.SectionModulusMM3, f)
		if err != nil {
			return fmt.Errorf("floor element %s: %w", e.Element, err)
		}
		if !ok {
			sum.NoData++
			continue
		}
		fl, err := fr.sys.FatigueLine(e.Element, lengths)
		if err != nil {
			return fmt.Errorf("floor element %s, fatigue: %w", e.Element, err)
		}
		line, err := fatigue.NewLine(fromStart(fl.X), fl.Eta)
		if err != nil {
			return fmt.Errorf("floor element %s: %w", e.Element, err)
		}
		line, built = sharedLine(built, line)
		// SpanM bounds the line's extent (a passage's steady count); a panel or two lie within
		// any span, the max keeps it so for any geometry.
		fb := fatigue.Bridge{SpanM: max(spanM, fl.X[len(fl.X)-1]-fl.X[0]), DeterminantM: fl.DeterminantM, YearBuilt: b.YearBuilt, Shares: fl.Shares}
		m := fatigue.Member{Line: line, Curve: curve, SectionModulusMM3: inv.SectionModulusMM3}
		if *r, err = w.fcalc.Check(m, fb, &f.Settings, f.Existing, f.Proposed, nil); err != nil {
			return fmt.Errorf("floor element %s, fatigue: %w", e.Element, err)
		}
		sum.add(k, r)
	}
	return nil
}

// fatigueCurve is the S-N curve of a member's inventory category where the member also holds
// its detail's size (an area, a section modulus: positive and finite); ok is false where
// either is missing, or the category is none of EN 1993-1-9's (an owner's own, another code's
// letter: kept in the inventory as written, the check has no S-N curve for it), and the member
// counts as without data.
func fatigueCurve(category string, size float64, f *FatigueSettings) (c fatigue.Curve, ok bool, err error) {
	cat, has, err := fatigue.ParseCategory(category, f.RivetedCategoryMPa)
	if err != nil || !has || !(size > 0) || math.IsInf(size, 0) {
		return fatigue.Curve{}, false, nil
	}
	c, err = fatigue.NewCurve(cat, f.GammaMf)
	return c, err == nil, err
}

// sharedLine is a line built before that line equals, or the mirror image of one, or one
// that counts another's passages as a multiple of it, or else line itself; built gains the
// line returned.
func sharedLine(built []*fatigue.Line, line *fatigue.Line) (*fatigue.Line, []*fatigue.Line) {
	matched := false
	for _, o := range built {
		if same, mirror := o.Matches(line); same {
			line, matched = o, true
			break
		} else if mirror {
			line, matched = o.Mirror(), true
			break
		}
	}
	// A line that is a multiple of another's counts that line's passages
	// (fatigue.Line.CountedAs): exact to rounding.
	for k := 0; k < len(built) && !matched; k++ {
		if p, ok := line.CountedAs(built[k]); ok {
			line, matched = p, true
		}
	}
	return line, append(built, line)
}

// fromStart is x measured from its first point.
func fromStart(x []float64) []float64 {
	out := make([]float64, len(x))
	for j, v := range x {
		out[j] = v - x[0]
	}
	return out
}
