// Package store is trussfleet's system of record in PostgreSQL, through pgx: its tables and
// the queries on them, and nothing else. It knows no screening type: a run's orchestration
// (package fleetrun) and the report's reading of a run (package runreport) call it with
// plain values (ids, strings, numbers, byte streams) and its own row structs.
//
// Open connects to the server a URL names or, when there is none, starts trussfleet's own
// embedded server (package store/pgserver) and connects to that. Migrate brings the schema
// (package sql, then River's own tables) up to date; it is safe to run from several
// processes at once.
//
// The queries of each table live in a file of their own, which names the migrations that
// made the table: the inventory (bridges.go, members.go, trains.go, import_batches.go), the
// runs (runs.go, run_bridges.go), the results (result_sets.go, member_results.go,
// member_assessments.go) and the screening jobs in River's table (river_job.go). Reads that
// join tables for one reader have a file of their reader: the priority list (rank.go), the
// comparison of two runs (diff.go), pruning (prune.go). Every statement names its columns.
//
// The result tables, member_results and member_assessments, are spelled once: a slice of
// columns (columns.go) pairs each column's name with the field of the row struct
// (MemberResult, MemberAssessment) holding its value, and their COPY statements, the order a
// CopyEncoder writes their rows in (PostgreSQL's binary COPY format) and the SELECT that
// reads them back all come from it. The outcome a job writes to a bridge's run_bridges row
// is spelled once the same way (SetOutcomes).
//
// Bulk loads of the inventory go through an Import: rows are copied (COPY) into a temporary
// staging table inside one transaction, checked there for keys repeated within the file,
// and merged into the table by one INSERT ... ON CONFLICT ... DO UPDATE that touches only
// rows whose values changed. Nothing is written unless the whole file is good: the importer
// rolls the transaction back on any error.
//
// A transaction that ends a bridge, queues work, imports a file or deletes a run asks for a
// durable commit (Durable), whatever the server's synchronous_commit.
//
// Units are kN and m throughout, as in the column names.
package store
