// Package sql holds trussfleet's database schema as numbered migrations, embedded in the
// binary so that a trussfleet executable can bring any PostgreSQL database it is pointed at
// up to the schema it expects.
//
// Each file in migrations/ is named NNN_what.sql and holds the statements that bring the
// schema from version NNN-1 to NNN; the text after the line
//
//	---- create above / drop below ----
//
// undoes it. Migrations are applied in order, each in a transaction, under an advisory lock
// (store.Migrate does this with tern). A migration, once released, is never edited: a change
// is a new, higher-numbered file.
//
// The inventory tables are bridges, members (stored capacities), trains and import_batches.
// The screening tables (runs, per-bridge work items, member results) come in later files.
//
// Units follow the project rule: kN and m throughout; column names say so where it helps
// (span_m, capacity_tension_kn).
package sql
