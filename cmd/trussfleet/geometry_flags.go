package main

import (
	"errors"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// geometryFlags are the flags that describe one parametric truss; the lines and envelope
// commands share them.
type geometryFlags struct {
	p truss.Params
	// depths is --depths as given; table and tableBridge name a joint-table file and the
	// bridge in it (geometry_table.go).
	depths, table, tableBridge string
}

// add defines the flags; span, panels and depth are required unless the command takes the
// geometry from elsewhere as well (envelope --bridge), in which case it calls missing itself.
func (g *geometryFlags) add(cmd *cobra.Command, required bool) {
	f := cmd.Flags()
	f.StringVar(&g.p.Type, "type", "pratt", "truss type: "+strings.Join(truss.TypeNames(), ", "))
	f.Float64Var(&g.p.SpanM, "span", 0, "span between bearings, m")
	f.IntVar(&g.p.Panels, "panels", 0, "number of panels")
	f.Float64Var(&g.p.DepthM, "depth", 0, "depth between chord centre lines, m")
	f.StringVar(&g.p.Deck, "deck", "through", "deck position: through (deck at the bottom chord) or deck (at the top)")
	f.StringVar(&g.p.EndPosts, "end-posts", "", "pratt and howe: inclined or vertical (default inclined for through, vertical for deck)")
	g.addForms(cmd)
	if !required {
		return
	}
	for _, name := range geometryRequired {
		_ = cmd.MarkFlagRequired(name)
	}
}

// geometryRequired are the geometry flags without a default.
var geometryRequired = []string{"span", "panels", "depth"}

// given lists the geometry flags set on the command line, as "--name".
func (g *geometryFlags) given(cmd *cobra.Command) []string {
	var out []string
	for _, name := range []string{"type", "span", "panels", "depth", "deck", "end-posts", "depths", "end-depth", "spans", "table", "table-bridge"} {
		if cmd.Flags().Changed(name) {
			out = append(out, "--"+name)
		}
	}
	return out
}

// missing lists the required geometry flags not set on the command line, as "--name".
func (g *geometryFlags) missing(cmd *cobra.Command) []string {
	var out []string
	if g.table != "" {
		return nil
	}
	for _, name := range geometryRequired {
		// A list of depths gives the depth (its largest).
		if !cmd.Flags().Changed(name) && !(name == "depth" && g.depths != "") {
			out = append(out, "--"+name)
		}
	}
	return out
}

// build lays out the truss, naming the flag at fault when the parameters are bad.
func (g *geometryFlags) build() (*truss.Truss, analysis.Options, error) {
	if g.table != "" {
		return g.fromTable()
	}
	if err := g.parseDepths(); err != nil {
		return nil, analysis.Options{}, err
	}
	t, err := truss.Build(g.p)
	var pe *truss.ParamError
	if errors.As(err, &pe) {
		value := pe.Value
		if pe.Param == "depths" {
			value = fmt.Sprintf("%q", g.depths) // as typed, not as read
		}
		return nil, analysis.Options{}, fmt.Errorf("--%s %v: %s", paramFlags[pe.Param], value, pe.Allowed)
	}
	if err != nil {
		return nil, analysis.Options{}, fmt.Errorf("truss geometry: %w", err)
	}
	return t, analysis.Options{}, nil
}

// paramFlags names the flag of each geometry parameter.
var paramFlags = map[string]string{"type": "type", "span": "span", "panels": "panels", "depth": "depth", "deck": "deck", "end_posts": "end-posts",
	"depths": "depths", "end_depth": "end-depth", "spans": "spans"}

// outputFormat validates a --format value against the formats a command offers.
func outputFormat(got string, allowed ...string) error {
	for _, a := range allowed {
		if got == a {
			return nil
		}
	}
	return fmt.Errorf("--format %q: allowed %s", got, strings.Join(allowed, ", "))
}

// caution is printed with every result a person reads.
const caution = "CAUTION: screening only, not a load rating. A licensed engineer's rating under the governing code and the owner's standards decides; check recalled standard values against the edition in force."

func printCaution(w io.Writer) {
	fmt.Fprintln(w, caution)
}
