package main

import (
	"context"
	"fmt"
	"log/slog"
	"os"
	"os/signal"
	"syscall"
	"time"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/fleetrun"
)

func init() { commands = append(commands, newWorkerCmd) }

func newWorkerCmd(a *app) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "worker",
		Short: "Work the screening jobs of every open run until stopped",
		Long: `worker joins the screening of every open run on the configured database: start one or
more on this or other machines pointing at the same PostgreSQL, next to a "trussfleet screen"
(or after "trussfleet screen" was interrupted). PostgreSQL and the River job tables are the whole
coordination layer. A job whose worker died is handed to another after rescue_after.
SIGINT or SIGTERM stops it: running jobs finish first (up to job_timeout), then it exits.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx, stop := signal.NotifyContext(cmd.Context(), os.Interrupt, syscall.SIGTERM)
			defer stop()
			db, err := a.openDatabase(ctx)
			if err != nil {
				return err
			}
			defer db.Close()
			screeningGC()
			s := a.cfg.Screen
			wc, err := fleetrun.NewWorkerClient(db, fleetrun.WorkerOptions{
				Jobs: s.Jobs, Threads: a.cfg.Workers, JobTimeout: s.JobTimeout, RescueAfter: s.RescueAfter,
				OnChunk: func(run int64, n int) { slog.Info("chunk committed", "run", run, "bridges", n) },
			})
			if err != nil {
				return err
			}
			if err := wc.Start(context.WithoutCancel(ctx)); err != nil {
				return err
			}
			fmt.Fprintf(cmd.ErrOrStderr(), "worker started (pid %d): %d jobs at once, %d threads each\n", os.Getpid(), s.Jobs, a.cfg.Workers)
			// A job completes its run after its commit; a worker that died in between leaves
			// the run open with nothing pending. Any worker completes such runs, now and then,
			// and ends or requeues bridges that are pending with no job left to work them.
			tick := time.NewTicker(30 * time.Second)
			defer tick.Stop()
			for done := false; !done; {
				if err := db.FinishRuns(ctx, 0); err != nil && ctx.Err() == nil {
					slog.Warn("completing finished runs", "err", err)
				}
				if rec, err := wc.RecoverRuns(ctx, 0, s.ChunkSize); err != nil && ctx.Err() == nil {
					slog.Warn("recovering bridges without a job", "err", err)
				} else if rec != (fleetrun.Recovered{}) {
					slog.Warn("bridges pending with no job left", "requeued", rec.Requeued, "failed", rec.Failed)
				}
				select {
				case <-ctx.Done():
					done = true
				case <-tick.C:
				}
			}
			stopCtx, cancel := context.WithTimeout(context.Background(), s.JobTimeout+10*time.Second)
			defer cancel()
			return wc.Stop(stopCtx)
		},
	}
	cmd.Flags().Int("workers", 0, "goroutines screening bridges per job (default: CPUs)")
	return cmd
}
