// Package fleetgen invents a fleet of truss bridges for demonstrations and benchmarks: the
// inventory of the fictional Northmoor & Eastfell Railway, in the CSV formats the importers
// read (docs/inventory.md).
//
// Each bridge gets a plausible geometry (type, 6 to 16 panels, panel length and depth in the
// usual proportions), a dead load that grows with the span, and member capacities sized the
// way an old design would have sized them: the forces of the design loading of the bridge's
// era (Cooper E-n, heavier for later years) times a margin, with section loss on some older
// members. Some bridges hold stored rating factors for a reference train instead of
// capacities. Nothing here describes a real bridge.
//
// Generation is deterministic for a seed, and streams: one bridge is in memory at a time.
package fleetgen
