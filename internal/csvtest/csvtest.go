// Package csvtest reads the CSV that tests produce or are given: a header row naming the
// columns, then one record per row.
package csvtest

import (
	"encoding/csv"
	"io"
	"testing"
)

// Rows reads CSV with a header row from r and returns one map per record, from column name
// to value. A malformed file fails the test.
func Rows(t testing.TB, r io.Reader) []map[string]string {
	t.Helper()
	recs, err := csv.NewReader(r).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, rec := range recs[1:] {
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = rec[i]
		}
		out = append(out, m)
	}
	return out
}
