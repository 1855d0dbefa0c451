package screening

import "github.com/trussfleet/trussfleet/screening/envelope"

// NetworkWagons gives, for lines el with ordinates ords, each wagon geometry's load whose
// envelope a Screener holds after wagonLoads (taken with w.Envelope), and the rakes of 1 to
// n wagons themselves, for TestSplitWagonsGiveTheRakes.
func NetworkWagons(nt *NetworkTrains, el *envelope.Lines, ords [][]float64) (held func(g int) ([]envelope.Extremes, error), rakes []*envelope.Load, err error) {
	var w Screener
	loads, err := w.wagonLoads(nt, el, ords)
	if err != nil {
		return nil, nil, err
	}
	if rakes, err = nt.forSpan(el.SpanM(), false); err != nil {
		return nil, nil, err
	}
	return func(g int) ([]envelope.Extremes, error) { return w.sweep(el, loads[g], envelope.Options{}) }, rakes, nil
}
