// Package configs embeds the project's shipped configuration: default.yaml, which documents
// every setting, and the example train files of trains/, so that a trussfleet binary finds
// them wherever it runs.
package configs

import (
	"embed"
	"io/fs"
)

//go:embed default.yaml trains/*.yaml
var files embed.FS

// DefaultYAML is configs/default.yaml.
func DefaultYAML() []byte {
	b, err := files.ReadFile("default.yaml")
	if err != nil {
		panic(err) // embedded at build time
	}
	return b
}

// Trains is the folder of example train files.
func Trains() fs.FS {
	sub, err := fs.Sub(files, "trains")
	if err != nil {
		panic(err)
	}
	return sub
}
