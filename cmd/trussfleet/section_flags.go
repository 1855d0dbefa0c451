package main

import (
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"
	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/screening"
)

// sectionFlags are the cross-section flags of envelope and lines: the truss spacing and the
// track offsets as bridges.csv gives them, the truss shown and the multiple-presence rule.
type sectionFlags struct {
	spacing        float64
	offsets, truss string
	presence       string
}

func (s *sectionFlags) add(cmd *cobra.Command) {
	f := cmd.Flags()
	f.Float64Var(&s.spacing, "truss-spacing", 0, "distance between the main trusses, m (with --track-offsets: each truss's lever-rule share of each track instead of --share)")
	f.StringVar(&s.offsets, "track-offsets", "", "each track's offset from the centre line, m, positive towards truss A, separated by spaces or | (e.g. \"-2.25 2.25\")")
	f.StringVar(&s.truss, "truss", screening.TrussA, "the main truss shown with --track-offsets: A or B")
	f.StringVar(&s.presence, "presence", string(screening.PresenceEN), "multiple-presence rule with several tracks: en1991-2 or arema")
}

// bridge reads the flags into a bridge's cross-section; ok is false where neither
// --truss-spacing nor --track-offsets is given. stored is a stored bridge's cross-section
// (--bridge), used where it has one; withStored says a stored bridge was named.
func (s *sectionFlags) bridge(cmd *cobra.Command, stored screening.Bridge, withStored bool) (b screening.Bridge, rule screening.Presence, ok bool, err error) {
	f := cmd.Flags()
	if s.truss != screening.TrussA && s.truss != screening.TrussB {
		return b, "", false, fmt.Errorf("--truss: A or B, got %q", safetext.Terminal(s.truss))
	}
	if rule, err = screening.ParsePresence(s.presence); err != nil {
		return b, "", false, fmt.Errorf("--presence: %w", err)
	}
	if !f.Changed("truss-spacing") && !f.Changed("track-offsets") {
		if withStored && stored.HasSection() {
			return stored, rule, true, nil
		}
		for _, n := range []string{"truss", "presence"} {
			if f.Changed(n) {
				return b, "", false, fmt.Errorf("--%s needs --truss-spacing and --track-offsets, or a stored bridge that gives them", n)
			}
		}
		return b, "", false, nil
	}
	if withStored {
		return b, "", false, fmt.Errorf("--bridge with --truss-spacing or --track-offsets: the stored bridge gives its cross-section; give either")
	}
	if f.Changed("share") {
		return b, "", false, fmt.Errorf("--share with --truss-spacing and --track-offsets: the shares follow from the cross-section (lever rule); give either")
	}
	if !(s.spacing >= 1 && s.spacing <= 50) {
		return b, "", false, fmt.Errorf("--truss-spacing: give the distance between the main trusses, 1 to 50 m, got %v", s.spacing)
	}
	if b.TrackOffsetsM, err = screening.ParseOffsets(s.offsets); err != nil {
		return b, "", false, fmt.Errorf("--track-offsets: %w", err)
	}
	b.TrussSpacingM = s.spacing
	return b, rule, true, nil
}

// printShares says what share of each track's load each main truss carries (lever rule).
func printShares(w io.Writer, b screening.Bridge) {
	fmt.Fprintf(w, "Trusses %g m apart; tracks at %v m from the centre line (+ towards A).\n", b.TrussSpacingM, b.TrackOffsetsM)
	for _, tr := range []string{screening.TrussA, screening.TrussB} {
		s := b.TrackShares(tr)
		parts := make([]string, len(s))
		for i, v := range s {
			parts[i] = fmt.Sprintf("track %d × %.3f", i+1, v)
		}
		fmt.Fprintf(w, "Truss %s carries %s of each track's load (lever rule).\n", tr, strings.Join(parts, ", "))
	}
	fmt.Fprintln(w)
}
