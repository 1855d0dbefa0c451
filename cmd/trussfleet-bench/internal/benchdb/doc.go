// Package benchdb is the database side of the fleet-run benchmark (cmd/trussfleet-bench):
// the COPY floor a run's time is compared with, settling the database before a measurement,
// and deleting the benchmark's runs afterwards.
//
// It holds SQL of its own, outside store, because none of it is part of the program users
// install: the floor copies a run's result rows into scratch tables of the same shape, and
// a benchmark deletes its runs so that repeated measurements do not fill the disk. Being
// internal to cmd/trussfleet-bench, only the benchmark program can import it.
//
// Every function takes the pool of a store.DB (store.DB.Pool) and leaves the program's own
// tables as it found them, but for DeleteRun, which removes the run it is given.
package benchdb
