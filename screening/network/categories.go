package network

import (
	"fmt"
	"math"
	"sort"

	"github.com/trussfleet/trussfleet/screening/traffic"
)

// KNPerTonne converts a mass in tonnes to its weight in kN (standard gravity, 9.80665 m/s²).
const KNPerTonne = 9.80665

// Category is a line category: an axle load and a mass per metre.
type Category struct {
	Name string
	// AxleLoadT is the axle load, t; MassPerMT the mass per metre, t/m.
	AxleLoadT, MassPerMT float64
}

// Categories are the EN 15528 line categories, values from memory (check them against the
// edition in force), in the standard's order: A, B1, B2, C2, C3, C4, D2, D3, D4, E4, E5.
var Categories = []Category{
	{"A", 16, 5.0},
	{"B1", 18, 5.0},
	{"B2", 18, 6.4},
	{"C2", 20, 6.4},
	{"C3", 20, 7.2},
	{"C4", 20, 8.0},
	{"D2", 22.5, 6.4},
	{"D3", 22.5, 7.2},
	{"D4", 22.5, 8.0},
	{"E4", 25, 8.0},
	{"E5", 25, 8.8},
}

// ByName finds a category by its name.
func ByName(name string) (Category, bool) {
	for _, c := range Categories {
		if c.Name == name {
			return c, true
		}
	}
	return Category{}, false
}

// Index is the category's place in Categories (-1 for none).
func Index(name string) int {
	for i, c := range Categories {
		if c.Name == name {
			return i
		}
	}
	return -1
}

// AxleLoadKN is the axle load's weight, kN.
func (c Category) AxleLoadKN() float64 { return c.AxleLoadT * KNPerTonne }

// QKNPerM is the weight per metre, kN/m.
func (c Category) QKNPerM() float64 { return c.MassPerMT * KNPerTonne }

// Dominates says whether c is at least as heavy as o in both axle load and mass per metre
// (every category dominates itself).
func (c Category) Dominates(o Category) bool {
	return c.AxleLoadT >= o.AxleLoadT && c.MassPerMT >= o.MassPerMT
}

// Comparable says whether one of the two categories dominates the other.
func Comparable(a, b Category) bool { return a.Dominates(b) || b.Dominates(a) }

// The reference wagon's geometry (the project's own, standing in for the standard's).
const (
	// WagonAxles is the number of axles of a reference wagon.
	WagonAxles = 4
	// BogieAxlesM is the distance between the two axles of a bogie, m.
	BogieAxlesM = 1.8
	// EndAxleM is the distance from a buffer to the nearer outer axle, m.
	EndAxleM = 1.5
	// WagonsMax is the largest count of wagons of a reference train (about 600 to 860 m):
	// more change nothing on any span the geometry admits.
	WagonsMax = 60
)

// WagonLengthM is the reference wagon's length over buffers, L = 4 P / w, m.
func (c Category) WagonLengthM() float64 { return WagonAxles * c.AxleLoadT / c.MassPerMT }

// wagonTrain is a train of minCount to WagonsMax reference wagons of the length, each axle
// carrying axleKN.
func wagonTrain(name string, lengthM, axleKN float64, minCount int) *traffic.Train {
	return wagonRake(name, lengthM, axleKN, minCount, WagonsMax)
}

// wagonRake is a train of minCount to maxCount reference wagons of the length, each axle
// carrying axleKN.
func wagonRake(name string, lengthM, axleKN float64, minCount, maxCount int) *traffic.Train {
	v := traffic.Vehicle{Name: name + " reference wagon", LengthM: lengthM}
	for _, at := range []float64{EndAxleM, EndAxleM + BogieAxlesM, lengthM - EndAxleM - BogieAxlesM, lengthM - EndAxleM} {
		v.Axles = append(v.Axles, traffic.Axle{AtM: at, LoadKN: axleKN})
	}
	return &traffic.Train{
		Name:    name,
		Note:    "trussfleet reference wagons standing in for the EN 15528 ones (category values from memory)",
		Consist: []traffic.Group{{Vehicle: v, Min: minCount, Max: maxCount}},
	}
}

// Train is the category's reference wagon train (see the package comment).
func (c Category) Train() *traffic.Train {
	return wagonTrain("category "+c.Name, c.WagonLengthM(), c.AxleLoadKN(), 1)
}

// Geometry is a wagon geometry shared by categories of equal P / w.
type Geometry struct {
	LengthM float64
	// Unit is the train of this geometry with a unit axle load (1 kN): a category's envelope
	// is Unit's times its AxleLoadKN.
	Unit *traffic.Train
	// Long is Unit always WagonsMax wagons long. Where every influence line changes sign at
	// most once, its envelope is Unit's (LongSuffices), and it is swept at one count instead of
	// one for each count of wagons the span can hold.
	Long *traffic.Train
	// Categories index Categories.
	Categories []int
}

// lengthTolM is how close two wagon lengths must be to count as one geometry.
const lengthTolM = 1e-9

// Geometries lists the distinct wagon geometries of the categories, shortest wagon first.
func Geometries() []Geometry {
	var out []Geometry
	for i, c := range Categories {
		l := c.WagonLengthM()
		found := false
		for k := range out {
			if math.Abs(out[k].LengthM-l) < lengthTolM {
				out[k].Categories = append(out[k].Categories, i)
				found = true
			}
		}
		if !found {
			out = append(out, Geometry{LengthM: l, Categories: []int{i}})
		}
	}
	sort.Slice(out, func(a, b int) bool { return out[a].LengthM < out[b].LengthM })
	for k := range out {
		out[k].Unit = wagonTrain(fmt.Sprintf("reference wagons %.4g m", out[k].LengthM), out[k].LengthM, 1, 1)
		out[k].Long = wagonTrain(fmt.Sprintf("reference wagons %.4g m", out[k].LengthM), out[k].LengthM, 1, WagonsMax)
	}
	return out
}

// Closure turns the categories that pass into those carried: a category is carried when it
// and every category it dominates pass. pass and the result index Categories.
func Closure(pass []bool) []bool {
	out := make([]bool, len(Categories))
	for i, c := range Categories {
		out[i] = pass[i]
		for k, o := range Categories {
			if c.Dominates(o) && !pass[k] {
				out[i] = false
			}
		}
	}
	return out
}

// Highest names the maximal elements of a set of categories (indexing Categories), in the
// standard's order: those no other member of the set dominates.
func Highest(set []bool) []string {
	var out []string
	for i, c := range Categories {
		if !set[i] {
			continue
		}
		top := true
		for k, o := range Categories {
			if k != i && set[k] && o.Dominates(c) {
				top = false
			}
		}
		if top {
			out = append(out, c.Name)
		}
	}
	return out
}

// CooperE is the number of the Cooper loading a rating is stated against (E80).
const CooperE = 80

// ERating is the Cooper E rating of a rating factor under Cooper E80: 80 RF.
func ERating(rfE80 float64) float64 { return CooperE * rfE80 }

// AxleLoadGoverns says whether the axle load, rather than the mass per metre, limits a
// member's live effect, from its unit-axle effects sShort and sLong under the shortest and
// the longest reference wagons (lengths lShort < lLong; see the package comment): the axle
// load governs where e_P = 1 + ln(sLong/sShort) / ln(lLong/lShort) >= 1/2. A member the
// trains do not load has no limit; it reads as the axle load.
func AxleLoadGoverns(sShort, sLong, lShort, lLong float64) bool {
	if !(sShort > 0) || !(sLong > 0) {
		return true
	}
	eL := math.Log(sLong/sShort) / math.Log(lLong/lShort)
	return 1+eL >= 0.5
}

// Limit names what limits a category at its limiting member.
type Limit string

// The two limits.
const (
	LimitAxleLoad     Limit = "axle load"
	LimitMassPerMetre Limit = "mass per metre"
)

// signTol is the size below which an ordinate counts as zero in LongSuffices (rounding
// residue of the analysis): this share of the line's largest ordinate, or of a unit force
// per unit load where that is larger (a member the deck loads do not reach, such as a Pratt
// truss's unloaded middle vertical, has only residue).
const signTol = 1e-9

// LongSuffices says whether, for influence lines with these ordinates at the deck panel
// points, the envelope of a reference train of WagonsMax wagons equals that of 1 to
// WagonsMax wagons (Geometry.Long for Geometry.Unit). It does where every line changes sign
// at most once along the span (the signs of its non-zero ordinates, in order, change at most
// once): then each sign's region is an interval reaching a bearing, or the whole span. Why:
// the wagons are symmetric and all alike, so any rake of n wagons is part of the long train
// at the same place, in either direction. For the largest effect of one sign, the rake's
// farthest axle from its front stands where the line has that sign or beyond (else the rake
// only takes from the effect); the long train run with its front where the rake's is, the
// body trailing towards the bearing the region reaches, adds axles only beyond that axle,
// where the line has that sign or the bridge has ended. So the long train does at least as
// much as any rake, and a rake of WagonsMax wagons is the long train. A line with two sign
// changes or more (a region that reaches neither bearing) needs the rakes.
func LongSuffices(ordinates [][]float64) bool {
	for _, eta := range ordinates {
		big := 0.0
		for _, v := range eta {
			big = math.Max(big, math.Abs(v))
		}
		changes, last := 0, 0.0
		for _, v := range eta {
			if math.Abs(v) <= signTol*math.Max(big, 1) {
				continue
			}
			if last != 0 && (v > 0) != (last > 0) {
				changes++
			}
			last = v
		}
		if changes > 1 {
			return false
		}
	}
	return true
}
