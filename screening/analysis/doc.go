// Package analysis solves planar pin-jointed trusses by the direct stiffness method and gives
// the influence line of every member force.
//
// The global stiffness matrix is assembled with the joints ordered by position along the span,
// which keeps it banded; it is factorised once (banded Cholesky, gonum) and every unit-load
// case, one downward unit load at each deck panel point, is solved from that one
// factorisation. The same solver serves statically determinate and indeterminate trusses;
// the forces of a determinate truss do not depend on the members' axial stiffness EA, those of
// an indeterminate one do, so member areas may be given (without them every member has the
// same EA).
//
// A mechanism or an unsupported truss makes the stiffness matrix singular; Solve reports it as
// an error (ErrMechanism), never as NaN forces.
//
// Sign convention: tension positive; ordinates are forces per unit downward load (kN per kN).
// Between deck panel points an influence line is linear, because stringers span simply between
// floor beams and bring a load between two panel points to them by the lever rule; beyond the
// bearings it is zero.
package analysis
