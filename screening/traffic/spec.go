package traffic

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// ParseSpec resolves a train named on the command line: a built-in model with parameters
// ("lm71:alpha=1.33", "sw2", "cooper:e=80", "uniform:q=20,min=12,max=48"), or a train file,
// given as a path or as a file name (with or without .yaml) in dir. dir may be empty. An
// unknown name is an error that lists the built-in models and the trains in dir.
func ParseSpec(spec, dir string) (*Train, error) {
	spec = strings.TrimSpace(spec)
	if t, ok, err := Builtin(spec); ok {
		return t, err
	}
	for _, path := range candidates(spec, dir) {
		data, err := os.ReadFile(path)
		if errors.Is(err, fs.ErrNotExist) {
			continue
		}
		if err != nil {
			return nil, fmt.Errorf("train %q: %w", spec, err)
		}
		return ParseTrainFile(path, data)
	}
	msg := fmt.Sprintf("train %q: no built-in model or train file of that name; built-in: %s", spec, strings.Join(BuiltinNames(), "; "))
	if files := trainFiles(dir); len(files) > 0 {
		msg += fmt.Sprintf("; files in %s: %s", dir, strings.Join(files, ", "))
	}
	return nil, errors.New(msg)
}

func candidates(spec, dir string) []string {
	out := []string{spec}
	if dir != "" && !filepath.IsAbs(spec) {
		out = append(out, filepath.Join(dir, spec))
		if filepath.Ext(spec) == "" {
			out = append(out, filepath.Join(dir, spec+".yaml"), filepath.Join(dir, spec+".yml"))
		}
	}
	return out
}

func trainFiles(dir string) []string {
	if dir == "" {
		return nil
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var out []string
	for _, e := range entries {
		if ext := filepath.Ext(e.Name()); !e.IsDir() && (ext == ".yaml" || ext == ".yml") {
			out = append(out, strings.TrimSuffix(e.Name(), ext))
		}
	}
	slices.Sort(out)
	return out
}
