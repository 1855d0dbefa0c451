package floor

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

func cooperE80(t testing.TB) *traffic.Train {
	tr, ok, err := traffic.Builtin("cooper:e=80")
	if !ok || err != nil {
		t.Fatalf("cooper:e=80: %v %v", ok, err)
	}
	return tr
}

func prepare(t testing.TB, tr *traffic.Train) *envelope.Load {
	ld, err := envelope.Prepare(tr)
	if err != nil {
		t.Fatal(err)
	}
	return ld
}

// liveUnder lists the system's elements and their live effects under one train.
func liveUnder(t testing.TB, sys System, tr *traffic.Train) ([]Element, []envelope.Extremes) {
	t.Helper()
	els, _, err := sys.Elements()
	if err != nil {
		t.Fatal(err)
	}
	var a Analyser
	live, err := a.Live(sys, els, []*envelope.Load{prepare(t, tr)})
	if err != nil {
		t.Fatal(err)
	}
	return els, live
}

func find(t testing.TB, els []Element, label string) (int, Element) {
	for i, e := range els {
		if e.Label == label {
			return i, e
		}
	}
	t.Fatalf("no element %s", label)
	return -1, Element{}
}

// bruteReaction steps Cooper E80 (axles and its trailing load, which with a line that is
// never negative counts at full length) over the floor beam's triangle of two panels, in both
// directions, summing P·eta for the axles and integrating the uniform load by the trapezoid
// rule on a fine grid: a brute force independent of the envelope package.
func bruteReaction(tr *traffic.Train, left, right float64) float64 {
	eta := func(x float64) float64 {
		switch {
		case x <= 0 || x >= left+right:
			return 0
		case x <= left:
			return x / left
		}
		return (left + right - x) / right
	}
	ax := tr.Axles(1)
	var from, q float64
	for _, p := range tr.Parts {
		from, q = p.FromM, p.QKNPerM
	}
	best := 0.0
	L := left + right
	last := ax[len(ax)-1].AtM
	for _, dir := range []float64{1, -1} {
		for i := 0; i <= 40000; i++ {
			s := -1 + (last+L+2)*float64(i)/40000 // front position, entering at 0 (dir 1)
			r := 0.0
			pos := func(d float64) float64 {
				if dir > 0 {
					return s - d
				}
				return L - (s - d)
			}
			for _, a := range ax {
				r += a.LoadKN * eta(pos(a.AtM))
			}
			const n = 400
			for k := 0; k < n; k++ {
				x0, x1 := L*float64(k)/n, L*float64(k+1)/n
				// part behind offset from: on the bridge where the offset exceeds from
				d0, d1 := s-x0, s-x1
				if dir < 0 {
					d0, d1 = s-(L-x0), s-(L-x1)
				}
				if d0 >= from && d1 >= from {
					r += q * (eta(x0) + eta(x1)) / 2 * (x1 - x0)
				}
			}
			best = max(best, r)
		}
	}
	return best
}

func TestFloorBeamReactionCooperBruteForce(t *testing.T) {
	tr := cooperE80(t)
	sys := System{PanelX: []float64{0, 6.1, 12.2, 18.3, 24.4}, TrussSpacingM: 5.5}
	els, live := liveUnder(t, sys, tr)
	i, e := find(t, els, "FB2:V")
	r := live[i].Max.Value / e.factor
	brute := bruteReaction(tr, 6.1, 6.1)
	// Brute force: positions stepped by ~1 mm and a 400-trapezoid load: within 0.1 %.
	if r < brute-1e-9 || r > brute*1.001 {
		t.Fatalf("reaction %.6g kN, brute force %.6g kN", r, brute)
	}
	// End floor beam: one panel.
	i, e = find(t, els, "FB4:V")
	if r, brute := live[i].Max.Value/e.factor, bruteReaction(tr, 6.1, 1e-9); r < brute-1e-6 || r > brute*1.001 {
		t.Fatalf("end reaction %.6g kN, brute force %.6g kN", r, brute)
	}
}

// TestFloorBeamStatics checks the floor beam's effects from the reaction by statics: a
// centred track, stringer lines s apart on a floor beam of span b, each line bringing R/2 at
// (b - s)/2 from the nearer truss: M = (R/2)(b - s)/2 between the stringers, V = R/2 (common
// practice, DOMAIN.md "The floor system").
func TestFloorBeamStatics(t *testing.T) {
	b, s := 5.2, 1.8
	sys := System{PanelX: []float64{0, 5, 10, 15}, TrussSpacingM: b, StringerSpacingM: s}
	els, _, err := sys.Elements()
	if err != nil {
		t.Fatal(err)
	}
	_, m := find(t, els, "FB1:M")
	_, v := find(t, els, "FB1:V")
	if want := 0.5 * (b - s) / 2; math.Abs(m.factor-want) > 1e-12 {
		t.Errorf("moment per unit reaction %v, want (1/2)(b - s)/2 = %v (statics)", m.factor, want)
	}
	if math.Abs(v.factor-0.5) > 1e-12 {
		t.Errorf("shear per unit reaction %v, want 1/2 (statics)", v.factor)
	}
	// Dead load: stringer reactions q·p at each line plus the self-weight g b²/8 (statics).
	q, g := DefaultStringerDeadKNPerM, DefaultFloorBeamDeadKNPerM
	if want := q*5*(b-s)/2 + g*b*b/8; math.Abs(m.Dead-want) > 1e-9 {
		t.Errorf("dead moment %v, want %v (statics)", m.Dead, want)
	}
	_, sm := find(t, els, "S1-2:M")
	if want := q * 25 / 8; math.Abs(sm.Dead-want) > 1e-12 {
		t.Errorf("stringer dead moment %v, want qp²/8 = %v (handbook)", sm.Dead, want)
	}
}

// TestEccentricTrackLeverRule: a track offset e toward truss A puts 1/2 + e/b of its load on
// A's end of the floor beam (lever rule, common practice); two tracks at ±e, each alone or
// both, give at most 1/2 + e/b + (1/2 - e/b) = 1 at one end.
func TestEccentricTrackLeverRule(t *testing.T) {
	b, s, e := 9.0, 1.5, 1.2
	one := System{PanelX: []float64{0, 5, 10}, TrussSpacingM: b, StringerSpacingM: s, TrackOffsetsM: []float64{e}}
	els, _, err := one.Elements()
	if err != nil {
		t.Fatal(err)
	}
	_, v := find(t, els, "FB1:V")
	if want := 0.5 + e/b; math.Abs(v.factor-want) > 1e-12 {
		t.Errorf("shear per unit reaction %v, want 1/2 + e/b = %v (lever rule)", v.factor, want)
	}
	// Moment under the nearer stringer line, at y = b/2 - e - s/2 from A (statics by hand).
	y1, y2 := b/2-e-s/2, b/2-e+s/2
	m1 := 0.5*y1*(b-y1)/b + 0.5*y1*(b-y2)/b
	m2 := 0.5*y1*(b-y2)/b + 0.5*y2*(b-y2)/b
	_, m := find(t, els, "FB1:M")
	if want := max(m1, m2); math.Abs(m.factor-want) > 1e-12 {
		t.Errorf("moment per unit reaction %v, want %v (statics)", m.factor, want)
	}
	two := one
	two.Tracks, two.TrackOffsetsM = 2, []float64{e + 1.5, -e - 1.5}
	els, _, err = two.Elements()
	if err != nil {
		t.Fatal(err)
	}
	_, v = find(t, els, "FB1:V")
	if math.Abs(v.factor-1) > 1e-12 {
		t.Errorf("two tracks: shear per unit reaction %v, want 1 (lever rule, both loaded)", v.factor)
	}
	if _, _, err := (System{PanelX: []float64{0, 5}, TrussSpacingM: 3, TrackOffsetsM: []float64{1}}).Elements(); err == nil {
		t.Error("a stringer line outside the trusses must be refused")
	}
}

func TestStringerLiveIsHalfTheTrack(t *testing.T) {
	tr := cooperE80(t)
	sys := System{PanelX: []float64{0, 6, 12}}
	els, notes, err := sys.Elements()
	if err != nil {
		t.Fatal(err)
	}
	if notes.FloorBeamsNotRated != 3 {
		t.Errorf("truss spacing unknown: %d floor beams not rated, want 3", notes.FloorBeamsNotRated)
	}
	var a Analyser
	live, err := a.Live(sys, els, []*envelope.Load{prepare(t, tr)})
	if err != nil {
		t.Fatal(err)
	}
	pk, err := MaxMoment(tr, 6)
	if err != nil {
		t.Fatal(err)
	}
	i, _ := find(t, els, "S1-2:M")
	// one stringer line under one rail: half the axle loads (common practice)
	if math.Abs(live[i].Max.Value-pk.Value/2) > 1e-9 {
		t.Errorf("stringer moment %v, want half of %v", live[i].Max.Value, pk.Value)
	}
	if live[i].Max.LoadedFromM < 6-1e-9 || live[i].Max.LoadedToM > 12+1e-9 {
		t.Errorf("stringer of panel 2 loaded over [%v, %v], outside its panel", live[i].Max.LoadedFromM, live[i].Max.LoadedToM)
	}
	// End shear: the heaviest axles near the support; no lower than one 80 kip axle's half
	// (AREMA Cooper E80, from memory: 80 kip = 355.9 kN).
	i, _ = find(t, els, "S1-1:V")
	if v := live[i].Max.Value; v < 80*traffic.KNPerKip/2 {
		t.Errorf("stringer end shear %v kN below half an 80 kip axle", v)
	}
}

// TestDynamicPerElement checks the allowance per element against the formulas (from
// memory: EN 1991-2 6.4.5.2 and Table 6.2; AREMA chapter 15).
func TestDynamicPerElement(t *testing.T) {
	p, b := 5.0, 5.5
	sys := System{PanelX: []float64{0, p, 2 * p}, TrussSpacingM: b}
	els, _, err := sys.Elements()
	if err != nil {
		t.Fatal(err)
	}
	phi3 := func(l float64) float64 { return min(max(2.16/(math.Sqrt(l)-0.2)+0.73, 1), 2) }
	arema := func(lm float64) float64 { lf := lm / 0.3048; return 1 + (40-3*lf*lf/1600)/100 }
	d3 := traffic.Dynamic{Kind: traffic.Phi3}
	da := traffic.Dynamic{Kind: traffic.AREMASteel}
	for _, c := range []struct {
		label      string
		en, aremaF float64
	}{
		{"S1-1:M", phi3(p + 3), arema(p)}, // stringer: L = p + 3 m; AREMA: stringer length
		{"FB1:M", phi3(2 * b), arema(p)},  // cross girder: 2 b; AREMA: longer adjacent panel
		{"FB0:V", phi3(3.6), arema(p)},    // end cross girder: 3.6 m
	} {
		_, e := find(t, els, c.label)
		if got := e.Impact(d3, DefaultLengths); math.Abs(got-c.en) > 1e-12 {
			t.Errorf("%s phi3: %v, want %v", c.label, got, c.en)
		}
		if got := e.Impact(da, DefaultLengths); math.Abs(got-c.aremaF) > 1e-12 {
			t.Errorf("%s arema: %v, want %v", c.label, got, c.aremaF)
		}
	}
	// Rocking: 100/S percent with S the stringer spacing in ft (AREMA, from memory).
	_, e := find(t, els, "S1-1:V")
	got := e.Impact(traffic.Dynamic{Kind: traffic.AREMASteel, SpacingM: b}, DefaultLengths)
	if want := arema(p) + 1/(DefaultStringerSpacingM/0.3048); math.Abs(got-want) > 1e-12 {
		t.Errorf("stringer with rocking: %v, want %v", got, want)
	}
}

func TestLabels(t *testing.T) {
	for _, l := range []string{"S1-3", "FB0", "FB12", "S2-10"} {
		if !IsLabel(l) {
			t.Errorf("%s: a floor label", l)
		}
	}
	for _, l := range []string{"S1", "FB", "U1-L2", "S-1", "FBx", "S1-", "L0-L1"} {
		if IsLabel(l) {
			t.Errorf("%s: not a floor label", l)
		}
	}
	if got := Labels(3, 2); len(got) != 3*2+4 || got[0] != "S1-1" || got[len(got)-1] != "FB3" {
		t.Errorf("labels %v", got)
	}
}

// TestResultLineReproducesLive: the train placed as the run found it on the element's line
// gives the element's live effect (superposition, the definition of an influence line);
// checked against the envelope package's exact sweep over the same line.
func TestResultLineReproducesLive(t *testing.T) {
	tr := cooperE80(t)
	sys := System{PanelX: []float64{0, 5.5, 11, 16.5, 22}, TrussSpacingM: 5}
	els, live := liveUnder(t, sys, tr)
	for _, label := range []string{"S1-2:M", "S1-4:V", "FB2:M", "FB0:V"} {
		i, e := find(t, els, label)
		x, eta, _, err := ResultLine(sys.PanelX, label, tr)
		if err != nil {
			t.Fatal(err)
		}
		res, err := envelope.Compute(x, [][]float64{eta}, tr, envelope.Options{})
		if err != nil {
			t.Fatal(err)
		}
		want := live[i].Max.Value
		if e.Kind == KindFloorBeam {
			want /= e.factor
		}
		if math.Abs(res[0].Max.Value-want) > 1e-6*want {
			t.Errorf("%s: line gives %v, live %v", label, res[0].Max.Value, want)
		}
	}
}

// TestHangerIsTheFloorBeamReaction: in a through Pratt truss the hanger L1-U1 carries the
// floor beam's reaction at L1 and nothing else: its influence line from the truss analysis
// (method of joints at L1, here by the stiffness method) is the floor beam's reaction line,
// 1 at L1 and 0 at every other panel point. So the trusses' rating of the hanger is the
// rating against R times the truss share (common practice), and the floor package does not
// rate it again.
func TestHangerIsTheFloorBeamReaction(t *testing.T) {
	tr, err := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	if err != nil {
		t.Fatal(err)
	}
	lines, err := analysis.InfluenceLines(tr, analysis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var hanger []float64
	for _, m := range lines.Members {
		if m.Label == "L1-U1" {
			hanger = m.Ordinates
		}
	}
	x, eta, _, err := ResultLine(tr.DeckX(), "FB1:V", nil)
	if err != nil {
		t.Fatal(err)
	}
	for j, xj := range lines.X {
		if want := analysis.Interpolate(x, eta, xj); math.Abs(hanger[j]-want) > 1e-9 {
			t.Errorf("x = %g: hanger %v, floor-beam reaction %v", xj, hanger[j], want)
		}
	}
}
