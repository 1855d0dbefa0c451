package report

import (
	"fmt"
	"math"
	"regexp"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
)

func TestExplain(t *testing.T) {
	f := screenFleet(t, []invented{pratt48(t, "NER-90001", "Tarnbeck Viaduct", 0.95)})
	b := f.Bridges["NER-90001"]
	var sb strings.Builder
	if err := Explain(&sb, f.Run, b, "U1-L2"); err != nil {
		t.Fatal(err)
	}
	out := sb.String()

	// Method of sections (common practice): the Pratt diagonal U1-L2 crosses panel 2 (x = 6
	// to 12 m) at sin θ = 6/√72; a unit load at x right of the panel gives shear
	// V = (48 − x)/48 and tension V/sin θ, a load left of it V = −x/48.
	sin := 6 / math.Sqrt(72)
	want := map[string]float64{"6.00": -6.0 / 48 / sin, "24.00": 24.0 / 48 / sin, "42.00": 6.0 / 48 / sin}
	for x, w := range want {
		m := regexp.MustCompile(`(?m)^\s+` + regexp.QuoteMeta(x) + `\s+(\S+)\s*$`).FindStringSubmatch(out)
		if m == nil {
			t.Errorf("no influence-line line for x = %s", x)
			continue
		}
		if got := parseNum(t, m[1]); math.Abs(got-w) > 0.00005 {
			t.Errorf("eta(%s) printed %v, method of sections %.4f", x, got, w)
		}
	}

	// Each scenario's trains are all listed with their extremes.
	for _, name := range []string{"Northmoor freight today", "Northmoor freight proposed", "Eastfell multiple unit"} {
		if !strings.Contains(out, name) {
			t.Errorf("explanation does not list train %q", name)
		}
	}
	// The governing placement's loads add up to L as screened.
	m := regexp.MustCompile(`sum \S+ kN x truss share \S+ = (\S+) kN \(L as screened: (\S+) kN\)`).FindStringSubmatch(out)
	if m == nil || m[1] != m[2] {
		t.Errorf("the loads of the governing placement do not add up to L: %v", m)
	}
	// The rating rows obey RF = (C − D)/(L(1 + I)) (DOMAIN.md, working stress).
	rows := regexp.MustCompile(`(?m)^\s+(existing|proposed)\s+(tension|compression)\s+capacity\s+(\S+)\s+(\S+)\s+(\S+)\s+(\S+)\s+(\S+)\s+(\S+)\s+(\S+)`).FindAllStringSubmatch(out, -1)
	if len(rows) == 0 {
		t.Fatal("no rating rows")
	}
	for _, r := range rows {
		C, D, L, imp, rf := parseNum(t, r[5]), parseNum(t, r[6]), parseNum(t, r[7]), parseNum(t, r[8]), parseNum(t, r[9])
		want := (C - D) / (L * imp)
		if tol := 0.0051 + 0.1/(L*imp) + math.Abs(want)*0.05/L; math.Abs(rf-want) > tol {
			t.Errorf("%s %s: RF %v, (C − D)/(L(1 + I)) = %.4f", r[1], r[2], rf, want)
		}
	}
	// EN 1991-2 6.4.5.2 (from memory): Phi3 = 2.16/(sqrt(L) − 0.2) + 0.73 at L = 48 m.
	phi3 := fmt.Sprintf("dynamic allowance phi3 gives 1 + I = %.3f", 2.16/(math.Sqrt(48)-0.2)+0.73)
	for _, s := range []string{"Why flagged", phi3, Caution[0]} {
		if !strings.Contains(out, s) {
			t.Errorf("explanation lacks %q", s)
		}
	}
	if len(b.Members[b.indexOf("U1-L2")].Flags) > 0 && !strings.Contains(out, "  - ") {
		t.Error("a flagged member's explanation gives no reason")
	}

	// Member labels are matched regardless of case (as the importers match them): u1-l2 is
	// U1-L2, explained word for word the same.
	var lower strings.Builder
	if err := Explain(&lower, f.Run, b, "u1-l2"); err != nil || lower.String() != out {
		t.Errorf("explain u1-l2: %v; differs from U1-L2's explanation: %v", err, lower.String() != out)
	}

	err := Explain(&sb, f.Run, b, "U9-L9")
	if err == nil || !strings.Contains(err.Error(), `"U9-L9"`) || !strings.Contains(err.Error(), "U1-L2") {
		t.Errorf("unknown member: got %v, want an error naming it and the members", err)
	}
}

func (b Bridge) indexOf(label string) int {
	for i, m := range b.Members {
		if m.Label == label {
			return i
		}
	}
	return -1
}

// TestExplainOnePlacement: an extreme that several placements reach (another count of the
// long freight consist, the mirror image on the symmetric Pratt) is shown at one placement:
// the governing line, the governing train's row in the table of trains and the loads summed
// below it all stand the train where the run did (its stored placement), which gives the
// stored force (reference: the loads at that placement summed by placeTrain, the influence
// line read by interpolation).
func TestExplainOnePlacement(t *testing.T) {
	f := screenFleet(t, []invented{pratt48(t, "NER-90001", "Tarnbeck Viaduct", 0.95)})
	b := f.Bridges["NER-90001"]
	gov := regexp.MustCompile(`(?m)^  governing (tension|compression): (\S+) kN, (.+?), ((?:left-to-right|right-to-left), front at .+)$`)
	checked := 0
	for _, m := range b.Members {
		var sb strings.Builder
		if err := Explain(&sb, f.Run, b, m.Label); err != nil {
			t.Fatal(err)
		}
		out := sb.String()
		for _, g := range gov.FindAllStringSubmatch(out, -1) {
			train, words := g[3], g[4]
			// The train's row lists its max and min with their placements, tab-aligned.
			row := regexp.MustCompile(`(?m)^  ` + regexp.QuoteMeta(train) + `\s.*$`).FindString(out)
			if !strings.Contains(row, words) {
				t.Errorf("%s governing %s: %q, but the row of %s reads %q", m.Label, g[1], words, train, row)
			}
			checked++
		}
		// Trains of axles only: the store keeps all of their placement.
		for _, sc := range []Scenario{m.Existing, m.Proposed} {
			for _, e := range []struct {
				stored envelope.Extreme
				tr     *traffic.Train
			}{{sc.Max, sc.MaxTrain}, {sc.Min, sc.MinTrain}} {
				if !e.stored.Loaded || e.tr == nil || e.tr.Uniform != nil || len(e.tr.Parts) > 0 {
					continue
				}
				if w := placementWords(e.stored, e.tr); !strings.Contains(out, w) {
					t.Errorf("%s: the run's placement %q of %s is not shown", m.Label, w, e.stored.Train)
				}
			}
		}
	}
	if checked == 0 {
		t.Fatal("no governing placement found in the explanations")
	}
}

// TestExplainImperial explains the same member in ft and kip: the lengths and forces are the
// SI ones divided by the exact factors, rounded to 0.1, and the headings name the units.
func TestExplainImperial(t *testing.T) {
	f := screenFleet(t, []invented{pratt48(t, "NER-90001", "Tarnbeck Viaduct", 0.95)})
	b := f.Bridges["NER-90001"]
	var si, imp strings.Builder
	if err := Explain(&si, f.Run, b, "U1-L2"); err != nil {
		t.Fatal(err)
	}
	if err := ExplainIn(&imp, f.Run, b, "U1-L2", units.Imperial); err != nil {
		t.Fatal(err)
	}
	out := imp.String()
	// exact definition: 48 m / 0.3048 = 157.48 ft, 6 m = 19.685 ft; rounded to 0.1 ft.
	for _, s := range []string{"span 157.5 ft", "x (ft)", "held kip", "C kip", "max kip", Caution[0]} {
		if !strings.Contains(out, s) {
			t.Errorf("imperial explanation lacks %q", s)
		}
	}
	if !regexp.MustCompile(`(?m)^\s+19\.7\s+\S+\s*$`).MatchString(out) {
		t.Error("no influence-line line for x = 19.7 ft (6 m)")
	}
	// exact definition: 1 kip = 4.4482216 kN; L as screened, SI to 0.1 kN and kip to 0.1 kip.
	re := regexp.MustCompile(`L as screened: (\S+) (kN|kip)\)`)
	ms, mi := re.FindStringSubmatch(si.String()), re.FindStringSubmatch(out)
	if ms == nil || mi == nil || mi[2] != "kip" {
		t.Fatalf("no L as screened: %v %v", ms, mi)
	}
	l := parseNum(t, strings.Replace(ms[1], "−", "-", 1))
	if got := parseNum(t, strings.Replace(mi[1], "−", "-", 1)); math.Abs(got-l/4.4482216) > 0.05+0.05/4.4482216 {
		t.Errorf("L = %v kip, SI %v kN / 4.4482216 = %.2f", got, l, l/4.4482216)
	}
}

// TestExplainCrossSection: an eccentric track (0.6 m towards A, trusses 5.2 m apart: A takes
// 0.5 + 0.6/5.2 of it, lever rule) and the truss's own weight. The explanation names the
// truss, the loading case and the member's allowance, and the governing placement's loads
// still add up to L as screened (with the case's share).
func TestExplainCrossSection(t *testing.T) {
	b := pratt48(t, "NER-90002", "Skarvholm Bridge", 0.95)
	b.TrussSpacingM, b.TrackOffsetsM, b.TrussWeightKNPerM = 5.2, []float64{0.6}, 6
	f := screenFleet(t, []invented{withCapacities(t, b, 0.95)})
	var sb strings.Builder
	if err := Explain(&sb, f.Run, f.Bridges["NER-90002"], "L2-L3"); err != nil {
		t.Fatal(err)
	}
	out := sb.String()
	for _, want := range []string{"results of truss A", "loading case: tension truss A: track 1 × 0.615", "dynamic allowance of this member: phi3, length 48.00 m (span)",
		"truss A carries track 1 × 0.615; truss B carries track 1 × 0.385", "the truss's own weight"} {
		if !strings.Contains(out, want) {
			t.Errorf("explanation lacks %q", want)
		}
	}
	m := regexp.MustCompile(`sum \S+ kN x truss share (\S+) = (\S+) kN \(L as screened: (\S+) kN\)`).FindStringSubmatch(out)
	if m == nil || m[2] != m[3] || m[1] != "0.615" {
		t.Errorf("the loads of the governing placement do not add up to L with the share 0.615: %v", m)
	}
}
