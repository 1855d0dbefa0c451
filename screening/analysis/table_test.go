package analysis_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/truss"
)

// TestTableLikeParams: a truss typed in as a table solves as the same truss built from
// parameters (the two descriptions are of one structure); the determinate ones need no
// areas, and the degree of indeterminacy is m + r - 2j (common practice).
func TestTableLikeParams(t *testing.T) {
	for _, p := range append(append([]truss.Params{}, newForms...), examples[0], truss.Params{Type: "pratt", SpanM: 48, Panels: 6, DepthM: 7, Spans: 2}) {
		want, wl := solve(t, p)
		tb := truss.TableOf(want)
		tr, opt, degree, err := analysis.TableTruss(tb)
		if p.Spans == 2 {
			// equal areas: the parametric solve's equal EA
			if err == nil || !strings.Contains(err.Error(), "indeterminate (m + r - 2j = 1)") {
				t.Fatalf("two spans without areas: %v", err)
			}
			for i := range tb.Members {
				tb.Members[i].AreaMM2 = 12000
			}
			tr, opt, degree, err = analysis.TableTruss(tb)
		}
		if err != nil {
			t.Fatalf("%+v: %v", p, err)
		}
		if degree != max(p.Spans, 1)-1 {
			t.Errorf("%+v: degree %d", p, degree)
		}
		l, err := analysis.InfluenceLines(tr, opt)
		if err != nil {
			t.Fatal(err)
		}
		for i := range wl.Members {
			for k := range wl.X {
				if a, b := wl.Members[i].Ordinates[k], l.Members[i].Ordinates[k]; math.Abs(a-b) > 1e-9 {
					t.Errorf("%s %s: params %g, table %g", p.Type, wl.Members[i].Label, a, b)
				}
			}
		}
		if got, want := tr.SpanLengthsM(), want.SpanLengthsM(); len(got) != len(want) || math.Abs(got[0]-want[0]) > 1e-9 {
			t.Errorf("%s: spans %v, want %v", p.Type, got, want)
		}
	}
}

// TestTableRedundant: a second diagonal in one panel makes the truss indeterminate of
// degree 1; with areas its forces depend on them: stiffening the added diagonal draws force
// into it, and scaling every area alike changes nothing (a linear truss's forces depend
// only on stiffness ratios, common practice).
func TestTableRedundant(t *testing.T) {
	tr, _ := truss.Build(truss.Params{Type: "pratt", SpanM: 36, Panels: 6, DepthM: 6})
	tb := truss.TableOf(tr)
	tb.Members = append(tb.Members, truss.TableMember{Label: "L2-U3", Kind: truss.Diagonal, From: "L2", To: "U3"})
	if _, _, d, err := analysis.TableTruss(tb); err == nil || d != 1 || !strings.Contains(err.Error(), "L0-L1") {
		t.Fatalf("no areas: degree %d, %v", d, err)
	}
	force := func(scale, extra float64) float64 {
		for i := range tb.Members {
			tb.Members[i].AreaMM2 = 10000 * scale
		}
		tb.Members[len(tb.Members)-1].AreaMM2 = extra * scale
		built, opt, _, err := analysis.TableTruss(tb)
		if err != nil {
			t.Fatal(err)
		}
		l, err := analysis.InfluenceLines(built, opt)
		if err != nil {
			t.Fatal(err)
		}
		return l.Members[len(tb.Members)-1].Ordinates[2]
	}
	slim, stout := force(1, 2000), force(1, 20000)
	if !(math.Abs(stout) > math.Abs(slim)*1.5) {
		t.Errorf("the redundant diagonal's force %g (slim) vs %g (stout): should grow with its area", slim, stout)
	}
	if a, b := force(1, 5000), force(7, 5000); math.Abs(a-b) > 1e-9 {
		t.Errorf("scaling every area changed the force: %g vs %g", a, b)
	}
}

func TestTableErrors(t *testing.T) {
	base, _ := truss.Build(truss.Params{Type: "pratt", SpanM: 48, Panels: 8, DepthM: 6})
	cases := []struct {
		name   string
		change func(*truss.Table)
		record string
		says   string
	}{
		{"deck out of order", func(tb *truss.Table) { tb.Deck[2], tb.Deck[3] = tb.Deck[3], tb.Deck[2] }, "deck", "in order"},
		{"label twice", func(tb *truss.Table) { tb.Members[3].Label = tb.Members[2].Label }, "member", "used twice"},
		{"unknown joint", func(tb *truss.Table) { tb.Members[1].To = "U99" }, "member", "no joint"},
		{"joint twice", func(tb *truss.Table) { tb.Joints[1].Name = tb.Joints[0].Name }, "joint", "named twice"},
		{"bad support", func(tb *truss.Table) { tb.Supports[1].Kind = "rocker" }, "support", "pin"},
		{"bad kind", func(tb *truss.Table) { tb.Members[0].Kind = "chord" }, "member", "allowed"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tb := truss.TableOf(base)
			c.change(tb)
			_, _, _, err := analysis.TableTruss(tb)
			var te *truss.TableError
			if !errors.As(err, &te) || te.Record != c.record || !strings.Contains(err.Error(), c.says) {
				t.Errorf("got %v, want a %s error saying %q", err, c.record, c.says)
			}
		})
	}
	// A mechanism: a diagonal left out. The panel shears, and the joints beyond it move.
	tb := truss.TableOf(base)
	tb.Members = append(tb.Members[:0:0], tb.Members...)
	for i, m := range tb.Members {
		if m.Label == "U2-L3" {
			tb.Members = append(tb.Members[:i], tb.Members[i+1:]...)
			break
		}
	}
	built, opt, d, err := analysis.TableTruss(tb)
	if err == nil {
		err = analysis.Stable(built, opt)
	}
	var me *analysis.MechanismError
	if !errors.As(err, &me) || d != -1 || !strings.Contains(err.Error(), "L3") {
		t.Errorf("mechanism: degree %d, %v", d, err)
	}
}
