package screening

import "github.com/trussfleet/trussfleet/screening/analysis"

// FatigueCheck prepares what a bridge's fatigue check needs (its lines, and the members'
// governing trusses from a screening without fatigue) and gives the check alone, for
// BenchmarkCheckFatigue.
func FatigueCheck(b Bridge, s *Settings) (func(w *Screener) error, error) {
	t, aopt, err := b.Geometry()
	if err != nil {
		return nil, err
	}
	lines, err := analysis.InfluenceLines(t, aopt)
	if err != nil {
		return nil, err
	}
	plain := *s
	plain.Fatigue = nil
	var w Screener
	res := w.Screen(b, &plain)
	if res.Err != nil {
		return nil, res.Err
	}
	return func(w *Screener) error { return w.checkFatigue(b, s, t.SpanM(), lines, &res) }, nil
}
