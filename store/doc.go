// Package store is trussfleet's system of record: the inventory (bridges, their members'
// stored capacities, trains) and the record of every import, in PostgreSQL through pgx.
//
// Open connects to the server a URL names or, when there is none, starts trussfleet's own
// embedded server (package store/pgserver) and connects to that. Migrate brings the schema
// (package sql) up to date; it is safe to run from several processes at once.
//
// The queries of each table live in a file of their own (bridges.go, members.go, trains.go,
// import_batches.go). Bulk loads go through an Import: rows are copied (COPY) into a
// temporary staging table inside one transaction, checked there for keys repeated within
// the file, and merged into the table by one INSERT ... ON CONFLICT ... DO UPDATE that
// touches only rows whose values changed. Nothing is written unless the whole file is good:
// the importer rolls the transaction back on any error.
//
// Units are kN and m throughout, as in the column names.
package store
