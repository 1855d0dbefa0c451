// Package runreport reads a stored run into the report's model (package screening/report):
// the run with its plan's trains and settings and its totals, its priority list, and a
// bridge's page with every member's stored envelopes and rating factors, in the order of the
// bridge's geometry. Package store reads the rows; this package turns them into what the
// report and the explanation show, so that store never sees a screening type.
package runreport
