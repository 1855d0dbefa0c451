// Package fleetrun screens a fleet in runs: it creates a run, cuts it into jobs, works the
// jobs in any number of processes on one PostgreSQL database, writes each bridge's results
// exactly once, and sees the run to its end whatever fails on the way. It depends on package
// store for every table it touches (no SQL is written here) and on package screening for the
// engineering (no database is seen there).
//
// # A run
//
// A run is one screening of the whole inventory under one plan (screening.Plan: the trains
// of both scenarios and the settings, stored with the run; ResolveTrain finds a train a plan
// names). Its picture holds one row per bridge (store's run_bridges): pending, then done
// with its summary and the result set it names, or failed with its reason. A full run holds
// a row for every bridge. A run created with NewRun.Changed holds rows only for what differs
// from the latest completed run: each bridge's input hash (InputHash: the plan's hash, the
// bridge's geometry and loads, its members) is compared with that run's, and an unchanged
// bridge is carried forward with no row and no job. Results are stored once per content: a
// bridge whose rows are those of a stored result set names that set and writes no rows.
//
// # Jobs
//
// CreateRun writes the run, its rows and one River job (ChunkArgs) per chunk of pending
// bridges in one transaction. A worker client (NewWorkerClient; Start it) works the jobs of
// every open run: a job loads its still-pending bridges and takes their input hashes of the
// rows loaded, screens them with screening.ScreenAll, and in one transaction locks their
// rows, stores their result sets, writes their outcomes and completes the job
// (river.JobCompleteTx).
//
// # Exactly once
//
// A bridge's results, its row's outcome and its job's completion commit together, after the
// bridge's row is locked and found pending: a second attempt at the same chunk (a rescued
// job whose first attempt committed) finds its bridges done and writes nothing. After its
// commit a job completes the run if nothing is left pending, in a statement of its own
// without a lock: of two jobs committing at once, the later commit sees both, so one of them
// completes the run. A process that dies between its commit and that check leaves a run with
// nothing pending: Run, Resume and Work complete such runs (store's FinishRuns).
//
// # How every job ending ends its bridges
//
// Whatever happens, each bridge of a run ends done, failed with its reason, or in another
// open job, so that every run ends:
//
//   - a job that fails is retried by River; its last attempt records the error on its
//     pending bridges instead of failing again (on a fresh context when its own ran out);
//   - a chunk whose screening outlasts the job timeout is split into one job per bridge
//     (screening is deterministic: the same chunk would time out again), and a one-bridge
//     job that times out fails its bridge with the timeout as reason;
//   - a job that River ends without the worker (discarded by the rescuer after its worker
//     died too often, cancelled, or cleaned away) leaves its bridges pending in no open job.
//     The sweep RecoverRuns fails them with the job's last error, or queues them again when
//     the job completed without its results or is gone (at most maxRequeues times; then they
//     fail too). Resume sweeps at its start, Run when it finds bridges pending and no open
//     job (every five seconds at most), Work every thirty seconds.
//
// # Durability
//
// Every transaction that ends a bridge or queues work (results, failures, splits, sweeps,
// the run's creation) asks for a durable commit (store.Durable), whatever the server's
// synchronous_commit: were a job's commit acknowledged and then lost in a crash of the
// server, River's completer would complete the job again on the recovered server and its
// bridges would stay pending with no job. While Run waits, a database that went away is
// waited for (up to two minutes): the workers retry their jobs meanwhile.
//
// # A run's lifecycle in a process
//
// Run creates a run and works it to its end in this process, telling its progress through
// Options.Progress; other processes running Work on the same database share its jobs.
// Cancelling its context interrupts it: the jobs running here are cancelled (their
// transactions roll back), the run is marked interrupted (*Interrupted), and Resume finishes
// it later, in this process or another.
package fleetrun
