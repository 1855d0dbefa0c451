package importers

import (
	"bytes"
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
	"github.com/trussfleet/trussfleet/store/pgtest"
)

// fleetCSV writes an invented fleet: n Pratt spans of 12 panels, with the first
// membersPer members of each (a 12-panel Pratt has 45).
func fleetCSV(tb testing.TB, n, membersPer int) (bridges, members []byte) {
	t, err := truss.Build(truss.Params{Type: "pratt", SpanM: 72, Panels: 12, DepthM: 9})
	if err != nil {
		tb.Fatal(err)
	}
	labels := t.Labels()[:membersPer]
	var bb, mb bytes.Buffer
	bb.WriteString("bridge_id,name,line,chainage_km,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m,year_built,latitude,longitude\n")
	mb.WriteString("bridge_id,member,capacity_tension_kn,capacity_compression_kn,condition_factor,area_mm2,fatigue_category\n")
	for i := 0; i < n; i++ {
		id := fmt.Sprintf("BEN-%05d", i)
		fmt.Fprintf(&bb, "%s,Bench span %d,Bench Line,%.3f,pratt,72,12,9,through,%.1f,%d,-47.%04d,-128.%04d\n", id, i, float64(i)*0.7, 15+float64(i%50)/10, 1880+i%60, i%10000, i%10000)
		for j, l := range labels {
			fmt.Fprintf(&mb, "%s,%s,%d,%d,%.2f,%d,71\n", id, l, 2000+(i+j)%3000, 1800+(i*j)%2500, 0.8+float64((i+j)%20)/100, 6000+j*100)
		}
	}
	return bb.Bytes(), mb.Bytes()
}

// BenchmarkImportFleet imports 10,000 bridges and 400,000 member rows into an empty
// inventory, the whole path: parse, check against the geometry, COPY, merge, commit.
//
//	CI=true go test -run '^$' -bench ImportFleet -benchtime 3x ./importers
func BenchmarkImportFleet(b *testing.B) {
	const nBridges, perBridge = 10000, 40
	bridges, members := fleetCSV(b, nBridges, perBridge)
	db := pgtest.DB(b)
	ctx := context.Background()
	b.SetBytes(int64(len(bridges) + len(members)))
	for b.Loop() {
		b.StopTimer()
		if _, err := db.Pool.Exec(ctx, "TRUNCATE members, bridges"); err != nil {
			b.Fatal(err)
		}
		b.StartTimer()
		rb, rm := importFleet(b, db, bridges, members)
		if rb.Counts.Inserted != nBridges || rm.Counts.Inserted != nBridges*perBridge {
			b.Fatalf("inserted %d bridges and %d members", rb.Counts.Inserted, rm.Counts.Inserted)
		}
	}
	b.ReportMetric(float64(nBridges*(perBridge+1))*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkReimportFleet re-imports the same files: every row compared, none written.
//
//	CI=true go test -run '^$' -bench ReimportFleet -benchtime 3x ./importers
func BenchmarkReimportFleet(b *testing.B) {
	const nBridges, perBridge = 10000, 40
	bridges, members := fleetCSV(b, nBridges, perBridge)
	db := pgtest.DB(b)
	importFleet(b, db, bridges, members)
	for b.Loop() {
		rb, rm := importFleet(b, db, bridges, members)
		if rb.Counts.Unchanged != nBridges || rm.Counts.Unchanged != nBridges*perBridge {
			b.Fatalf("unchanged %d bridges and %d members", rb.Counts.Unchanged, rm.Counts.Unchanged)
		}
	}
}

func importFleet(b *testing.B, db *store.DB, bridges, members []byte) (Result, Result) {
	ctx := context.Background()
	rb, err := ImportBridges(ctx, db, "bridges.csv", bytes.NewReader(bridges), Options{})
	if err != nil {
		b.Fatal(err)
	}
	rm, err := ImportMembers(ctx, db, "members.csv", bytes.NewReader(members), Options{})
	if err != nil {
		b.Fatal(err)
	}
	return rb, rm
}

// BenchmarkHostileLines parses files of one 10 MB line, each refused at its first 64 KiB:
// the bytes allocated per file (B/op) are what a line beyond the limit costs.
//
//	go test ./importers -run '^$' -bench HostileLines -benchmem
func BenchmarkHostileLines(b *testing.B) {
	const size = 10 << 20
	for _, c := range []struct{ name, text string }{
		{"header", strings.Repeat("x", size) + "\n"},
		{"separators", bridgeHeader + strings.Repeat(",", size) + "\n"},
		{"bridge_id", bridgeHeader + strings.Repeat("x", size) + ",n,l,1,pratt,48,8,6,through,15\n"},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := ParseBridges("bridges.csv", strings.NewReader(c.text), func(store.Staged[store.Bridge]) bool { return true }); err == nil {
					b.Fatal("accepted")
				}
			}
		})
	}
}
