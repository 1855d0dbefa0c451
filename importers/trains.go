package importers

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/trussfleet/trussfleet/internal/excerpt"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
)

// maxTrainFile bounds a train file's size, as the train parser does.
const maxTrainFile = traffic.MaxFileBytes

// ImportTrains checks and stores the train file at path, or every .yaml and .yml file of
// the directory at path. Each is parsed with the traffic package and stored under its
// train's name with its text and SHA-256. On any error nothing is written. The import's
// digest is the file's SHA-256, or for a directory the SHA-256 of the sorted lines
// "<sha256>  <file name>" (the form sha256sum prints).
func ImportTrains(ctx context.Context, db *store.DB, path string, opts Options) (Result, error) {
	res := Result{File: path, Kind: store.KindTrains, Checked: opts.Check}
	files, err := trainFiles(path)
	if err != nil {
		return res, err
	}
	errs := &errorList{file: path}
	var rows []store.Staged[store.Train]
	seen := map[string]string{}
	var digests []string
	for i, f := range files {
		t, err := readTrain(f)
		if err != nil {
			addTrainErrors(errs, f, err)
			continue
		}
		if first, dup := seen[t.Name]; dup {
			errs.add(&FieldError{File: f, Msg: fmt.Sprintf("train name %q is also the name of the train in %s", excerpt.Cut(t.Name), first)})
			continue
		}
		seen[t.Name] = f
		digests = append(digests, t.SHA256+"  "+t.FileName)
		rows = append(rows, store.Staged[store.Train]{Line: i + 1, Row: t})
	}
	if err := errs.err(); err != nil {
		return res, err
	}
	res.SHA256 = digests[0][:64]
	if len(files) > 1 || isDir(path) {
		sort.Strings(digests)
		sum := sha256.Sum256([]byte(strings.Join(digests, "\n") + "\n"))
		res.SHA256 = hex.EncodeToString(sum[:])
	}
	im, err := db.BeginImport(ctx, store.KindTrains, path)
	if err != nil {
		return res, err
	}
	defer im.Rollback(ctx)
	if _, err := store.Stage(ctx, im, func(yield func(store.Staged[store.Train]) bool) {
		for _, r := range rows {
			if !yield(r) {
				return
			}
		}
	}); err != nil {
		return res, err
	}
	if res.Counts, err = im.Merge(ctx); err != nil {
		return res, err
	}
	if opts.Check {
		return res, nil
	}
	if err := im.Commit(ctx, res.SHA256, res.Counts); err != nil {
		return res, err
	}
	res.BatchID = im.ID()
	return res, nil
}

// trainFiles lists the file, or the directory's train files in name order.
func trainFiles(path string) ([]string, error) {
	if !isDir(path) {
		if _, err := os.Stat(path); err != nil {
			return nil, err
		}
		return []string{path}, nil
	}
	var files []string
	for _, pat := range []string{"*.yaml", "*.yml"} {
		m, err := filepath.Glob(filepath.Join(path, pat))
		if err != nil {
			return nil, err
		}
		files = append(files, m...)
	}
	sort.Strings(files)
	if len(files) == 0 {
		return nil, fmt.Errorf("%s: no train files (*.yaml, *.yml) in this directory", path)
	}
	return files, nil
}

func isDir(path string) bool {
	st, err := os.Stat(path)
	return err == nil && st.IsDir()
}

// readTrain reads and parses one train file.
func readTrain(path string) (store.Train, error) {
	f, err := os.Open(path)
	if err != nil {
		return store.Train{}, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxTrainFile+1))
	if err != nil {
		return store.Train{}, fmt.Errorf("%s: %w", path, err)
	}
	if len(data) > maxTrainFile {
		return store.Train{}, fmt.Errorf("%s: larger than %d bytes: not a train file", path, maxTrainFile)
	}
	t, err := traffic.ParseTrainFile(path, data)
	if err != nil {
		// The traffic package's message names the file, the line and the field (a NUL byte
		// or invalid UTF-8 included), and the limits of a train exceeded.
		return store.Train{}, err
	}
	sum := sha256.Sum256(data)
	return store.Train{Name: t.Name, FileName: filepath.Base(path), Source: string(data), SHA256: hex.EncodeToString(sum[:])}, nil
}

// addTrainErrors adds a train file's errors to errs, each naming the file once with its line
// and the key at fault.
func addTrainErrors(errs *errorList, file string, err error) {
	for _, e := range unjoin(err) {
		var fe *traffic.FileError
		if !errors.As(e, &fe) {
			errs.add(&FieldError{File: file, Msg: strings.TrimPrefix(e.Error(), file+": ")})
			continue
		}
		msg := fe.Msg
		if fe.Field != "" {
			msg = fe.Field + ": " + msg
		}
		errs.add(&FieldError{File: file, Line: fe.Line, Column: fe.Column, Msg: msg})
	}
}

// unjoin lists the errors of an errors.Join, or err alone.
func unjoin(err error) []error {
	if j, ok := err.(interface{ Unwrap() []error }); ok {
		return j.Unwrap()
	}
	return []error{err}
}
