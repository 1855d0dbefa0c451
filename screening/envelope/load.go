package envelope

import (
	"fmt"
	"math"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// Load is a train prepared for sweeping: its axles and the ends of its distributed parts as
// offsets behind its front, grouped so that a variable consist can be cut at any count.
// Prepare it once per train and use it for any number of trusses; it is read-only and safe
// for concurrent use.
type Load struct {
	name    string
	train   *traffic.Train
	uniform *traffic.Uniform

	// fixed holds the axles of every group but the last, and the part ends (unit 0); unit the
	// axles of one vehicle of the last group, measured from that vehicle's front.
	fixed   []item
	unit    []item
	unitLen float64
	r0      float64 // offset of the last group's first vehicle
	nMin    int
	nMax    int
	// periodic: no distributed parts, so a long run of identical last vehicles looks the same
	// from the bridge after a shift by one vehicle length (see counts).
	periodic bool
	hasUnfav bool
	hasCut   bool
	cutFrom  float64
	// initial value of each part reaching indefinitely ahead (it covers the whole bridge while
	// the train approaches), by which area it multiplies.
	ahead []aheadPart
}

type aheadPart struct {
	q    float64
	mode traffic.PartMode
}

type itemKind uint8

const (
	axle     itemKind = iota // a point load w (kN)
	wholeEnd                 // an end of a part applied whole: +q at its front end, -q at its rear
	unfavEnd                 // an end of a part applied where unfavourable
	cutFront                 // the start of a part cut at the unfavourable length
)

type item struct {
	d    float64 // distance behind the train's front, m
	w    float64
	kind itemKind
	unit int32 // which vehicle of the last group carries it (1-based); 0: always present
}

// Prepare checks a train and prepares it for sweeping.
func Prepare(t *traffic.Train) (*Load, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("train %q: %w", t.Name, err)
	}
	ld := &Load{name: t.Name, train: t}
	if t.Uniform != nil {
		u := *t.Uniform
		ld.uniform = &u
		return ld, nil
	}
	if n := len(t.Consist); n > 0 {
		last := t.Consist[n-1]
		ld.r0 = t.FixedLengthM()
		ld.nMin, ld.nMax = last.Min, last.Max
		ld.unitLen = last.Vehicle.LengthM
		for _, a := range t.Axles(0) {
			ld.fixed = append(ld.fixed, item{d: a.AtM, w: a.LoadKN, kind: axle})
		}
		for _, a := range last.Vehicle.Axles {
			ld.unit = append(ld.unit, item{d: a.AtM, w: a.LoadKN, kind: axle})
		}
	}
	ld.periodic = len(t.Parts) == 0
	for _, p := range t.Parts {
		switch p.Mode {
		case traffic.Whole, traffic.WhereUnfavourable:
			kind := wholeEnd
			if p.Mode == traffic.WhereUnfavourable {
				kind = unfavEnd
				ld.hasUnfav = true
			}
			if math.IsInf(p.FromM, -1) {
				ld.ahead = append(ld.ahead, aheadPart{q: p.QKNPerM, mode: p.Mode})
			} else {
				ld.fixed = append(ld.fixed, item{d: p.FromM, w: p.QKNPerM, kind: kind})
			}
			if !math.IsInf(p.ToM, 1) {
				ld.fixed = append(ld.fixed, item{d: p.ToM, w: -p.QKNPerM, kind: kind})
			}
		case traffic.CutUnfavourable:
			ld.hasCut = true
			ld.cutFrom = p.FromM
			ld.fixed = append(ld.fixed, item{d: p.FromM, w: p.QKNPerM, kind: cutFront})
		}
	}
	return ld, nil
}

// Name is the train's name.
func (ld *Load) Name() string { return ld.name }

// Train is the train the load was prepared from.
func (ld *Load) Train() *traffic.Train { return ld.train }

// count is one sweep of a variable consist: the train with sweep vehicles in its last group
// stands for the train with report vehicles (report >= sweep); placements whose bridge
// window reaches the last swept vehicle move back by (report - sweep) vehicle lengths.
type count struct{ sweep, report int }

// counts lists the sweeps that cover every count from nMin to nMax on a span of spanM.
//
// Only vehicles on the bridge matter. With no distributed parts, a window of the span's
// length that sees the train's fixed front part cannot see beyond the first k = ceil(span /
// vehicle length) + 1 vehicles of the last group, a window that sees the train's tail sees
// none of its fixed part once the group has k + 1 vehicles, and windows over the group alone
// repeat with the vehicle length. So any count of at least k + 1 = cMax shows the bridge the
// same loadings as cMax itself, shifted along the train, and the sweeps are the counts below
// cMax plus one at cMax standing for the rest.
func (ld *Load) counts(spanM float64) []count {
	if len(ld.unit) == 0 {
		return []count{{ld.nMin, ld.nMin}}
	}
	if !ld.periodic {
		out := make([]count, 0, ld.nMax-ld.nMin+1)
		for n := ld.nMin; n <= ld.nMax; n++ {
			out = append(out, count{n, n})
		}
		return out
	}
	cMax := int(math.Ceil(spanM/ld.unitLen)) + 2
	var out []count
	for n := ld.nMin; n <= min(ld.nMax, cMax-1); n++ {
		out = append(out, count{n, n})
	}
	if ld.nMax >= cMax {
		out = append(out, count{cMax, max(ld.nMin, cMax)})
	}
	return out
}

// items lays out the train with n vehicles in its last group: fixed items, then the axles of
// vehicles 1..n tagged with their vehicle number.
func (ld *Load) items(n int, dst []item) []item {
	dst = append(dst[:0], ld.fixed...)
	for v := 1; v <= n; v++ {
		front := ld.r0 + float64(v-1)*ld.unitLen
		for _, it := range ld.unit {
			it.d += front
			it.unit = int32(v)
			dst = append(dst, it)
		}
	}
	return dst
}

// lengthM is the train's length over buffers with n vehicles in its last group.
func (ld *Load) lengthM(n int) float64 {
	if len(ld.unit) == 0 {
		return ld.r0
	}
	return ld.r0 + float64(n)*ld.unitLen
}
