package importers

import (
	"bytes"
	"math"
	"os"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/trussfleet/trussfleet/store"
)

// The row parsers must never panic, whatever the bytes, and what they pass on must obey
// the documented rules. Run: go test -fuzz FuzzParseBridges ./importers
func FuzzParseBridges(f *testing.F) {
	for _, name := range []string{"../testdata/bridges.csv", "../testdata/bridges_imperial.csv"} {
		if data, err := os.ReadFile(name); err == nil {
			f.Add(data)
		}
	}
	f.Add([]byte(bridgeHeader + "A,\"x, y\",Main,1,pratt,48,8,6,through,15\r\n\r\n"))
	f.Add([]byte("\ufeffbridge_id,truss_type\n\"unterminated\n"))
	f.Add(semicolonFile)
	f.Add(utf16File(string(semicolonFile), true))
	f.Fuzz(func(t *testing.T, data []byte) {
		_, err := ParseBridges("fuzz.csv", bytes.NewReader(data), func(r store.Staged[store.Bridge]) bool {
			b := r.Row
			finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
			if r.Line < 2 || b.BridgeID == "" || !(b.SpanM > 0) || !finite(b.SpanM) || !(b.DepthM > 0) || !finite(b.DepthM) ||
				b.Panels < 1 || !(b.DeadLoadKNPerM > 0) || !finite(b.DeadLoadKNPerM) || !(b.TrussShare > 0 && b.TrussShare <= 1) ||
				b.Trusses < 1 || b.Tracks < 1 || (b.Deck != "through" && b.Deck != "deck") ||
				utf8.RuneCountInString(b.BridgeID) > maxIDChars || utf8.RuneCountInString(b.Name) > maxNameChars ||
				utf8.RuneCountInString(b.Line) > maxNameChars || strings.ContainsRune(b.Name, 0) ||
				(b.YearBuilt != nil && (*b.YearBuilt < minYearBuilt || *b.YearBuilt > maxYearBuilt())) {
				t.Errorf("row breaking the rules passed on: %+v", r)
			}
			return true
		})
		if err != nil && err.Error() == "" {
			t.Error("an error without a message")
		}
	})
}

// Run: go test -fuzz FuzzParseMembers ./importers
func FuzzParseMembers(f *testing.F) {
	if data, err := os.ReadFile("../testdata/members.csv"); err == nil {
		f.Add(data)
	}
	f.Add([]byte("bridge_id,member,capacity_tension_kip,condition_factor\nNME-1,l0-l1,12,1\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		ParseMembers("fuzz.csv", bytes.NewReader(data), geometryStub{}, func(r store.Staged[store.Member]) bool {
			m := r.Row
			if m.BridgeID != "NME-1" || !(m.ConditionFactor > 0 && m.ConditionFactor <= 1) ||
				(m.CapacityTensionKN == nil && m.CapacityCompressionKN == nil && m.RatingFactor == nil) {
				t.Errorf("row breaking the rules passed on: %+v", r)
			}
			return true
		})
	})
}
