package importers

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/trussfleet/trussfleet/internal/excerpt"
	"github.com/trussfleet/trussfleet/store"
)

// Options control an import.
type Options struct {
	// Check validates the file and computes the counts an import would give, inside a
	// transaction that is rolled back: nothing is written.
	Check bool
	// Sheet names the sheet of an .xlsx workbook to read; "" reads the first.
	Sheet string
	// Replace, for a members import only: the file is the whole truth for every bridge it
	// has rows for, so stored member rows of those bridges that the file does not list are
	// deleted in the same transaction (Counts.Deleted). Bridges the file does not mention
	// keep their rows.
	Replace bool
}

// Result says what an import did (or, with Options.Check, would do).
type Result struct {
	File     string
	Kind     store.Kind
	Counts   store.Counts
	Ignored  []string // columns of the file that trussfleet does not use
	Format   string   // how the file was read, when not UTF-8 with commas (Report.Format)
	Checked  bool     // Options.Check: nothing was written
	Replaced bool     // Options.Replace: Counts.Deleted says how many stored rows the file dropped
	BatchID  int64    // the import_batches row, 0 when nothing was written
	SHA256   string   // of the file as read
	Notes    []string // what the import found besides its counts (joint tables: each truss's degree of indeterminacy)
}

// ImportBridgesFile imports a bridges CSV file from disk.
func ImportBridgesFile(ctx context.Context, db *store.DB, path string, opts Options) (Result, error) {
	return withFile(path, func(f *os.File) (Result, error) { return ImportBridges(ctx, db, path, f, opts) })
}

// ImportMembersFile imports a members CSV file from disk.
func ImportMembersFile(ctx context.Context, db *store.DB, path string, opts Options) (Result, error) {
	return withFile(path, func(f *os.File) (Result, error) { return ImportMembers(ctx, db, path, f, opts) })
}

func withFile(path string, f func(*os.File) (Result, error)) (Result, error) {
	file, err := os.Open(path)
	if err != nil {
		return Result{File: path}, err
	}
	defer file.Close()
	return f(file)
}

// ImportBridges checks and loads a bridges CSV read from r; file names it in messages and
// in the import record. On any error nothing is written and the error is a *FileErrors.
func ImportBridges(ctx context.Context, db *store.DB, file string, r io.Reader, opts Options) (Result, error) {
	return load(ctx, db, store.KindBridges, file, r, opts, []string{"bridge_id"},
		func(r io.Reader, emit func(store.Staged[store.Bridge]) bool) (Report, error) {
			return parseBridges(file, r, opts.Sheet, emit)
		})
}

// ImportMembers checks and loads a members CSV read from r against the bridges stored in
// db, as ImportBridges does.
func ImportMembers(ctx context.Context, db *store.DB, file string, r io.Reader, opts Options) (Result, error) {
	bridges, err := db.Bridges(ctx)
	if err != nil {
		return Result{File: file}, err
	}
	trains, err := db.Trains(ctx)
	if err != nil {
		return Result{File: file}, err
	}
	geom := NewStoredGeometry(bridges).WithTrains(trains)
	if err := geom.withTables(ctx, db); err != nil {
		return Result{File: file}, err
	}
	return load(ctx, db, store.KindMembers, file, r, opts, []string{"bridge_id", "member", "truss"},
		func(r io.Reader, emit func(store.Staged[store.Member]) bool) (Report, error) {
			return parseMembers(file, r, opts.Sheet, geom, emit)
		})
}

// load streams one CSV file through parse into a staging table and merges it, or writes
// nothing when any row is bad or a key repeats.
func load[T store.Row](ctx context.Context, db *store.DB, kind store.Kind, file string, r io.Reader, opts Options,
	key []string, parse func(io.Reader, func(store.Staged[T]) bool) (Report, error)) (Result, error) {
	res := Result{File: file, Kind: kind, Checked: opts.Check, Replaced: opts.Replace}
	if opts.Replace && kind != store.KindMembers {
		return res, fmt.Errorf("%s: replacing applies to a members file only, not to %s", file, kind)
	}
	im, err := db.BeginImport(ctx, kind, file)
	if err != nil {
		return res, err
	}
	defer im.Rollback(ctx)
	h := sha256.New()
	var rep Report
	var perr error
	_, err = store.Stage(ctx, im, func(yield func(store.Staged[T]) bool) {
		rep, perr = parse(io.TeeReader(r, h), yield)
	})
	res.Ignored, res.Format = rep.Ignored, rep.Format
	if perr != nil {
		return res, perr
	}
	if err != nil {
		return res, fmt.Errorf("%s: %w", file, err)
	}
	if err := duplicateErrors(ctx, im, file, key, rep); err != nil {
		return res, err
	}
	if res.Counts, err = im.Merge(ctx); err != nil {
		return res, fmt.Errorf("%s: %w", file, err)
	}
	if opts.Replace {
		if res.Counts.Deleted, err = im.DropAbsent(ctx); err != nil {
			return res, fmt.Errorf("%s: %w", file, err)
		}
	}
	res.SHA256 = hex.EncodeToString(h.Sum(nil))
	if opts.Check {
		return res, nil // the deferred rollback discards it all
	}
	if err := im.Commit(ctx, res.SHA256, res.Counts); err != nil {
		return res, err
	}
	res.BatchID = im.ID()
	return res, nil
}

// duplicateErrors reports every key that appears on more than one line, at each repeat.
func duplicateErrors(ctx context.Context, im *store.Import, file string, key []string, rep Report) error {
	dups, err := im.Duplicates(ctx, MaxErrors)
	if err != nil || len(dups) == 0 {
		return err
	}
	errs := &errorList{file: file, sheet: rep.Sheet}
	// A key column the file does not have (members.csv's optional truss) is left out of the
	// message: its value is the default for every row.
	var names []string
	var at []int
	for i, k := range key {
		if _, ok := rep.columns[k]; ok || i == 0 {
			names, at = append(names, k), append(at, i)
		}
	}
	last := names[len(names)-1]
	for _, d := range dups {
		vals := make([]string, len(at))
		for i, k := range at {
			vals[i] = d.Key[k]
		}
		for _, line := range d.Lines[1:] {
			errs.add(&FieldError{Line: line, Column: rep.columns[last], Field: last, Value: vals[len(vals)-1],
				Msg: fmt.Sprintf("%s %s repeated: first on line %d", strings.Join(names, ", "), excerpt.List(vals, len(vals)), d.Lines[0])})
		}
	}
	return errs.err()
}
