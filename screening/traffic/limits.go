package traffic

import (
	"errors"
	"fmt"
	"math"
	"unicode/utf8"
)

// Limits on what a train may be (docs/trains.md). Every train read from input passes them
// (ParseTrainFile, Builtin, ParseSpec): they refuse values no railway runs, typing and unit
// errors among them, and they bound the cost of moving a train over a truss, which grows
// with the number of axles, with the distributed parts, and with the counts of a variable
// consist that are swept.
//
// The longest ordinary freight trains run about 3 km (common practice): some 200 to 300
// wagons of 10 to 20 m with four axles each, behind up to six locomotives of six axles. So
// MaxVehicles and MaxAxles leave room for short wagons, and MaxTrainLengthM for the rare
// longer heavy-haul train. The heaviest axle loads in service are about 40 t, 392 kN (from
// memory), and the heaviest standard load model's distributed load is 150 kN/m (EN 1991-2
// SW/2, from memory): the load limits are five or more times those, far from any real train
// and far below a value typed in newtons; a vehicle's axles carry at most MaxQKNPerM per
// metre of its length (a Cooper E80 locomotive carries about 120 kN/m, from memory). The
// closest axles of real bogies are well over 1 m apart (common practice); MinAxleSpacingM
// also bounds the axles per metre to two.
//
// A variable consist without distributed parts is swept at a few counts only, as many as
// the span holds vehicles (screening/envelope), and one with distributed parts at every count
// until more vehicles can reach the bridge only behind its parts' ends (a few more than the
// span holds): MaxCountsWithParts bounds those all the same, and MaxParts the
// parts (the standard models have one or two). With these limits the costliest trains found
// take a few seconds on the longest truss the geometry admits (BenchmarkEnvelopeLargestTrain
// in screening/envelope), where 1 to 400 counts with a cut part took nearly two minutes.
const (
	// MaxAxleLoadKN is the heaviest axle load, kN.
	MaxAxleLoadKN = 2000.0
	// MaxQKNPerM is the heaviest distributed load, kN/m.
	MaxQKNPerM = 1000.0
	// MinVehicleLengthM is the shortest vehicle, over buffers, m.
	MinVehicleLengthM = 2.0
	// MinAxleSpacingM is the least distance between neighbouring axles of a train, within a
	// vehicle or across a coupling, m.
	MinAxleSpacingM = 0.5
	// MaxVehicles is the most vehicles of a train, its last group at its largest count.
	MaxVehicles = 400
	// MaxAxles is the most axles of a train, its last group at its largest count.
	MaxAxles = 2000
	// MaxTrainLengthM bounds a train's length over buffers, the finite ends of its
	// distributed parts, and the finite lengths of a uniform load, m.
	MaxTrainLengthM = 5000.0
	// MaxParts is the most distributed parts of a train.
	MaxParts = 4
	// MaxCountsWithParts is the most counts, max - min + 1, over which the last group of a
	// train with distributed parts may vary.
	MaxCountsWithParts = 10

	// MaxNameChars bounds a train's and a vehicle's name, in characters.
	MaxNameChars = 200
	// MaxIDChars bounds a vehicle's id in a train file, in characters.
	MaxIDChars = 64
	// MaxNoteChars bounds a train's note, in characters.
	MaxNoteChars = 2000
	// MaxFileBytes bounds a train file: a train is a few dozen lines.
	MaxFileBytes = 1 << 20
)

// LimitError is one limit a train exceeds. It locates the value in the train: Group indexes
// Consist and Axle the axles of that group's vehicle, Part indexes Parts, each -1 when the
// error is not about one; Key names the value ("name", "note", "length", "count", "at",
// "load", "q", "from", "to", "min", "max", "parts"), or is empty when the error is about a
// group as a whole (Group >= 0) or the consist as a whole.
type LimitError struct {
	Group, Axle, Part int
	Key               string
	Msg               string
}

func (e *LimitError) Error() string { return e.Where() + ": " + e.Msg }

// Where names the value at fault in the train's own terms, e.g. "consist[1].vehicle.axles[0].load".
func (e *LimitError) Where() string {
	w := ""
	switch {
	case e.Group >= 0:
		w = fmt.Sprintf("consist[%d]", e.Group)
		if e.Axle >= 0 {
			w += fmt.Sprintf(".vehicle.axles[%d]", e.Axle)
		} else if e.Key == "length" || e.Key == "name" {
			w += ".vehicle"
		}
	case e.Part >= 0:
		w = fmt.Sprintf("parts[%d]", e.Part)
	case e.Key == "q" || e.Key == "min" || e.Key == "max":
		w = "uniform"
	case e.Key == "":
		return "consist"
	}
	if e.Key == "" {
		return w
	}
	if w == "" {
		return e.Key
	}
	return w + "." + e.Key
}

// CheckLimits checks the train against the limits above, and returns every limit exceeded
// as a *LimitError, joined. It expects a train that passes Validate.
func (t *Train) CheckLimits() error {
	var errs []error
	bad := func(group, axle, part int, key, format string, a ...any) {
		errs = append(errs, &LimitError{Group: group, Axle: axle, Part: part, Key: key, Msg: fmt.Sprintf(format, a...)})
	}
	if n := utf8.RuneCountInString(t.Name); n > MaxNameChars {
		bad(-1, -1, -1, "name", "%d characters; at most %d", n, MaxNameChars)
	}
	if n := utf8.RuneCountInString(t.Note); n > MaxNoteChars {
		bad(-1, -1, -1, "note", "%d characters; at most %d", n, MaxNoteChars)
	}
	if u := t.Uniform; u != nil {
		if !(u.QKNPerM <= MaxQKNPerM) {
			bad(-1, -1, -1, "q", "%g kN/m; at most %g kN/m", u.QKNPerM, MaxQKNPerM)
		}
		for _, l := range []struct {
			key string
			v   float64
		}{{"min", u.MinM}, {"max", u.MaxM}} {
			if !math.IsInf(l.v, 1) && !(l.v <= MaxTrainLengthM) {
				bad(-1, -1, -1, l.key, "%g m; at most %g m, or unlimited (inf)", l.v, MaxTrainLengthM)
			}
		}
	}
	t.checkVehicles(bad)
	if len(t.Parts) > MaxParts {
		bad(-1, -1, -1, "parts", "%d distributed parts; at most %d", len(t.Parts), MaxParts)
	}
	for i, p := range t.Parts {
		if !(p.QKNPerM <= MaxQKNPerM) {
			bad(-1, -1, i, "q", "%g kN/m; at most %g kN/m", p.QKNPerM, MaxQKNPerM)
		}
		for _, e := range []struct {
			key string
			v   float64
		}{{"from", p.FromM}, {"to", p.ToM}} {
			if !math.IsInf(e.v, 0) && !(math.Abs(e.v) <= MaxTrainLengthM) {
				bad(-1, -1, i, e.key, "%g m from the train's front; at most %g m either way, or unlimited (inf)", e.v, MaxTrainLengthM)
			}
		}
	}
	return errors.Join(errs...)
}

// checkVehicles checks each group's vehicle, the spacing of neighbouring axles, and the
// whole consist at its largest count.
func (t *Train) checkVehicles(bad func(group, axle, part int, key, format string, a ...any)) {
	vehicles, axles := 0, 0
	length := 0.0
	counted := true
	for i, g := range t.Consist {
		v := g.Vehicle
		if n := utf8.RuneCountInString(v.Name); n > MaxNameChars {
			bad(i, -1, -1, "name", "%d characters; at most %d", n, MaxNameChars)
		}
		if !(v.LengthM >= MinVehicleLengthM) {
			bad(i, -1, -1, "length", "%g m; a vehicle is at least %g m long over buffers", v.LengthM, MinVehicleLengthM)
		}
		weight := 0.0
		for k, a := range v.Axles {
			weight += a.LoadKN
			if !(a.LoadKN <= MaxAxleLoadKN) {
				bad(i, k, -1, "load", "%g kN; at most %g kN", a.LoadKN, MaxAxleLoadKN)
			}
			if k > 0 && !(a.AtM-v.Axles[k-1].AtM >= MinAxleSpacingM) {
				bad(i, k, -1, "at", "%g m behind the axle ahead; neighbouring axles stand at least %g m apart", a.AtM-v.Axles[k-1].AtM, MinAxleSpacingM)
			}
		}
		if v.LengthM >= MinVehicleLengthM && !(weight/v.LengthM <= MaxQKNPerM) {
			bad(i, -1, -1, "length", "%g m carrying %g kN, %.4g kN/m; a vehicle carries at most %g kN per metre of its length", v.LengthM, weight, weight/v.LengthM, MaxQKNPerM)
		}
		// The gap across a coupling: to the vehicle behind in the same group, then to the
		// next group's.
		if g.Max > 1 {
			if gap := coupling(v, v); !(gap >= MinAxleSpacingM) {
				bad(i, -1, -1, "", "%g m between the last axle of one %s and the first of the next; neighbouring axles stand at least %g m apart", gap, v.Name, MinAxleSpacingM)
			}
		}
		if i > 0 {
			if gap := coupling(t.Consist[i-1].Vehicle, v); !(gap >= MinAxleSpacingM) {
				bad(i, -1, -1, "", "%g m between the last axle of the vehicle ahead (%s) and the first of this one; neighbouring axles stand at least %g m apart", gap, t.Consist[i-1].Vehicle.Name, MinAxleSpacingM)
			}
		}
		n := g.Min
		if i == len(t.Consist)-1 {
			n = g.Max
		}
		if n > MaxVehicles {
			bad(i, -1, -1, "count", "%d vehicles; a train has at most %d", n, MaxVehicles)
			counted = false
			continue
		}
		vehicles += n
		axles += n * len(v.Axles)
		length += float64(n) * v.LengthM
	}
	if n := len(t.Consist); n > 0 && len(t.Parts) > 0 {
		if g := t.Consist[n-1]; g.Max-g.Min+1 > MaxCountsWithParts {
			bad(n-1, -1, -1, "count", "varies over %d counts (%d to %d); with distributed parts, at most %d", g.Max-g.Min+1, g.Min, g.Max, MaxCountsWithParts)
		}
	}
	if !counted {
		return
	}
	switch {
	case vehicles > MaxVehicles:
		bad(-1, -1, -1, "", "%d vehicles at the largest count; a train has at most %d", vehicles, MaxVehicles)
	case axles > MaxAxles:
		bad(-1, -1, -1, "", "%d axles at the largest count; a train has at most %d", axles, MaxAxles)
	case !(length <= MaxTrainLengthM):
		bad(-1, -1, -1, "", "%g m long at the largest count; a train is at most %g m long", length, MaxTrainLengthM)
	}
}

// coupling is the distance from the last axle of vehicle a to the first axle of vehicle b
// coupled behind it.
func coupling(a, b Vehicle) float64 {
	if len(a.Axles) == 0 || len(b.Axles) == 0 {
		return math.Inf(1)
	}
	return a.LengthM - a.Axles[len(a.Axles)-1].AtM + b.Axles[0].AtM
}
