package fleetrun

import (
	"context"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/store"
)

// NewWorkerClientScreening is NewWorkerClient with its own screening function.
func NewWorkerClientScreening(db *store.DB, opt WorkerOptions,
	screen func(context.Context, []screening.Bridge, *screening.Settings, int) ([]screening.Result, error)) (*Client, error) {
	return newWorkerClient(db, opt, screen)
}

// MaxRequeues is how often a bridge left without a job is queued again.
const MaxRequeues = maxRequeues

// What the result-writing tests and benchmarks reach inside the package for.
var (
	WriteResults = writeResults
	InputHashes  = inputHashes
	Num          = num
	RFOrNil      = rfOrNil
)

// testEncoder is the one encoder of EncodeMemberResults and EncodeMemberAssessments, kept
// from call to call as a job's pooled encoder is (the tests call them one at a time).
var testEncoder resultEncoder

// EncodeMemberResults and EncodeMemberAssessments give the binary COPY stream writeResults
// sends for results' rows (all taken as pending), written over buf's storage as a job reuses
// its encoder's buffer.
func EncodeMemberResults(buf []byte, setIDs []int64, results []screening.Result) []byte {
	testEncoder.copy = *store.NewCopyEncoder(buf)
	return testEncoder.memberResults(results, setIDs)
}

func EncodeMemberAssessments(buf []byte, setIDs []int64, results []screening.Result) []byte {
	testEncoder.copy = *store.NewCopyEncoder(buf)
	return testEncoder.memberAssessments(results, setIDs)
}

// EncodeCategoryResults gives the binary COPY stream of results' category_results rows.
func EncodeCategoryResults(buf []byte, setIDs []int64, results []screening.Result) []byte {
	testEncoder.copy = *store.NewCopyEncoder(buf)
	return testEncoder.categoryResults(results, setIDs)
}

// CancelJob cancels a job through River's own API.
func (c *Client) CancelJob(ctx context.Context, id int64) (any, error) {
	return c.river.JobCancel(ctx, id)
}
