// Package units converts trussfleet's SI results into the units a person asked to read them
// in, and rounds them for reading.
//
// Everything inside trussfleet is kN and m. Only what is printed for people (terminal tables,
// CSV exports, the HTML report, the explanation) passes through this package, once, at the
// moment it is written: a System names the units (SI: m, kN, kN·m, kN/m; Imperial: ft, kip,
// kip-ft, kip/ft), Convert turns an SI value into them, and Format rounds it to the precision
// a screening result deserves (lengths to 0.01 m or 0.1 ft, forces and moments to 0.1 kN or
// 0.1 kip, loads per length to 0.01). JSON outputs never use it: they stay full-precision SI.
//
// The factors are the exact definitions: 1 ft = 0.3048 m, 1 kip = 1000 lbf = 4.4482216 kN
// (the pound-force, 4.4482216152605 N, rounded to the figure the trade uses).
//
// Example:
//
//	u, _ := units.Parse("imperial")
//	u.Format(units.Length, 15.288768000000001) // "50.2"
//	u.Name(units.Length)                       // "ft"
package units
