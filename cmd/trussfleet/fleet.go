package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/configs"
	"github.com/trussfleet/trussfleet/screening/fleetgen"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

func init() { commands = append(commands, newFleetCmd) }

func newFleetCmd(a *app) *cobra.Command {
	cmd := &cobra.Command{Use: "fleet", Short: "Invented fleets for demonstrations and benchmarks"}
	var n int
	var seed uint64
	var out, ref string
	var floorShare float64
	gen := &cobra.Command{
		Use:   "generate",
		Short: "Write bridges.csv and members.csv of an invented fleet of the Northmoor & Eastfell Railway",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if n < 1 {
				return fmt.Errorf("--bridges must be at least 1, got %d", n)
			}
			refTrain, err := traffic.ParseSpec(ref, configs.Trains())
			if err != nil {
				return err
			}
			if err := os.MkdirAll(out, 0o755); err != nil {
				return err
			}
			opt := fleetgen.Defaults(n)
			opt.Seed, opt.Reference = seed, refTrain
			if !(floorShare >= 0 && floorShare <= 1) {
				return fmt.Errorf("--floor-share must be from 0 to 1, got %v", floorShare)
			}
			opt.FloorShare = floorShare
			return writeFleet(opt, out, func(b, m string) {
				fmt.Fprintf(cmd.OutOrStdout(), "wrote %s: %s, %s\n", plural(n, "invented bridge"), b, m)
			})
		},
	}
	gen.Flags().IntVar(&n, "bridges", 40, "number of bridges")
	gen.Flags().Uint64Var(&seed, "seed", 1893, "random seed (the same seed gives the same fleet)")
	gen.Flags().StringVar(&out, "out", "fleet", "output folder")
	gen.Flags().Float64Var(&floorShare, "floor-share", fleetgen.Defaults(0).FloorShare, "share of bridges whose floor system (stringers, floor beams) the inventory describes")
	gen.Flags().StringVar(&ref, "reference-train", "northmoor-freight-today", "reference train of the stored rating factors")
	cmd.AddCommand(gen)
	return cmd
}

// writeFleet writes the three files (bridges, members, joint tables) through temporary
// names, so that a failed run leaves no half-written inventory behind.
func writeFleet(opt fleetgen.Options, dir string, done func(b, m string)) error {
	names := []string{"bridges.csv", "members.csv", "trusses.csv"}
	files := make([]*os.File, len(names))
	for i, n := range names {
		f, err := createOutput(dir, "."+strings.TrimSuffix(n, ".csv")+"-*.csv")
		if err != nil {
			for _, o := range files[:i] {
				o.Close()
			}
			return err
		}
		defer os.Remove(f.Name())
		files[i] = f
	}
	opt.Tables = files[2]
	genErr := fleetgen.Generate(opt, files[0], files[1])
	for _, f := range files {
		if err := f.Close(); err != nil && genErr == nil {
			genErr = err
		}
	}
	if genErr != nil {
		return genErr
	}
	for i, n := range names {
		if err := os.Rename(files[i].Name(), filepath.Join(dir, n)); err != nil {
			return err
		}
	}
	done(filepath.Join(dir, names[0]), filepath.Join(dir, names[1])+", "+filepath.Join(dir, names[2]))
	return nil
}
