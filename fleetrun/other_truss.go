package fleetrun

import (
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/store"
)

// otherTrussColumns is a member's outcome on the truss that does not govern it as
// member_assessments stores it: nothing (truss "") where one truss was screened; a factor
// NULL where that truss has none or no finite one.
func otherTrussColumns(o *screening.OtherTruss) store.OtherTrussColumns {
	if o == nil {
		return store.OtherTrussColumns{}
	}
	c := store.OtherTrussColumns{Truss: o.Truss}
	if o.HasEx {
		c.RFExisting = finite(o.RFExisting)
	}
	if o.HasPr {
		c.RFProposed = finite(o.RFProposed)
	}
	return c
}
