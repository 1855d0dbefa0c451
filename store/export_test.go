package store

import (
	"context"

	"github.com/trussfleet/trussfleet/screening"
)

// NewWorkerClientScreening is NewWorkerClient with its own screening function.
func (db *DB) NewWorkerClientScreening(opt WorkerOptions,
	screen func(context.Context, []screening.Bridge, *screening.Settings, int) ([]screening.Result, error)) (*Client, error) {
	return db.newWorkerClient(opt, screen)
}

// MaxRequeues is how often a bridge left without a job is queued again.
const MaxRequeues = maxRequeues

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
func EncodeMemberResults(buf []byte, setIDs []int64, results []screening.Result) []byte {
	e := copyEncoder{buf: buf}
	return encodeMemberResults(&e, results, setIDs)
}

func EncodeMemberAssessments(buf []byte, setIDs []int64, results []screening.Result) []byte {
	e := copyEncoder{buf: buf}
	return encodeMemberAssessments(&e, results, setIDs)
}

// CancelJob cancels a job through River's own API.
func (c *Client) CancelJob(ctx context.Context, id int64) (any, error) {
	return c.river.JobCancel(ctx, id)
}
