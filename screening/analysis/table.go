package analysis

import (
	"fmt"
	"strings"

	"github.com/trussfleet/trussfleet/screening/truss"
)

// TableTruss builds a truss given as a table and checks its structure (truss.Table.Build)
// and the need for areas; Stable checks that it is no mechanism (InfluenceLines finds that
// too, so screening does not call it twice). It returns the truss,
// the options to analyse it with (the areas as relative axial stiffness: one steel, so EA
// is proportional to A) and its degree of indeterminacy m + r - 2j.
//
// An indeterminate truss (degree > 0) needs every member's area: its forces depend on them.
// A determinate one may leave them out. A mechanism is a *MechanismError naming the joints
// that move; a structural problem a *truss.TableError.
func TableTruss(tb *truss.Table) (*truss.Truss, Options, int, error) {
	t, areas, err := tb.Build()
	if err != nil {
		return nil, Options{}, 0, err
	}
	degree := Degree(t)
	var missing []string
	for i, a := range areas {
		if a == 0 {
			missing = append(missing, t.Members[i].Label)
		}
	}
	var opt Options
	switch {
	case degree > 0 && len(missing) > 0:
		return nil, opt, degree, &truss.TableError{Msg: fmt.Sprintf("the truss is statically indeterminate (m + r - 2j = %d): its forces depend on the members' areas, and %d members have none (%s)",
			degree, len(missing), cut(missing, 8))}
	case len(missing) == 0:
		opt.AxialStiffness = areas
	}
	return t, opt, degree, nil
}

// Stable reports a mechanism (a *MechanismError naming the joints that move) or an unusable
// stiffness; nil when the truss can carry load.
func Stable(t *truss.Truss, opt Options) error {
	_, err := newSystem(t, opt.AxialStiffness)
	return err
}

// cut lists the first n names and says how many more there are.
func cut(names []string, n int) string {
	if len(names) <= n {
		return strings.Join(names, ", ")
	}
	return fmt.Sprintf("%s and %d more", strings.Join(names[:n], ", "), len(names)-n)
}
