package store

import "github.com/trussfleet/trussfleet/screening"

// What the result-writing tests and benchmarks reach inside the package for.
var (
	WriteResults            = writeResults
	InputHashes             = inputHashes
	MemberResultColumns     = memberResultColumns
	MemberAssessmentColumns = memberAssessmentColumns
	Num                     = num
	RFOrNil                 = rfOrNil
)

// EncodeMemberResults and EncodeMemberAssessments give the binary COPY stream writeResults
// sends for results' rows (all taken as pending), written over buf's storage as a job reuses
// its encoder's buffer.
func EncodeMemberResults(buf []byte, runID int64, results []screening.Result) []byte {
	e := copyEncoder{buf: buf}
	return encodeMemberResults(&e, runID, results)
}

func EncodeMemberAssessments(buf []byte, runID int64, results []screening.Result) []byte {
	e := copyEncoder{buf: buf}
	return encodeMemberAssessments(&e, runID, results)
}
