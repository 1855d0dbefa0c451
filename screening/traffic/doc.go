// Package traffic describes the trains that cross a bridge: axle loads at fixed spacings,
// vehicles assembled into consists, distributed parts, and uniform loads of variable length,
// together with the dynamic allowance applied to their effect.
//
// Units are kN and m throughout. Imperial values (kip, ft, kip/ft) are converted once, where
// they are read (train files that say `units: imperial`, the AREMA models).
//
// A Train is either
//   - a consist of vehicles (each with axle positions measured from its front and a length over
//     buffers), optionally with distributed parts placed relative to the train's front; the
//     last vehicle of the consist may repeat a variable number of times (for example 1 to 60
//     wagons behind two locomotives), and the envelope then covers every length in that range;
//     or
//   - a uniform load of variable length (Uniform): q per metre, loaded over any interval of
//     the bridge no longer than its maximum length and at least its minimum length, unless the
//     interval touches a bearing (the train entering or leaving).
//
// Distributed parts apply whole (EN 1991-2 SW/0 and SW/2), only where unfavourable (the 80 kN/m
// of Load Model 71 beyond the axle group), or cut at whatever length is unfavourable (the
// trailing uniform of AREMA's Cooper E-series).
//
// The built-in standard models (Builtin, ParseSpec) carry values recalled from EN 1991-2 and the
// AREMA Manual, not copied from them: check them against the edition in force before relying
// on a result.
//
// Trains are values: no function here modifies a Train it is given.
package traffic
