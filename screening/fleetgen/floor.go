package fleetgen

import (
	"encoding/csv"
	"math"
	"math/rand/v2"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/floor"
)

// floorRand draws the floor systems from a stream of their own, so that adding them left the
// rest of a fleet of a given seed as it was.
func floorRand(seed uint64) *rand.Rand {
	return rand.New(rand.NewPCG(seed^0x5f10a5, seed+0x2545f4914f6cdd1d))
}

// inventFloor gives a share of the bridges a described floor system: stringer lines 1.5 to
// 2.0 m apart, their dead load, a floor beam's weight (invented, plausible for open-deck
// riveted floors), and appends the bridges.csv columns. A bridge without a cross-section gets
// one: trusses 4.6 to 5.4 m apart for one track, 8.8 to 9.6 m for two, the floor beams' span.
func inventFloor(r *rand.Rand, share float64, b *screening.Bridge, row []string) []string {
	if !(r.Float64() < share) {
		return append(row, "", "", "")
	}
	fs := screening.FloorSystem{Rate: true,
		StringerSpacingM:    round(1.5+0.5*r.Float64(), 0.05),
		StringerDeadKNPerM:  round(2+1.5*r.Float64(), 0.1),
		FloorBeamDeadKNPerM: round(2.5+1.5*r.Float64(), 0.1),
	}
	b.Floor = fs
	spacing := round(4.6+0.8*r.Float64(), 0.1)
	if b.Tracks > 1 {
		spacing = round(8.8+0.8*r.Float64(), 0.1)
	}
	if b.TrackOffsetsM == nil {
		// The floor beams span between the trusses: the bridge gives its cross-section, its
		// track (or two tracks 4.5 m apart) centred, so each truss still takes half of each
		// track's load.
		b.TrussSpacingM, b.TrackOffsetsM = spacing, []float64{0}
		offsets := "0"
		if b.Tracks > 1 {
			b.TrackOffsetsM, offsets = []float64{-2.25, 2.25}, "-2.25 2.25"
		}
		row[BridgeColumn("truss_spacing_m")], row[BridgeColumn("track_offsets_m")] = f(spacing), offsets
		row[BridgeColumn("truss_share")], row[BridgeColumn("tracks")] = "", ""
	}
	return append(row, f(fs.StringerSpacingM), f(fs.StringerDeadKNPerM), f(fs.FloorBeamDeadKNPerM))
}

// writeFloor writes a member row per floor element with its moment and shear capacities,
// sized as the truss members are: for the design loading times the bridge's margin, or for
// today's traffic (the reference train) with a little to spare where the design left it short.
// The proposed heavier axles raise the floor's effects nearly in proportion to the axle load,
// so on some bridges a floor element is the first to fall short, as in practice. Each element
// also has a section modulus (its moment capacity at about 165 MPa working stress, as the
// members' areas are sized) and detail category 71 (riveted), for its fatigue check.
func writeFloor(w *csv.Writer, r *rand.Rand, b screening.Bridge, res screening.Result, margin float64) error {
	if !b.Floor.Rate {
		return nil
	}
	caps := map[string][2]float64{}
	var order []string
	for _, m := range res.Members {
		el, eff, ok := floor.ResultEffect(m.Label)
		if !ok {
			continue
		}
		k := margin * (0.95 + 0.25*r.Float64())
		spare := 1.03 + 0.3*r.Float64()
		c := round(math.Max(demandT(m.Dead, m.Existing)*k, demandT(m.Dead, m.Proposed)*spare), 1)
		if _, seen := caps[el]; !seen {
			order = append(order, el)
		}
		v := caps[el]
		if eff == floor.Moment {
			v[0] = c
		} else {
			v[1] = c
		}
		caps[el] = v
	}
	for _, el := range order {
		c := caps[el]
		if err := w.Write([]string{b.ID, el, "", "", "", "", "1", "", "71", f(c[0]), f(c[1]), f(sectionModulus(c[0]))}); err != nil {
			return err
		}
	}
	return nil
}

// sectionModulus is the section modulus (mm³) that carries a moment capacity (kN·m) at about
// 165 MPa working stress: kN·m x 1e6 = N·mm, over N/mm².
func sectionModulus(momentKNM float64) float64 {
	return round(momentKNM*1e6/165, 1e4)
}
