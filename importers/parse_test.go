package importers

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store"
)

const bridgeHeader = "bridge_id,name,line,chainage_km,truss_type,span_m,panels,depth_m,deck,dead_load_kn_per_m\n"

// parseB parses a bridges file held in a string.
func parseB(t *testing.T, text string) ([]store.Staged[store.Bridge], Report, error) {
	t.Helper()
	var rows []store.Staged[store.Bridge]
	rep, err := ParseBridges("bridges.csv", strings.NewReader(text), func(r store.Staged[store.Bridge]) bool {
		rows = append(rows, r)
		return true
	})
	return rows, rep, err
}

// fieldErrors unpacks a parser's error.
func fieldErrors(t *testing.T, err error) []*FieldError {
	t.Helper()
	var fe *FileErrors
	if !errors.As(err, &fe) {
		t.Fatalf("error %v is not a *FileErrors", err)
	}
	return fe.Errs
}

func TestExampleFilesParse(t *testing.T) {
	f, err := os.Open("../testdata/bridges.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var bridges []store.Bridge
	if _, err := ParseBridges("bridges.csv", f, func(r store.Staged[store.Bridge]) bool {
		bridges = append(bridges, r.Row)
		return true
	}); err != nil {
		t.Fatalf("the example bridges.csv must be valid: %v", err)
	}
	if len(bridges) != 4 {
		t.Fatalf("%d bridges, want 4", len(bridges))
	}
	if got := bridges[3].Name; got != "Ombrysett Viaduct, east span" {
		t.Errorf("quoted name with a comma read as %q", got)
	}
	m, err := os.Open("../testdata/members.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer m.Close()
	n := 0
	if _, err := ParseMembers("members.csv", m, NewStoredGeometry(bridges), func(store.Staged[store.Member]) bool { n++; return true }); err != nil {
		t.Fatalf("the example members.csv must be valid: %v", err)
	}
	if n != 12 {
		t.Errorf("%d members, want 12", n)
	}
}

func TestRealWorldCSV(t *testing.T) {
	// The same two bridges written the ways spreadsheets and hand edits write them.
	want := []store.Bridge{
		{BridgeID: "NME-1", Name: "Ulm Beck, north", TrussType: "pratt", SpanM: 48, Panels: 8, DepthM: 6, Deck: "through"},
		{BridgeID: "NME-2", Name: "Ost Fold", TrussType: "warren", SpanM: 30, Panels: 5, DepthM: 4, Deck: "through"},
	}
	plain := bridgeHeader +
		"NME-1,\"Ulm Beck, north\",Main,1.5,pratt,48,8,6,through,15\n" +
		"NME-2,Ost Fold,Main,2.5,warren,30,5,4,through,15\n"
	tests := []struct {
		name string
		text string
	}{
		{"plain", plain},
		{"byte-order mark", "\ufeff" + plain},
		{"CRLF line ends", strings.ReplaceAll(plain, "\n", "\r\n")},
		{"blank trailing lines", plain + "\n\n,,,,,,,,,\n\r\n"},
		{"surrounding spaces", " bridge_id , name,line ,chainage_km,truss_type, span_m,panels,depth_m,deck,dead_load_kn_per_m \n" +
			"  NME-1 , \"Ulm Beck, north\",Main , 1.5 , pratt , 48 ,8 , 6,through ,15\n" +
			"NME-2,\tOst Fold\t,Main,2.5,warren,30,5,4,through,15  \n"},
		{"other column order, upper-case header", "DEAD_LOAD_KN_PER_M,Panels,span_m,bridge_id,depth_m,truss_type,deck,name\n" +
			"15,8,48,NME-1,6,Pratt,Through,\"Ulm Beck, north\"\n15,5,30,NME-2,4,warren,through,Ost Fold\n"},
		{"a quoted field spanning lines keeps line numbers right", bridgeHeader +
			"NME-1,\"Ulm Beck, north\",\"Main\nLine\",1.5,pratt,48,8,6,through,15\n" +
			"NME-2,Ost Fold,Main,2.5,warren,30,5,4,through,15\n"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rows, _, err := parseB(t, tc.text)
			if err != nil {
				t.Fatal(err)
			}
			if len(rows) != len(want) {
				t.Fatalf("%d rows, want %d", len(rows), len(want))
			}
			for i, r := range rows {
				g, w := r.Row, want[i]
				if g.BridgeID != w.BridgeID || g.Name != w.Name || g.TrussType != w.TrussType || g.SpanM != w.SpanM ||
					g.Panels != w.Panels || g.DepthM != w.DepthM || g.Deck != w.Deck {
					t.Errorf("row %d: %+v, want %+v", i, g, w)
				}
				// Defaults, docs/inventory.md: two trusses, half a track each, one track.
				if g.Trusses != 2 || g.TrussShare != 0.5 || g.Tracks != 1 {
					t.Errorf("row %d defaults: trusses %d, share %g, tracks %d", i, g.Trusses, g.TrussShare, g.Tracks)
				}
			}
			if strings.Contains(tc.name, "spanning") && rows[1].Line != 4 {
				t.Errorf("second row reported on line %d, want 4", rows[1].Line)
			}
		})
	}
}

func TestImperialColumns(t *testing.T) {
	f, err := os.Open("../testdata/bridges_imperial.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var b []store.Bridge
	if _, err := ParseBridges("bridges_imperial.csv", f, func(r store.Staged[store.Bridge]) bool { b = append(b, r.Row); return true }); err != nil {
		t.Fatal(err)
	}
	// 1 ft = 0.3048 m and 1 mi = 1.609344 km exactly (international yard and pound agreement,
	// 1959); 1 kip = 4.4482216 kN (DOMAIN.md, from the definition of the pound-force).
	checks := []struct {
		name      string
		got, want float64
	}{
		{"span 150 ft", b[0].SpanM, 45.72},
		{"depth 25 ft", b[0].DepthM, 7.62},
		{"chainage 4.25 mi", *b[0].ChainageKM, 6.839712},
		{"dead load 1.2 kip/ft", b[0].DeadLoadKNPerM, 1.2 * 4.4482216 / 0.3048},
	}
	for _, c := range checks {
		if math.Abs(c.got-c.want) > 1e-9*math.Max(1, c.want) {
			t.Errorf("%s: %.9g, want %.9g", c.name, c.got, c.want)
		}
	}
	m, err := os.Open("../testdata/members_imperial.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer m.Close()
	var ms []store.Member
	if _, err := ParseMembers("members_imperial.csv", m, NewStoredGeometry(b), func(r store.Staged[store.Member]) bool {
		ms = append(ms, r.Row)
		return true
	}); err != nil {
		t.Fatal(err)
	}
	// 700 kip * 4.4482216 kN/kip; 22.5 in^2 * 645.16 mm^2/in^2 (1 in = 25.4 mm exactly).
	if got := *ms[0].CapacityTensionKN; math.Abs(got-700*4.4482216) > 1e-9 {
		t.Errorf("700 kip read as %g kN", got)
	}
	if got := *ms[0].AreaMM2; math.Abs(got-22.5*25.4*25.4) > 1e-9 {
		t.Errorf("22.5 in2 read as %g mm2", got)
	}
	if got := *ms[1].CapacityCompressionKN; math.Abs(got-800*4.4482216) > 1e-9 {
		t.Errorf("800 kip read as %g kN", got)
	}
}

func TestBadBridges(t *testing.T) {
	row := func(span, panels, depth, dead string) string {
		return bridgeHeader + fmt.Sprintf("NME-9,X,Main,1,pratt,%s,%s,%s,through,%s\n", span, panels, depth, dead)
	}
	tests := []struct {
		name         string
		text         string
		line, column int
		value, msg   string
	}{
		{"missing required column", "bridge_id,truss_type,span_m,panels,depth_m,dead_load_kn_per_m\nA,pratt,48,8,6,15\n", 1, 0, "", "missing required column deck"},
		{"unknown truss type", strings.Replace(row("48", "8", "6", "15"), "pratt", "bowstring", 1), 2, 5, "bowstring", "unknown truss type"},
		{"odd panels where even is required", row("48", "7", "6", "15"), 2, 7, "7", "even number of panels"},
		{"negative span", row("-48", "8", "6", "15"), 2, 6, "-48", "greater than zero"},
		{"zero depth", row("48", "8", "0", "15"), 2, 8, "0", "greater than zero"},
		{"NaN dead load", row("48", "8", "6", "NaN"), 2, 10, "NaN", "not a number"},
		{"infinite span", row("Inf", "8", "6", "15"), 2, 6, "Inf", "not a number"},
		{"non-numeric field", row("48 m", "8", "6", "15"), 2, 6, "48 m", "not a number"},
		{"decimal comma", row("48,5", "8", "6", "15"), 2, 11, "15", "decimal comma"},
		{"panels not whole", row("48", "8.5", "6", "15"), 2, 7, "8.5", "not a whole number"},
		{"proportions the geometry rejects", row("48", "8", "60", "15"), 2, 8, "60", "span/depth"},
		{"empty required value", row("", "8", "6", "15"), 2, 6, "", "a value is required"},
		{"metric and imperial both", "bridge_id,truss_type,span_m,span_ft,panels,depth_m,deck,dead_load_kn_per_m\nA,pratt,48,157,8,6,through,15\n", 1, 4, "span_ft", "not both"},
		{"column named twice", "bridge_id,bridge_id,truss_type\n", 1, 2, "bridge_id", "named twice"},
		{"empty file", "", 1, 0, "", "empty"},
		{"malformed quotes", bridgeHeader + "NME-9,\"X\"Y,Main,1,pratt,48,8,6,through,15\n", 2, 0, "", "malformed CSV"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rows, _, err := parseB(t, tc.text)
			if len(rows) != 0 {
				t.Errorf("a bad row was passed on: %+v", rows)
			}
			errs := fieldErrors(t, err)
			e := errs[0]
			if e.File != "bridges.csv" || e.Line != tc.line || e.Column != tc.column || e.Value != tc.value || !strings.Contains(e.Msg, tc.msg) {
				t.Errorf("got %q (line %d, column %d, value %q); want line %d, column %d, value %q, message with %q",
					e.Error(), e.Line, e.Column, e.Value, tc.line, tc.column, tc.value, tc.msg)
			}
			if !strings.Contains(e.Error(), "bridges.csv") {
				t.Errorf("message %q does not name the file", e.Error())
			}
		})
	}
}

func TestAllErrorsReported(t *testing.T) {
	text := bridgeHeader +
		"A,X,Main,1,pratt,-1,8,6,through,15\n" +
		"B,X,Main,1,pratt,48,8,6,through,15\n" +
		"C,X,Main,1,pratt,48,7,6,sideways,abc\n"
	rows, _, err := parseB(t, text)
	if len(rows) != 1 || rows[0].Row.BridgeID != "B" {
		t.Errorf("good rows passed on: %+v", rows)
	}
	errs := fieldErrors(t, err)
	var got []string
	for _, e := range errs {
		got = append(got, fmt.Sprintf("%d:%s", e.Line, e.Field))
	}
	// Row 4's odd panels are reported beside its other faults: every problem at once.
	want := []string{"2:span_m", "4:panels", "4:deck", "4:dead_load_kn_per_m"}
	if strings.Join(got, " ") != strings.Join(want, " ") {
		t.Errorf("errors at %v, want %v", got, want)
	}
}

func TestBinaryGarbage(t *testing.T) {
	garbage := make([]byte, 4096)
	x := uint32(2463534242)
	for i := range garbage {
		// xorshift32 (Marsaglia 2003): reproducible noise without a seed to manage.
		x ^= x << 13
		x ^= x >> 17
		x ^= x << 5
		garbage[i] = byte(x)
	}
	rows, _, err := parseB(t, string(garbage))
	if len(rows) != 0 || err == nil {
		t.Fatalf("garbage gave %d rows, error %v", len(rows), err)
	}
	if !strings.Contains(err.Error(), "bridges.csv") {
		t.Errorf("error %q does not name the file", err)
	}
}

// geometryStub knows one bridge, a Pratt of 8 panels, by its labels.
type geometryStub struct{}

func (geometryStub) Labels(id string) (map[string]string, []string, string, bool) {
	if id != "NME-1" {
		return nil, nil, "", false
	}
	ordered := []string{"L0-L1", "L1-L2", "U1-U2", "L0-U1", "U1-L2"}
	set := map[string]string{}
	for _, l := range ordered {
		set[l] = l
	}
	return set, ordered, "pratt through truss, 8 panels", true
}

// badMemberRow parses a members file whose second line is bad: no row passes, and the first
// error names line 2, the column and value given, with msg in its message.
func badMemberRow(t *testing.T, text string, geom Geometry, column int, value, msg string) {
	t.Helper()
	n := 0
	_, err := ParseMembers("members.csv", strings.NewReader(text), geom, func(store.Staged[store.Member]) bool { n++; return true })
	if n != 0 {
		t.Error("a bad row was passed on")
	}
	e := fieldErrors(t, err)[0]
	if e.Line != 2 || e.Column != column || e.Value != value || !strings.Contains(e.Msg, msg) {
		t.Errorf("got %q (column %d, value %q); want column %d, value %q, message with %q", e.Error(), e.Column, e.Value, column, value, msg)
	}
}

func TestBadMembers(t *testing.T) {
	head := "bridge_id,member,capacity_tension_kn,capacity_compression_kn,rating_factor,reference_train,condition_factor\n"
	tests := []struct {
		name   string
		row    string
		column int
		value  string
		msg    string
	}{
		{"unknown bridge", "NME-7,L0-L1,100,,,,1", 1, "NME-7", "no such bridge"},
		{"label the geometry lacks lists the valid ones", "NME-1,U9-L9,100,,,,1", 2, "U9-L9", "L0-L1, L1-L2, U1-U2, L0-U1, U1-L2"},
		{"capacity missing in both forms", "NME-1,L0-L1,,,,,1", 3, "", "no capacity"},
		{"condition factor above 1", "NME-1,L0-L1,100,,,,1.2", 7, "1.2", "at most 1"},
		{"condition factor zero", "NME-1,L0-L1,100,,,,0", 7, "0", "greater than 0"},
		{"negative capacity", "NME-1,L0-L1,-100,,,,1", 3, "-100", "greater than zero"},
		{"rating factor without its train", "NME-1,L0-L1,,,1.2,,1", 6, "", "reference_train"},
		{"non-numeric rating factor", "NME-1,L0-L1,,,high,E80,1", 5, "high", "not a number"},
	}
	// rating_sense: the sense a stored rating factor was rated in (docs/inventory.md); these
	// rows are read under senseHead.
	senseHead := "bridge_id,member,capacity_tension_kn,capacity_compression_kn,rating_factor,reference_train,rating_sense\n"
	tests = append(tests,
		struct {
			name   string
			row    string
			column int
			value  string
			msg    string
		}{"rating sense not a sense", "NME-1,L0-L1,,,1.2,E80,shear", 7, "shear", "tension or compression"},
		struct {
			name   string
			row    string
			column int
			value  string
			msg    string
		}{"rating sense without a rating factor", "NME-1,L0-L1,100,,,,tension", 7, "tension", "without a rating_factor"},
	)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			h := head
			if strings.HasPrefix(tc.name, "rating sense") {
				h = senseHead
			}
			badMemberRow(t, h+tc.row+"\n", geometryStub{}, tc.column, tc.value, tc.msg)
		})
	}
	t.Run("rating sense read in either case", func(t *testing.T) {
		var got []store.Member
		_, err := ParseMembers("members.csv", strings.NewReader(senseHead+"NME-1,U1-L2,,,1.02,E80,Compression\nNME-1,L0-L1,,,1.1,E80,\n"), geometryStub{}, func(r store.Staged[store.Member]) bool {
			got = append(got, r.Row)
			return true
		})
		if err != nil || len(got) != 2 || got[0].RatingSense == nil || *got[0].RatingSense != "compression" || got[1].RatingSense != nil {
			t.Errorf("got %+v, %v", got, err)
		}
	})
	t.Run("label case does not matter", func(t *testing.T) {
		var got []string
		_, err := ParseMembers("members.csv", strings.NewReader(head+"NME-1,u1-l2,100,,,,1\n"), geometryStub{}, func(r store.Staged[store.Member]) bool {
			got = append(got, r.Row.Member)
			return true
		})
		if err != nil || len(got) != 1 || got[0] != "U1-L2" {
			t.Errorf("got %v, %v", got, err)
		}
	})
}

// memberFile is an io.Reader of a members CSV of about size bytes, made as it is read, so
// that the test itself never holds the file.
type memberFile struct {
	size, n int
	buf     bytes.Buffer
	rows    int
}

func (f *memberFile) Read(p []byte) (int, error) {
	if f.buf.Len() == 0 {
		if f.n >= f.size {
			return 0, io.EOF
		}
		if f.n == 0 {
			f.buf.WriteString("bridge_id,member,capacity_tension_kn,capacity_compression_kn,condition_factor,area_mm2\n")
		}
		for i := 0; i < 1000 && f.n+f.buf.Len() < f.size; i++ {
			fmt.Fprintf(&f.buf, "NME-1,%s,%d.5,%d.25,0.95,%d\n", []string{"L0-L1", "U1-U2", "U1-L2"}[f.rows%3], 1000+f.rows%5000, 900+f.rows%700, 5000+f.rows%3000)
			f.rows++
		}
	}
	n, _ := f.buf.Read(p)
	f.n += n
	return n, nil
}

func TestLargeFileIsStreamed(t *testing.T) {
	if testing.Short() {
		t.Skip("50 MB parse skipped in -short mode")
	}
	const size = 50 << 20
	src := &memberFile{size: size}
	var ms runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&ms)
	base := ms.HeapAlloc
	var peak uint64
	n := 0
	_, err := ParseMembers("big.csv", src, geometryStub{}, func(store.Staged[store.Member]) bool {
		n++
		if n%50000 == 0 {
			runtime.ReadMemStats(&ms)
			peak = max(peak, ms.HeapAlloc)
		}
		return true
	})
	if err != nil {
		t.Fatal(err)
	}
	if n != src.rows {
		t.Errorf("%d rows passed on, %d written", n, src.rows)
	}
	// Reading the file whole would need at least its 50 MB; streaming needs buffers only.
	if grown := int64(peak) - int64(base); grown > size/2 {
		t.Errorf("heap grew by %d MB while reading a %d MB file: not streamed", grown>>20, size>>20)
	}
}
