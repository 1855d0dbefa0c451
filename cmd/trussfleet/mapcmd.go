package main

import (
	"fmt"
	"io"
	"path/filepath"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/geomap"
	"github.com/trussfleet/trussfleet/store"
)

func init() { commands = append(commands, newMapCmd) }

func newMapCmd(a *app) *cobra.Command {
	var runID int64
	cmd := &cobra.Command{
		Use:   "map",
		Short: "Write the run's bridges as a GeoJSON map layer for a GIS",
		Long: `map writes bridges-map.geojson into the output folder (--out, default trussfleet-out): a
GeoJSON (RFC 7946) FeatureCollection with a point for each bridge at [longitude, latitude]
(WGS 84) and its summary as properties: rank, worst member and rating factors, headroom,
flags, the highest EN 15528 line categories carried and the Cooper E rating. Bridges without
coordinates are left out; standard error says how many.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			ctx := cmd.Context()
			return a.withRun(ctx, runID, func(db *store.DB, run store.Run) error {
				rows, err := db.Ranked(ctx, run.ID, 0)
				if err != nil {
					return err
				}
				doc, left, err := geomap.Bridges(run.ID, rows)
				if err != nil {
					return err
				}
				path := filepath.Join(a.cfg.Output, "bridges-map.geojson")
				if err := writeFileAtomic(path, func(w io.Writer) error { _, err := w.Write(doc); return err }); err != nil {
					return err
				}
				fmt.Fprintln(cmd.OutOrStdout(), "wrote", path, "with", plural(len(rows)-left, "bridge"))
				if left > 0 {
					fmt.Fprintf(cmd.ErrOrStderr(), "%s without valid coordinates (latitude and longitude in the inventory) left out of the map\n", plural(left, "bridge"))
				}
				return nil
			})
		},
	}
	cmd.Flags().Int64Var(&runID, "run", 0, "run id (default: the latest completed run)")
	cmd.Flags().String("out", "", "output folder (default: the output setting, trussfleet-out)")
	return cmd
}
