package traffic

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"slices"
	"strings"
)

// ParseSpec resolves a train named on the command line: a built-in model with parameters
// ("lm71:alpha=1.33", "sw2", "cooper:e=80", "uniform:q=20,min=12,max=48"), a train file path,
// or the name of a file (with or without .yaml) in trains, a folder of train files such as
// the embedded example trains or os.DirFS(dir); trains may be nil. An unknown name is an
// error that lists the built-in models and the files in trains.
func ParseSpec(spec string, trains fs.FS) (*Train, error) {
	spec = strings.TrimSpace(spec)
	if t, ok, err := Builtin(spec); ok {
		return t, err
	}
	data, err := readFile(spec)
	if err == nil {
		return ParseTrainFile(spec, data)
	}
	if !errors.Is(err, fs.ErrNotExist) {
		return nil, fmt.Errorf("train %q: %w", spec, err)
	}
	if trains != nil && fs.ValidPath(spec) {
		names := []string{spec}
		if path.Ext(spec) == "" {
			names = append(names, spec+".yaml", spec+".yml")
		}
		for _, name := range names {
			data, err := fs.ReadFile(trains, name)
			if errors.Is(err, fs.ErrNotExist) {
				continue
			}
			if err != nil {
				return nil, fmt.Errorf("train %q: %w", spec, err)
			}
			return ParseTrainFile(name, data)
		}
	}
	if strings.ContainsRune(spec, '/') || strings.HasSuffix(spec, ".yaml") || strings.HasSuffix(spec, ".yml") {
		return nil, unknownTrain("train file " + spec + ": not found")
	}
	msg := fmt.Sprintf("train %q: no built-in model, train file or named train of that name; built-in: %s", spec, strings.Join(BuiltinNames(), "; "))
	if files := trainFiles(trains); len(files) > 0 {
		msg += "; named trains: " + strings.Join(files, ", ")
	}
	return nil, unknownTrain(msg)
}

// ErrUnknownTrain is returned (wrapped) by ParseSpec when a spec names no built-in model, no
// train file and no named train, so that a caller may look further (a stored train).
var ErrUnknownTrain = errors.New("unknown train")

// unknownTrain is ParseSpec's message for a spec it cannot find; it is ErrUnknownTrain.
type unknownTrain string

func (e unknownTrain) Error() string        { return string(e) }
func (e unknownTrain) Is(target error) bool { return target == ErrUnknownTrain }

// readFile reads a train file, no more of it than ParseTrainFile takes.
func readFile(name string) ([]byte, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return io.ReadAll(io.LimitReader(f, MaxFileBytes+1))
}

func trainFiles(trains fs.FS) []string {
	if trains == nil {
		return nil
	}
	entries, err := fs.ReadDir(trains, ".")
	if err != nil {
		return nil
	}
	var out []string
	for _, e := range entries {
		if ext := path.Ext(e.Name()); !e.IsDir() && (ext == ".yaml" || ext == ".yml") {
			out = append(out, strings.TrimSuffix(e.Name(), ext))
		}
	}
	slices.Sort(out)
	return out
}
