package report

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// Explain writes to w, for a terminal, everything behind one member's result: the bridge's
// and the member's geometry, the member's influence line, every train's extremes and where
// it stood (every train of the run's scenarios where run.Trains holds their definitions, the
// governing ones otherwise), the dynamic allowance, the loads of the governing placement
// with their sum, the rating arithmetic and why the member is flagged. Texts from the
// inventory are written through safetext.Terminal (safetext.Cell in tables). Lengths and
// forces are in SI; ExplainIn writes them in another system of units.
func Explain(w io.Writer, run Run, b Bridge, member string) error {
	return ExplainIn(w, run, b, member, units.SI)
}

// ExplainIn is Explain with lengths, forces and loads per length in units u, rounded by
// internal/units; influence ordinates, shares and rating factors have no unit.
func ExplainIn(w io.Writer, run Run, b Bridge, member string, u units.System) error {
	if b.Row.Status == "failed" {
		return fmt.Errorf("bridge %s was not screened in run %d: %s", safetext.Terminal(b.Row.BridgeID), run.ID, safetext.Terminal(b.Row.Error))
	}
	// Member labels are matched regardless of case, as the importers match them (l2-l3 is
	// L2-L3); bridge ids exactly.
	idx := -1
	for i, m := range b.Members {
		if strings.EqualFold(m.Label, member) {
			idx, member = i, m.Label
		}
	}
	t, aopt, err := screening.Geometry(b.Truss, b.Table)
	if err != nil {
		return fmt.Errorf("bridge %s: rebuilding its %s geometry: %w", safetext.Terminal(b.Row.BridgeID), safetext.Terminal(b.Truss.Type), err)
	}
	if idx < 0 {
		// Most severe first (lowest proposed RF, unrated last).
		labels := make([]string, 0, len(b.Members))
		for _, i := range severityOrder(b.Members) {
			labels = append(labels, b.Members[i].Label)
		}
		if len(labels) == 0 {
			labels = t.Labels()
		}
		return fmt.Errorf("bridge %s has no member %q; its members: %s", safetext.Terminal(b.Row.BridgeID), safetext.Terminal(member), safetext.Terminal(strings.Join(labels, ", ")))
	}
	if _, _, ok := floor.ResultEffect(member); ok {
		return explainFloor(w, run, b, t, b.Members[idx], u)
	}
	k := t.Member(member)
	if k < 0 {
		return fmt.Errorf("bridge %s: member %q is not in the rebuilt %s geometry (members: %s)", safetext.Terminal(b.Row.BridgeID), safetext.Terminal(member), t.Params.Type, strings.Join(t.Labels(), ", "))
	}
	lines, err := analysis.InfluenceLines(t, aopt)
	if err != nil {
		return fmt.Errorf("bridge %s: influence lines: %w", safetext.Terminal(b.Row.BridgeID), err)
	}
	m := b.Members[idx]
	eta := lines.Members[k].Ordinates
	ew := &errWriter{w: w}
	p := func(format string, a ...any) { fmt.Fprintf(ew, format, a...) }
	// Units and rounding of the quantities shown (internal/units).
	lu, kN, kNm := u.Name(units.Length), u.Name(units.Force), u.Name(units.PerLength)
	length := func(v float64) string { return qty(u, units.Length, v) }
	force := func(v float64) string { return signedQty(u, units.Force, v) }

	r := b.Row
	p("Bridge %s  %s\n", safetext.Terminal(r.BridgeID), safetext.Terminal(r.Name))
	where := []string{}
	if r.Line != "" {
		where = append(where, safetext.Terminal(r.Line))
	}
	if r.ChainageKm != nil {
		where = append(where, "km "+num(*r.ChainageKm, 3))
	}
	if r.Rank > 0 {
		where = append(where, fmt.Sprintf("rank %d", r.Rank))
	}
	if len(where) > 0 {
		p("  %s\n", strings.Join(where, ", "))
	}
	tp := t.Params
	p("  %s truss, %s, span %s %s, %d panels, depth %s %s", tp.Type, orText(tp.Deck, truss.Through), length(tp.SpanM), lu, tp.Panels, length(tp.DepthM), lu)
	if tp.EndPosts != "" {
		p(", %s end posts", tp.EndPosts)
	}
	if specialForm(t) {
		p("\n  %s", formCaption(t, u))
	}
	if b.screeningBridge().HasSection() {
		p("\n  dead load %s %s on this truss\n", qty(u, units.PerLength, b.DeadLoadKNPerM), kNm)
	} else {
		p("\n  truss share %s x %d track(s) = %s of each train's load; dead load %s %s on this truss\n",
			num(b.TrussShare, 3), max(b.Tracks, 1), num(b.liveShare(), 3), qty(u, units.PerLength, b.DeadLoadKNPerM), kNm)
	}
	explainSection(ew, b, m, u)
	p("Screening run %d (%s): %s\n\n", run.ID, orDash(run.Status), equation(run))

	mb := t.Members[k]
	ja, jb := t.Joints[mb.A], t.Joints[mb.B]
	p("Member %s (%s), joint %s (%s, %s) to %s (%s, %s), length %s %s\n", m.Label, mb.Kind,
		ja.Name, length(ja.X), length(ja.Y), jb.Name, length(jb.X), length(jb.Y), length(t.LengthM(k)), lu)
	if len(m.Flags) > 0 {
		p("Flags: %s\n", strings.Join(m.Flags, ", "))
	} else {
		p("Flags: none\n")
	}

	p("\nInfluence line: force in %s (%s, tension +) per %s of load at each deck panel point\n", m.Label, kN, kN)
	tw := tabwriter.NewWriter(ew, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "  x (%s)\teta\t\n", lu)
	for i, x := range lines.X {
		fmt.Fprintf(tw, "  %s\t%s\t\n", length(x), num(clean(eta[i]), 4))
	}
	_ = tw.Flush()
	pos, neg := analysis.Areas(lines.X, eta)
	p("  areas: %s and %s %s (%s per %s)", signedQty(u, units.Length, clean(pos)), signedQty(u, units.Length, clean(neg)), lu, kN, kNm)
	if zs := analysis.SignChanges(lines.X, eta); len(zs) > 0 {
		s := make([]string, len(zs))
		for i, z := range zs {
			s[i] = length(z)
		}
		p("; changes sign at x = %s %s", strings.Join(s, ", "), lu)
	}
	if wt := b.Section.TrussWeightKNPerM; wt > 0 {
		deck := b.DeadLoadKNPerM - wt
		p("\n  dead load D = deck part w x net area + the truss's own weight at both chords' joints = %s %s x %s %s + %s = %s %s\n", qty(u, units.PerLength, deck), kNm,
			signedQty(u, units.Length, clean(pos+neg)), lu, force(m.DeadKN-analysis.DeadLoad(lines.X, eta, deck)), force(m.DeadKN), kN)
	} else {
		p("\n  dead load D = w x net area = %s %s x %s %s = %s %s\n", qty(u, units.PerLength, b.DeadLoadKNPerM), kNm, signedQty(u, units.Length, clean(pos+neg)), lu,
			force(analysis.DeadLoad(lines.X, eta, b.DeadLoadKNPerM)), kN)
	}

	for _, sc := range []struct {
		name string
		s    Scenario
	}{{"existing", m.Existing}, {"proposed", m.Proposed}} {
		p("\n%s traffic", capitalise(sc.name))
		if names := run.Scenarios[sc.name]; len(names) > 0 {
			p(" (%s)", safetext.Terminal(strings.Join(names, ", ")))
		}
		p(": dynamic allowance %s gives 1 + I = %s\n", orDash(run.Dynamic), num(sc.s.Impact, 3))
		explainCases(ew, sc.s)
		// One placement per extreme, placementOf's, in the governing line, the table of
		// trains and the loads alike.
		gov := []struct {
			sense string
			sign  float64
			e     envelope.Extreme
			tr    *traffic.Train
			ok    bool
		}{{"tension", 1, sc.s.Max, sc.s.MaxTrain, false}, {"compression", -1, sc.s.Min, sc.s.MinTrain, false}}
		for i := range gov {
			gov[i].e, gov[i].ok = placementOf(gov[i].tr, gov[i].e, lines.X, eta, sc.s.shareOf(gov[i].sign, b), gov[i].sign)
		}
		explainTrains(ew, run, b, lines.X, eta, sc.name, gov[0].e, gov[1].e, u)
		for _, g := range gov {
			if !g.e.Loaded || g.e.Value == 0 {
				continue
			}
			p("  governing %s: %s %s, %s, %s\n", g.sense, force(g.e.Value), kN, safetext.Terminal(orDash(g.e.Train)), placementWordsIn(g.e, g.tr, u))
			if g.tr != nil && sc.name == "proposed" && g.sign == governing(m) {
				if g.ok {
					explainLoads(ew, g.tr, g.e, t.SpanM(), lines.X, eta, g.sign, sc.s.shareOf(g.sign, b), u)
				} else {
					p("    (train %s as now defined does not give this force: it has changed since the run)\n", safetext.Terminal(g.e.Train))
				}
			}
		}
	}

	explainFatigue(p, run, b, m, lines.X, eta, t.SpanM())
	explainRating(ew, run, m, u)
	for _, c := range Caution {
		p("CAUTION: %s\n", c)
	}
	return ew.err
}

// explainRating writes a result's rating arithmetic under both scenarios and why it is
// flagged; a floor element's effects are in its own unit (kN·m for a moment).
func explainRating(w io.Writer, run Run, m Member, u units.System) {
	q := u.Name(effectQty(m.Label))
	fmt.Fprintf(w, "\nRating (%s)\n", equation(run))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "  traffic\tsense\tbasis\theld %[1]s\tcond.\tC %[1]s\tD %[1]s\tL %[1]s\t1 + I\tRF\t\n", q)
	for _, c := range append(senses(m, "existing", m.Existing), senses(m, "proposed", m.Proposed)...) {
		v := calcOf(c, u)
		mark := ""
		if c.Governs {
			mark = " *"
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s%s\t\n", v.Scenario, v.Sense, v.Basis, v.Held, v.Cond, v.C, v.D, v.L, v.Impact, v.RF, mark)
	}
	_ = tw.Flush()
	fmt.Fprintf(w, "  * the lowest RF of the traffic\n")
	if n := storedNote(m, safetext.Terminal(m.ReferenceTrain)); n != "" {
		fmt.Fprintf(w, "  %s\n", n)
	}
	if u := unratedSenses(m); len(u) > 0 {
		fmt.Fprintf(w, "  unrated in %s: no capacity and no stored RF rated in that sense; counted in the bridge's unrated members", strings.Join(u, " and "))
		if !run.FlagUnrated {
			fmt.Fprintf(w, ", not flagged (thresholds.flag_unrated is off)")
		}
		fmt.Fprintf(w, "\n")
	}
	fmt.Fprintf(w, "  existing RF %s, proposed RF %s", rfText(m.RFExisting), rfText(m.RFProposed))
	if m.SenseProposed != "" {
		fmt.Fprintf(w, " (%s)", senseName(m.Label, m.SenseProposed))
	}
	fmt.Fprintf(w, "\n\nWhy flagged\n")
	if rs := reasons(run, m, u); len(rs) > 0 {
		for _, s := range rs {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	} else {
		flag, review := thresholds(run)
		fmt.Fprintf(w, "  not flagged: the proposed RF %s is at or above the review threshold %s (flag threshold %s) and no other flag applies.\n", rfText(m.RFProposed), num(review, 2), num(flag, 2))
	}
	fmt.Fprintf(w, "\n")
}

// explainTrains lists each train's extremes on the member, recomputed exactly from the
// train definitions the run holds; the governing train's row shows the governing extremes
// govMax and govMin as given (placementOf's), so that an extreme reached at several
// placements is shown at one.
func explainTrains(w io.Writer, run Run, b Bridge, xs, eta []float64, scenario string, govMax, govMin envelope.Extreme, u units.System) {
	names := run.Scenarios[scenario]
	var trains []*traffic.Train
	for _, n := range names {
		if tr := findTrain(run.Trains, n); tr != nil {
			trains = append(trains, tr)
		}
	}
	if len(trains) == 0 || len(trains) != len(names) {
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	share := b.liveShare()
	if b.screeningBridge().HasSection() {
		// Each track takes its own share (the loading case): the rows give a track's full load.
		share = 1
		fmt.Fprintf(w, "  each train with one track's full load (share 1):\n")
	}
	fmt.Fprintf(tw, "  train\tmax %[1]s\twhere\tmin %[1]s\twhere\t\n", u.Name(units.Force))
	for _, tr := range trains {
		ex, err := envelope.Compute(xs, [][]float64{eta}, tr, envelope.Options{Share: share})
		if err != nil {
			fmt.Fprintf(tw, "  %s\t%s\t\t\t\t\n", safetext.Cell(tr.Name), err)
			continue
		}
		e := ex[0]
		e.Max = governingRow(e.Max, govMax, tr)
		e.Min = governingRow(e.Min, govMin, tr)
		fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t\n", safetext.Cell(tr.Name), signedQty(u, units.Force, e.Max.Value), placementWordsIn(e.Max, tr, u),
			signedQty(u, units.Force, e.Min.Value), placementWordsIn(e.Min, tr, u))
	}
	_ = tw.Flush()
}

// governingRow is the extreme e of train tr as its row shows it: gov, where tr is gov's train
// and gives the same force.
func governingRow(e, gov envelope.Extreme, tr *traffic.Train) envelope.Extreme {
	if !gov.Loaded || (gov.Train != tr.Name && findTrain(map[string]*traffic.Train{tr.Name: tr}, gov.Train) == nil) {
		return e
	}
	if math.Abs(e.Value-gov.Value) > 1e-6*math.Max(1, math.Abs(gov.Value)) {
		return e
	}
	return gov
}

// findTrain looks a train up by its name or by the name it was configured with.
func findTrain(trains map[string]*traffic.Train, name string) *traffic.Train {
	if tr, ok := trains[name]; ok {
		return tr
	}
	keys := make([]string, 0, len(trains))
	for k := range trains {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if strings.EqualFold(strings.ReplaceAll(trains[k].Name, " ", "-"), name) {
			return trains[k]
		}
	}
	return nil
}

// placementWords says where a train stood, in m.
func placementWords(e envelope.Extreme, tr *traffic.Train) string {
	return placementWordsIn(e, tr, units.SI)
}

// placementWordsIn says where a train stood, lengths in units u.
func placementWordsIn(e envelope.Extreme, tr *traffic.Train, u units.System) string {
	if !e.Loaded {
		return "no train on the bridge"
	}
	l, m := func(v float64) string { return qty(u, units.Length, v) }, u.Name(units.Length)
	s := fmt.Sprintf("%s, front at %s %s", e.Direction, l(e.HeadM), m)
	if tr != nil && tr.Variable() {
		s += fmt.Sprintf(", %d in last group", e.Count)
	}
	if e.LoadedToM > e.LoadedFromM {
		s += fmt.Sprintf(", loading %s to %s %s", l(e.LoadedFromM), l(e.LoadedToM), m)
	}
	if e.TrailingM > 0 {
		s += fmt.Sprintf(", trailing load %s %s", l(e.TrailingM), m)
	}
	return s
}

// explainLoads lists the governing placement's loads with their effect, so that the sum
// can be followed by hand.
// Lengths, forces and loads per length are in units u; the integral of eta over a stretch
// is a length.
func explainLoads(w io.Writer, tr *traffic.Train, e envelope.Extreme, span float64, xs, eta []float64, sign, share float64, u units.System) {
	ob := placeTrain(tr, e.Placement, span, xs, eta, sign)
	l, f := func(v float64) string { return qty(u, units.Length, v) }, func(v float64) string { return signedQty(u, units.Force, v) }
	m, kN, kNm := u.Name(units.Length), u.Name(units.Force), u.Name(units.PerLength)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	if len(ob.Axles) > 0 {
		fmt.Fprintf(tw, "    axle\tx (%s)\tP (%s)\teta\tP x eta\t\n", m, kN)
		for i, a := range ob.Axles {
			h := analysis.Interpolate(xs, eta, a.XM)
			fmt.Fprintf(tw, "    %d\t%s\t%s\t%s\t%s\t\n", i+1, l(a.XM), qty(u, units.Force, a.LoadKN), num(clean(h), 4), f(a.LoadKN*h))
		}
	}
	_ = tw.Flush()
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	if len(ob.Stretches) > 0 {
		fmt.Fprintf(tw, "    from (%[1]s)\tto (%[1]s)\tq (%[2]s)\tintegral eta (%[1]s)\tq x integral\t\n", m, kNm)
		for _, s := range ob.Stretches {
			in := integral(xs, eta, s.FromM, s.ToM)
			fmt.Fprintf(tw, "    %s\t%s\t%s\t%s\t%s\t\n", l(s.FromM), l(s.ToM), qty(u, units.PerLength, s.QKNPerM), qty(u, units.Length, clean(in)), f(s.QKNPerM*in))
		}
	}
	_ = tw.Flush()
	eff := ob.effect(xs, eta)
	fmt.Fprintf(w, "    sum %s %s x truss share %s = %s %s (L as screened: %s %s)\n", f(eff), kN, num(share, 3), f(eff*share), kN, f(e.Value), kN)
}

func capitalise(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// errWriter keeps the first write error so that the explanation reads straight through.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return len(p), nil
	}
	n, err := e.w.Write(p)
	if err != nil {
		e.err = err
	}
	return n, nil
}
