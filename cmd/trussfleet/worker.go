package main

import (
	"fmt"
	"log/slog"
	"os"
	"os/signal"
	"syscall"

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
			wo := a.workerOptions()
			wo.OnChunk = func(run int64, n int) { slog.Info("chunk committed", "run", run, "bridges", n) }
			return fleetrun.Work(ctx, db, fleetrun.Options{Worker: wo, ChunkSize: s.ChunkSize, Logger: slog.Default(),
				Started: func() {
					fmt.Fprintf(cmd.ErrOrStderr(), "worker started (pid %d): %s at once, %s each\n", os.Getpid(), plural(s.Jobs, "job"), plural(a.cfg.Workers, "thread"))
				},
			})
		},
	}
	cmd.Flags().Int("workers", 0, "goroutines screening bridges per job (default: CPUs)")
	return cmd
}
