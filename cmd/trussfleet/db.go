package main

import (
	"context"
	"fmt"
	"io"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgserver"
)

func init() { commands = append(commands, newDBCmd) }

func newDBCmd(a *app) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "db",
		Short: "The database: start, stop or inspect the embedded server, migrate, print its URL",
		Long: `trussfleet keeps its inventory and results in PostgreSQL. With no database URL configured
(--database-url, TRUSSFLEET_DATABASE_URL or database.url) it runs a private server of its own
from the machine's PostgreSQL binaries, in the data directory (--data-dir, default
$XDG_DATA_HOME/trussfleet/pg), listening on a Unix socket only and letting in only the
operating-system user who runs trussfleet (peer authentication). Commands that need the
database start it; it keeps running for the next command until 'trussfleet db stop'.`,
	}
	cmd.AddCommand(
		&cobra.Command{Use: "start", Short: "Start the embedded server (initialising its data directory on first use)", Args: cobra.NoArgs,
			RunE: func(cmd *cobra.Command, _ []string) error {
				srv, err := a.embedded(cmd.OutOrStdout())
				if srv == nil || err != nil {
					return err
				}
				if err := srv.Start(cmd.Context()); err != nil {
					return err
				}
				st := srv.Status()
				fmt.Fprintf(cmd.OutOrStdout(), "running: pid %d, data directory %s\n", st.PID, st.DataDir)
				return nil
			}},
		&cobra.Command{Use: "stop", Short: "Stop the embedded server", Args: cobra.NoArgs,
			RunE: func(cmd *cobra.Command, _ []string) error {
				srv, err := a.embedded(cmd.OutOrStdout())
				if srv == nil || err != nil {
					return err
				}
				if !srv.Status().Running {
					fmt.Fprintln(cmd.OutOrStdout(), "not running")
					return nil
				}
				if err := srv.Stop(cmd.Context()); err != nil {
					return err
				}
				fmt.Fprintln(cmd.OutOrStdout(), "stopped")
				return nil
			}},
		&cobra.Command{Use: "status", Short: "Say which server is used and whether it runs", Args: cobra.NoArgs,
			RunE: func(cmd *cobra.Command, _ []string) error { return a.dbStatus(cmd.Context(), cmd.OutOrStdout()) }},
		&cobra.Command{Use: "migrate", Short: "Bring the schema up to date (commands that need it do this too)", Args: cobra.NoArgs,
			RunE: func(cmd *cobra.Command, _ []string) error {
				opt, err := a.storeOptions()
				if err != nil {
					return err
				}
				db, err := store.Open(cmd.Context(), opt)
				if err != nil {
					return err
				}
				defer db.Close()
				a.sayDatabase(opt)
				applied, err := db.Migrate(cmd.Context())
				for _, m := range applied {
					fmt.Fprintln(cmd.OutOrStdout(), "applied", m)
				}
				if err != nil {
					return err
				}
				cur, _, err := db.SchemaVersion(cmd.Context())
				if err != nil {
					return err
				}
				fmt.Fprintf(cmd.OutOrStdout(), "schema is current (version %d)\n", cur)
				return nil
			}},
		&cobra.Command{Use: "url", Short: "Print a connection string (psql accepts it), starting the embedded server if needed", Args: cobra.NoArgs,
			Long: `url prints the connection string of the embedded server, starting it if needed, or the
configured database URL with any password shown as xxxxx: trussfleet prints no password.`,
			RunE: func(cmd *cobra.Command, _ []string) error {
				if a.cfg.Database.URL != "" {
					fmt.Fprintln(cmd.OutOrStdout(), store.RedactConnString(a.cfg.Database.URL))
					return nil
				}
				srv, err := a.embedded(io.Discard)
				if err != nil {
					return err
				}
				if err := srv.Start(cmd.Context()); err != nil {
					return err
				}
				fmt.Fprintln(cmd.OutOrStdout(), srv.URL(pgserver.Database))
				return nil
			}},
	)
	return cmd
}

// embedded returns the embedded server, or nil after saying so when a URL is configured:
// then trussfleet starts and stops nothing.
func (a *app) embedded(w io.Writer) (*pgserver.Server, error) {
	if a.cfg.Database.URL != "" {
		fmt.Fprintln(w, "a database URL is configured: trussfleet uses that server and starts or stops none")
		return nil, nil
	}
	opt, err := a.storeOptions()
	if err != nil {
		return nil, err
	}
	return store.Embedded(opt)
}

func (a *app) dbStatus(ctx context.Context, w io.Writer) error {
	if a.cfg.Database.URL == "" {
		srv, err := a.embedded(w)
		if err != nil {
			return err
		}
		st := srv.Status()
		fmt.Fprintf(w, "embedded server\n  data directory  %s\n  initialised     %v", st.DataDir, st.Initialized)
		if st.Initialized {
			fmt.Fprintf(w, " (PostgreSQL %s)", st.Version)
		}
		fmt.Fprintf(w, "\n  binaries        %s\n  runs as         %s\n  socket in       %s\n", srv.BinDir(), st.RunsAs, st.SocketDir)
		if !st.Running {
			fmt.Fprintln(w, "  running         no (commands that need it start it)")
			return nil
		}
		fmt.Fprintf(w, "  running         yes, pid %d\n  url             %s\n", st.PID, st.URL)
	} else {
		fmt.Fprintln(w, "configured server (database URL)")
	}
	opt, err := a.storeOptions()
	if err != nil {
		return err
	}
	db, err := store.Open(ctx, opt)
	if err != nil {
		return err
	}
	defer db.Close()
	a.sayDatabase(opt)
	cur, latest, err := db.SchemaVersion(ctx)
	if err != nil {
		return err
	}
	fmt.Fprintf(w, "  schema          version %d of %d", cur, latest)
	if cur < latest {
		fmt.Fprint(w, " (run trussfleet db migrate)")
	}
	fmt.Fprintln(w)
	return nil
}
