// Package truss builds the geometry of a planar, pin-jointed railway truss from the few
// parameters an owner's inventory holds: type, span, number of panels, depth, deck position
// and end-post form.
//
// Joints L0..Ln lie on the bottom chord at x = i·L/n, y = 0; top joints U.. lie at y = h.
// The left bearing (a pin) is at L0 and the right bearing (a roller) at Ln. The deck panel
// points, where the floor beams bring the track load into the truss, are the bottom joints of
// a through truss and the top joints of a deck truss.
//
// Member labels join the two joint names with "-", the joint with the smaller x first and the
// L joint first where x is equal: "L0-L1", "U1-U2", "L1-U1", "U1-L2". Every member has a kind
// (top-chord, bottom-chord, vertical, diagonal, end-post).
//
// Types are generated from a table (see Types): each entry says which parameters it needs and
// lays out its joints and members. Every generated type is statically determinate and stable
// (m + 3 = 2j). Units are metres throughout.
package truss
