package units

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Conversion factors: 1 ft = 0.3048 m exactly, 1 kip = 4.4482216 kN.
const (
	MPerFt   = 0.3048
	KNPerKip = 4.4482216
	// KNPerMPerKipPerFt converts kip/ft to kN/m (about 14.5939).
	KNPerMPerKipPerFt = KNPerKip / MPerFt
)

// System is a system of units for output.
type System int

const (
	// SI prints m, kN, kN·m and kN/m, as trussfleet computes.
	SI System = iota
	// Imperial prints ft, kip, kip-ft and kip/ft.
	Imperial
)

// Parse reads the units setting: "si" or "imperial" (any case; empty is SI).
func Parse(s string) (System, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "si":
		return SI, nil
	case "imperial":
		return Imperial, nil
	}
	return SI, fmt.Errorf("units %q: want si or imperial", s)
}

// String is the setting's spelling: si or imperial.
func (s System) String() string {
	if s == Imperial {
		return "imperial"
	}
	return "si"
}

// Quantity is the kind of a value, which decides its unit and its rounding.
type Quantity int

const (
	// Length in m (SI) or ft.
	Length Quantity = iota
	// Force in kN or kip.
	Force
	// Moment in kN·m or kip-ft.
	Moment
	// PerLength is a load per length, kN/m or kip/ft.
	PerLength
)

type unit struct {
	name, column string // for headings and for CSV column names
	decimals     int
}

var table = [2][4]unit{
	SI: {
		Length:    {"m", "m", 2},
		Force:     {"kN", "kn", 1},
		Moment:    {"kN·m", "knm", 1},
		PerLength: {"kN/m", "kn_per_m", 2},
	},
	Imperial: {
		Length:    {"ft", "ft", 1},
		Force:     {"kip", "kip", 1},
		Moment:    {"kip-ft", "kip_ft", 1},
		PerLength: {"kip/ft", "kip_per_ft", 2},
	},
}

func (s System) unit(q Quantity) unit { return table[s][q] }

// Convert turns an SI value (m, kN, kN·m, kN/m) of quantity q into the system's unit.
// Dividing by the factor, rather than multiplying by its inverse, gives 50 ft for 15.24 m.
func (s System) Convert(q Quantity, si float64) float64 {
	if s == SI {
		return si
	}
	switch q {
	case Length:
		return si / MPerFt
	case Force:
		return si / KNPerKip
	case Moment:
		return si / KNPerKip / MPerFt
	case PerLength:
		return si / KNPerMPerKipPerFt
	}
	panic(fmt.Sprintf("units: unknown quantity %d", q))
}

// Name is the unit for a heading: m, kN, kN·m, kN/m or ft, kip, kip-ft, kip/ft.
func (s System) Name(q Quantity) string { return s.unit(q).name }

// Column is the unit as a CSV column suffix: m, kn, knm, kn_per_m or ft, kip, kip_ft,
// kip_per_ft (span_m, span_ft).
func (s System) Column(q Quantity) string { return s.unit(q).column }

// Decimals is the number of decimals Format keeps for quantity q.
func (s System) Decimals(q Quantity) int { return s.unit(q).decimals }

// Format converts an SI value of quantity q and rounds it for reading.
func (s System) Format(q Quantity, si float64) string {
	return Fixed(s.Convert(q, si), s.Decimals(q))
}

// Exact converts an SI value of quantity q and writes it without floating-point noise: at
// most 6 decimals, trailing zeros dropped (15.288768000000001 m is 15.288768; in ft, 50.16).
// It is for outputs that are read in again, where display rounding would change the input.
func (s System) Exact(q Quantity, si float64) string {
	v := s.Convert(q, si)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	t := Fixed(v, 6)
	if strings.Contains(t, ".") {
		t = strings.TrimRight(strings.TrimRight(t, "0"), ".")
	}
	return t
}

// Fixed writes v with the given decimals and no negative zero (-0.04 at one decimal is 0.0).
func Fixed(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}
