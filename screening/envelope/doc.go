// Package envelope moves trains over a truss's influence lines and finds, for every member,
// the largest tension and the largest compression a train can cause, where the train stands
// when it does, and how much of it is on the bridge.
//
// Input is independent of how the lines were found: ascending deck panel points x (m) and, per
// member, the force (kN per kN, tension positive) caused by a unit load at each panel point.
// Stringers spanning simply between floor beams deliver a load between two panel points by
// the lever rule, which is exactly linear interpolation of the line; the line is zero beyond
// x[0] and x[last] (the line of analysis.Interpolate, whose areas analysis.Areas gives).
//
// The extremes are exact, not stepped. A rigid train's effect is linear in its position
// between the positions where some axle stands over some vertex of the line (a panel point or
// a bearing), so the extreme is at one of them; distributed parts make the pieces quadratic,
// adding their stationary points. One sweep per direction visits those positions in order,
// carrying every member's value and slope, so a truss costs one sweep per train, not one per
// member; each member is brought up to date only at the vertices where its own line kinks
// (and, for a cut part, where its running extreme moves), so most positions touch few members. Parts applied only where unfavourable (Load Model 71) follow the positive or
// negative part of each line; a part cut at the unfavourable length (Cooper's trailing load)
// follows the running extreme of the line's integral. A variable consist is swept only at the
// counts that show the bridge different loadings (only vehicles on the bridge matter: once
// more vehicles can reach the bridge only behind everything but the repeated vehicle, more
// change nothing); a rake of 1 to n identical vehicles is swept as windows of an endless
// train, phase by phase (windows.go); and a uniform load of variable length is placed over
// its best feasible interval directly. A train too large to sweep (MaxEvents) is refused with ErrTooLarge.
//
// Typical use in a screening run:
//
//	lines, _ := envelope.NewLines(x, ordinates) // once per truss
//	load, _ := envelope.Prepare(train)          // once per train
//	var calc envelope.Calculator                // one per goroutine
//	res, err = calc.Envelope(lines, load, envelope.Options{Share: 0.5}, res[:0])
//
// Values are in kN, multiplied by Options.Factor (share of the track load and dynamic
// allowance). Inputs are never modified.
package envelope
