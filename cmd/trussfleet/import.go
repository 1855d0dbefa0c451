package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/importers"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newImportCmd) }

func newImportCmd(a *app) *cobra.Command {
	var check bool
	cmd := &cobra.Command{
		Use:   "import",
		Short: "Load inventory files into the database (formats: docs/inventory.md)",
		Long: `Each file is checked whole before anything is written: every error is listed with its
line, column and value, and a file with any error writes nothing. Rows are matched on their
natural key (bridge_id; bridge_id and member; train name): new rows are inserted, changed rows
updated, and re-importing the same file changes nothing. Stored rows absent from the file are
kept, except that "import members --replace" removes the stored member rows, absent from the
file, of every bridge the file has rows for (use it when a bridge's geometry changed).`,
	}
	cmd.PersistentFlags().BoolVar(&check, "check", false, "check the file and show what would change; write nothing")
	var sheet string
	var replace bool
	sub := func(use, short string, run func(ctx context.Context, db *store.DB, path string, o importers.Options) (importers.Result, error)) *cobra.Command {
		return &cobra.Command{Use: use, Short: short, Args: cobra.ExactArgs(1),
			RunE: func(cmd *cobra.Command, args []string) error {
				db, err := a.openDatabase(cmd.Context())
				if err != nil {
					return err
				}
				defer db.Close()
				res, err := run(cmd.Context(), db, args[0], importers.Options{Check: check, Sheet: sheet, Replace: replace})
				if err != nil {
					return err
				}
				printImport(cmd.OutOrStdout(), res)
				return nil
			}}
	}
	bridges := sub("bridges FILE", "Import bridges.csv (or a sheet of an .xlsx workbook): one row per span", importers.ImportBridgesFile)
	members := sub("members FILE", "Import members.csv (or a sheet of an .xlsx workbook): members' stored capacities (the bridges must be imported first)", importers.ImportMembersFile)
	for _, c := range []*cobra.Command{bridges, members} {
		c.Flags().StringVar(&sheet, "sheet", "", "the sheet of an .xlsx workbook to read (default: the first)")
	}
	members.Flags().BoolVar(&replace, "replace", false,
		"the file is the whole truth for the bridges it has rows for: remove their stored member rows that it does not list")
	cmd.AddCommand(bridges, members,
		sub("trains FILE|DIR", "Import a train file, or every .yaml train file of a directory", importers.ImportTrains),
		sub("trusses FILE", "Import joint tables: the trusses of bridges whose truss_type is table (the bridges must be imported first)", importers.ImportTrussTablesFile),
	)
	return cmd
}

func printImport(w io.Writer, r importers.Result) {
	c := r.Counts
	if r.Checked {
		fmt.Fprintf(w, "%s: %s checked, no errors; nothing written. An import would insert %d, update %d, leave %d unchanged%s.\n",
			r.File, plural(c.Rows, "row"), c.Inserted, c.Updated, c.Unchanged, removed(r, ", remove %d"))
	} else {
		fmt.Fprintf(w, "%s: %s: %d inserted, %d updated, %d unchanged%s (import %d, sha256 %s)\n",
			r.File, plural(c.Rows, "row"), c.Inserted, c.Updated, c.Unchanged, removed(r, ", %d removed"), r.BatchID, r.SHA256)
	}
	if r.Format != "" {
		// A sheet's name is the workbook's own text.
		fmt.Fprintf(w, "  read as %s\n", safetext.Terminal(r.Format))
	}
	for _, n := range r.Notes {
		// A note quotes bridge ids, the file's own text.
		fmt.Fprintf(w, "  %s\n", safetext.Terminal(n))
	}
	if len(r.Ignored) > 0 {
		// The names are the file's own header text.
		fmt.Fprintf(w, "  columns not used by trussfleet, ignored: %s\n", safetext.Terminal(strings.Join(r.Ignored, ", ")))
	}
}

// removed words a replacing import's count of removed rows with format; "" for an import
// that does not replace, which removes nothing.
func removed(r importers.Result, format string) string {
	if !r.Replaced {
		return ""
	}
	return fmt.Sprintf(format, r.Counts.Deleted)
}
