//go:build tools

// This file pins the modules the project is about to use, so that go mod tidy keeps them.

package tools

import (
	_ "github.com/gocarina/gocsv"
	_ "github.com/jackc/pgx/v5"
	_ "github.com/jackc/tern/v2/migrate"
	_ "github.com/riverqueue/river"
	_ "github.com/riverqueue/river/riverdriver/riverpgxv5"
	_ "github.com/spf13/cobra"
	_ "github.com/spf13/viper"
	_ "golang.org/x/sync/errgroup"
	_ "gonum.org/v1/gonum/mat"
	_ "gopkg.in/yaml.v3"
	_ "pgregory.net/rapid"
)

func main() {}
