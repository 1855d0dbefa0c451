// Package importers reads the owner's inventory files, checks every row, and loads them
// into the store: bridges.csv (one row per span), members.csv (stored capacities) and train
// files. docs/inventory.md describes the formats.
//
// The CSV readers are written for files from the real world: any column order, UTF-8 with
// or without a byte-order mark, CRLF line ends, quoted fields with commas or line breaks,
// blank lines, spaces around values, and imperial columns (span_ft, capacity_tension_kip,
// ...) converted to kN and m on reading (1 ft = 0.3048 m, 1 kip = 4.4482216 kN).
//
// Every error names the file, line, column and value, and all errors of a file are
// reported (up to MaxErrors, then a count), not only the first. A file with any error writes
// nothing: rows stream through a COPY into a staging table of one transaction, which is
// rolled back. A good file is merged on its natural key, so re-importing it changes nothing
// and a changed row is updated; each import is recorded with the file's SHA-256 and counts.
// With Options.Check the file is checked, and the counts it would give computed, inside a
// transaction that is always rolled back.
//
// Files are streamed, never read whole: memory does not grow with the file's size beyond
// the store's per-bridge geometry cache. The row parsers are pure functions of the text
// (ParseBridges, ParseMembers) and are fuzzed.
package importers
