// Package fatigue finds how fast each member's fatigue life is used up by the trains that
// cross it: the force history of one passage, its stress cycles, and their damage on the
// member's S-N curve.
//
// One passage. A member's force under a train is the sum of each axle's load times the
// influence line at the axle (and of each distributed part's load per metre times the line's
// area under it). The line is straight between panel points and zero beyond the bearings, so
// as the train moves the force is straight (with distributed parts, a parabola) between the
// positions where an axle or a part's end passes a vertex of the line where it kinks: History
// visits exactly those positions, in order, starting and ending with the bridge empty, and
// adds each parabola's turning point. Nothing is stepped, so no peak is missed; the largest and
// smallest values of the history are the member's envelope under that train (screening/
// envelope, which the tests check). A passage is one definite train: a consist of a variable
// count runs at its largest count, and loads that are envelopes of many trains (Load Model
// 71's parts where unfavourable, Cooper's trailing load, a uniform load of variable length)
// are refused with ErrNotAPassage, since no real train applies them.
//
// Cycles. Turning keeps the history's peaks and valleys; RainflowRepeated counts a passage's
// cycles as one of the passages that follow one another (ASTM E1049's rainflow counting for
// repeating histories: the history started at its highest point, then Rainflow, the
// three-point method), so that a passage's largest range, max - min, is one full cycle. Stress range = force range
// (kN) times the truss's share of the track, times the fatigue dynamic factor, divided by
// the member's area (mm², giving MPa via kN/mm² x 1000). A bending element (a stringer or a
// floor beam, Member.SectionModulusMM3) has a moment line instead: stress range = moment range
// (kN·m) times its share of the track, times the dynamic factor taken at its own determinant
// length (Bridge.DeterminantM), divided by its section modulus (mm³; kN·m/mm³ x 1e6 = MPa).
//
// Damage. Curve is an S-N curve of the shape of EN 1993-1-9 (values from memory; check them
// against the edition in force): the detail category is the range at 2e6 cycles, slope 3 to
// the constant-amplitude limit at 5e6 cycles, slope 5 to the cut-off at 1e8 cycles, nothing
// below. Damage is the Palmgren-Miner sum n/N, each range multiplied by the partial factor
// gamma_Mf. DynamicFactor is EN 1991-2 Annex C's fatigue factor 1 + (phi' + phi”/2)/2 for a
// train at a known speed (from memory).
//
// Shared work. A Calculator counts each passage once per bridge (Forget between bridges): a
// train in both scenarios once, a member of a symmetric truss over its mirror image's
// passages run the other way (Line.Mirror), and a member whose line is a multiple of another's
// over that line's passages with its ranges scaled (Line.CountedAs; equal to rounding). A long
// train is counted from two shorter ones (steady), the longer walking on from the shorter's
// state where they part; members whose lines kink at the same panel points share the merged
// list of the positions where a load passes a kink. Only the turning points of a passage are
// gathered: a point inside a straight run of one sense is passed over.
//
// Units: m, kN, MPa; forces tension positive. Inputs are never modified. A Calculator holds
// scratch space; give each goroutine its own.
//
//	line, _ := fatigue.NewLine(x, eta)     // once per member
//	tr, _ := fatigue.PrepareTrain(train)   // once per train
//	var c fatigue.Calculator
//	h := c.History(line, tr, fatigue.LeftToRight, nil)
//	cycles, _, _ := fatigue.RainflowRepeated(fatigue.Turning(h, fatigue.TurningTol(h), nil), nil, nil, nil)
//	d := curve.Damage(cycles, share*factor*1000/areaMM2) // damage of one passage
//
// Screening is not an assessment of remaining fatigue life: it ranks where a licensed
// engineer should look first. Local codes, the owner's standards and licensed engineers
// govern.
package fatigue
