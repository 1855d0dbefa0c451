package report

import (
	"math"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/internal/units"
)

// dash stands for a value that is not held or does not apply.
const dash = "—"

// num formats v with prec decimals, without a negative zero; NaN and ±Inf print as "—".
func num(v float64, prec int) string {
	if !finite(v) {
		return dash
	}
	s := strconv.FormatFloat(v, 'f', prec, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// signed formats v with an explicit sign, for forces whose sense matters.
func signed(v float64, prec int) string {
	s := num(v, prec)
	if s != dash && !strings.HasPrefix(s, "-") && strings.Trim(s, "0.") != "" {
		s = "+" + s
	}
	return strings.Replace(s, "-", "−", 1)
}

// qty formats an SI value of quantity q in units u, rounded by internal/units; "—" when not
// finite.
func qty(u units.System, q units.Quantity, v float64) string {
	if !finite(v) {
		return dash
	}
	return units.Fixed(u.Convert(q, v), u.Decimals(q))
}

// signedQty is qty with an explicit sign (signed).
func signedQty(u units.System, q units.Quantity, v float64) string {
	return signed(u.Convert(q, v), u.Decimals(q))
}

// optQty formats an optional SI value of quantity q in units u.
func optQty(u units.System, q units.Quantity, p *float64) string {
	if p == nil {
		return dash
	}
	return qty(u, q, *p)
}

// optNum formats an optional value.
func optNum(p *float64, prec int) string {
	if p == nil {
		return dash
	}
	return num(*p, prec)
}

// rfText formats a rating factor: two decimals, "—" when none.
func rfText(p *float64) string { return optNum(p, 2) }

// pctText formats a fraction as a signed percentage.
func pctText(p *float64) string {
	if p == nil || !finite(*p) {
		return dash
	}
	return signed(100**p, 0) + " %"
}

// sortKey is the value a sortable column sorts by; "" sorts last.
func sortKey(p *float64) string {
	if p == nil || !finite(*p) {
		return ""
	}
	return strconv.FormatFloat(*p, 'g', -1, 64)
}

// clean turns the solver's rounding residue into zero for display.
func clean(v float64) float64 {
	if math.Abs(v) < 5e-10 {
		return 0
	}
	return v
}

func ptr[T any](v T) *T { return &v }
