package screening

// OtherTruss is a member's outcome on the main truss that does not govern it, where both
// trusses are screened (eccentric tracks, trains kept to tracks, or rows of one truss's
// members): the truss's name and its lowest rating factor under each scenario (the worst
// over the senses, as rating.Summarise takes it); HasEx/HasPr false where that scenario
// gives it none.
type OtherTruss struct {
	Truss                  string
	RFExisting, RFProposed float64
	HasEx, HasPr           bool
}

// otherTruss is the outcome of m, a member rated on a truss that does not govern it.
func otherTruss(m MemberResult) *OtherTruss {
	a := m.Assessment
	return &OtherTruss{Truss: m.Truss, RFExisting: a.WorstEx.RF, RFProposed: a.WorstPr.RF, HasEx: a.HasEx, HasPr: a.HasPr}
}

// keepOther records, of a member rated on two trusses, the one that does not govern on the
// one that does: gov is the governing truss's result, lost the other's.
func keepOther(gov *MemberResult, lost MemberResult) {
	gov.Other = otherTruss(lost)
}
