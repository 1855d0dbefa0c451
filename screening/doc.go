// Package screening screens bridges: for each one it builds the truss, computes every member's
// influence line, moves the existing and the proposed trains over it for the force envelopes,
// adds the dead load, and rates every member (see the packages below for each step).
//
// ScreenBridge does one bridge and never fails the caller: a bridge that cannot be screened
// (bad geometry, a mechanism, inventory that does not match its geometry) comes back with its
// reason in Result.Err. ScreenAll runs a bounded pool of goroutines over many bridges.
//
// Nothing here touches a database: the store loads the inputs and writes the results.
//
// Forces are in kN per analysed main truss, tension positive. A live-load force is stored
// after the truss's share of the track load and before the dynamic allowance, which is kept
// beside it as Impact (1 + I).
package screening
