// Package network rates bridges the way owners open lines to heavier traffic: by line
// category (EN 15528: an axle load and a mass per metre, A to E5) and by Cooper E rating.
//
// Categories. Each category has an axle load P (t) and a mass per metre w (t/m); the values in
// Categories are recalled from EN 15528, not copied from it: check them against the edition
// in force. The categories are only partly ordered: a category dominates another when both its
// axle load and its mass per metre are at least as large (D4 dominates C4; C4, 20 t and
// 8.0 t/m, and D2, 22.5 t and 6.4 t/m, do not compare).
//
// Reference wagon trains. The standard defines reference wagons for each category; they are
// not reproduced here. This package stands in for them with wagons of its own, stated in full
// so that a result can be checked by hand: every category's train is a consist of 1 to
// WagonsMax identical four-axle wagons, each axle carrying the category's axle load P, the
// wagon as long over buffers as the mass per metre requires, L = 4 P / w, with two two-axle
// bogies whose axles stand BogieAxlesM (1.8 m) apart and whose outer axles stand EndAxleM
// (1.5 m) behind the front buffer and ahead of the rear one. The consist's count varies, so
// that the exact envelope (screening/envelope) covers a short rake on part of the span as
// well as a long train over all of it. A train stands in for the standard's wagons; it is
// not them, and a category found here is a screening result, not the line's classification.
//
// Cost. Two categories whose P / w are equal have the same wagon geometry, and live-load
// effects are linear in the loads: their envelopes differ by the factor of their axle loads.
// Geometries gives the eight distinct geometries of the eleven categories, each as a train of
// unit axle load (1 kN), so that a bridge is swept eight times for all categories, not eleven.
//
// Carried and highest. A category passes when every rated member keeps RF >= 1 under its
// train with the dynamic allowance; it is carried when it and every category it dominates
// pass (a line open to D4 is open to C4). The highest categories carried are the maximal
// elements of the carried set (Highest): with the partial order there may be two (C4 and D2).
//
// Limit. Whether the axle load or the mass per metre limits a category at its limiting member
// is read from how that member's live effect depends on each: the effect E(P, w) of a scaled
// train is homogeneous of degree one in (P, w) jointly, so the two elasticities
// e_P = d ln E / d ln P and e_w = d ln E / d ln w add up to one; and E = P S(L) with S the
// effect of the unit-axle train of wagon length L = 4 P / w, so e_w = -d ln S / d ln L. The
// derivative is taken as the secant over the swept geometries, from the shortest wagon to the
// longest (AxleLoadGoverns): a member loaded by one bogie group (a stringer, a floor beam, a
// hanger) has S nearly independent of L, e_w near 0, and the axle load limits it; a long
// chord under a full train has S nearly proportional to 1 / L, e_w near 1, and the mass per
// metre limits it. The axle load is named the limit where e_P >= 1/2.
//
// Cooper E rating. A member's E rating is 80 times its rating factor under Cooper E80
// (ERating): the live-load effect is linear in the loads, so the E-n loading that leaves the
// member at RF = 1 is E(80 RF). A bridge's E rating is its worst member's.
//
// Lines. Weakest gives, for a line's bridges and a category, the bridges that keep the line
// from it; Corridor puts a line's bridges in chainage order with, for each category, its
// weakest links and what upgrading them would open.
//
// Screening is not a load rating: local codes, the owner's standards and licensed engineers
// govern. Inputs are never modified.
package network
