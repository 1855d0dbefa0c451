package screening

import (
	"fmt"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// Geometry lays out the bridge's truss: from its joint table when its type is "table",
// else from its parameters. The options carry a table's member areas (the relative axial
// stiffness an indeterminate truss needs).
func (b Bridge) Geometry() (*truss.Truss, analysis.Options, error) {
	return Geometry(b.Truss, b.Table)
}

// Geometry lays out a truss from its parameters, or from its joint table when the type is
// "table" (the report and the commands rebuild a screened bridge's truss with it).
func Geometry(p truss.Params, tb *truss.Table) (*truss.Truss, analysis.Options, error) {
	if p.Type != truss.TableType {
		t, err := truss.Build(p)
		return t, analysis.Options{}, err
	}
	if tb == nil {
		return nil, analysis.Options{}, fmt.Errorf("the truss type is %q but no joint table is stored for the bridge (import one with `trussfleet import trusses`)", truss.TableType)
	}
	t, opt, _, err := analysis.TableTruss(tb)
	return t, opt, err
}
