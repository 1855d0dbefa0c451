// Package rating turns member forces into rating factors and flags, and ranks bridges.
//
// For each member and traffic scenario it takes the dead-load force D, the live-load envelope
// (largest tension Lt ≥ 0 and largest compression Lc ≤ 0 from the scenario's trains) and the
// dynamic allowance I, and gives a rating factor in each sense that the live load acts in:
//
//	working stress: RF = (C − D) / (L (1 + I))
//	factored:       RF = (φC − γD·D) / (γL·L (1 + I))
//
// with C the capacity in the sense checked (scaled by the member's condition factor), D and L
// taken positive where they act in that sense. Tension and compression are checked
// separately. Where the inventory holds no capacity in a sense but a rating factor RF_ref for a
// reference train rated in that sense, the load-effect ratio gives
// RF = RF_ref · L_ref(1 + I_ref) / (L (1 + I)). A stored rating factor rates one sense only:
// the one the inventory names, or else the one in which the reference train's dead plus live
// force governs. A loaded sense with neither a capacity nor a stored rating factor is unrated;
// unrated members are counted per bridge, and flagged only where the settings ask for it.
//
// RF ≥ 1 means the member carries the loading under the idealisation; it is a screening
// figure, not a load rating. Forces are in kN, tension positive.
package rating
