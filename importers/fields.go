package importers

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/xuri/excelize/v2"
)

// Unit conversions for imperial columns: the foot and the kip from internal/units, where
// the outputs take them too; the mile and the square inch exact by definition.
const (
	metresPerFoot  = units.MPerFt
	kmPerMile      = 1.609344
	kNPerKip       = units.KNPerKip
	kNPerMPerKipFt = units.KNPerMPerKipPerFt // kip/ft -> kN/m
	mm2PerIn2      = 645.16
)

// row parses the fields of one record, recording each problem against its column.
type row struct {
	src    *csvSource
	errs   *errorList
	line   int
	ok     bool
	failed map[string]bool // columns already reported on this row
}

func (p *row) fail(name, value, format string, args ...any) {
	if p.failed == nil {
		p.failed = map[string]bool{}
	}
	p.failed[name] = true
	p.ok = false
	p.errs.add(&FieldError{Line: p.line, Column: p.src.col(name), Field: name, Value: value, Msg: fmt.Sprintf(format, args...)})
}

// text returns a field, failing when a required one is empty.
func (p *row) text(name, v string, required bool) string {
	if v == "" && required {
		p.fail(name, v, "a value is required")
	}
	return v
}

// number parses a decimal number. Empty gives nil (failing when required). Only plain
// decimal notation is accepted: strconv also takes hex floats, "Inf" and "NaN", which have
// no place in an inventory.
func (p *row) number(name, v string, required bool) *float64 {
	if v == "" {
		if required {
			p.fail(name, v, "a value is required")
		}
		return nil
	}
	text := v
	if p.src.input.decimalComma {
		var msg string
		if text, msg = fromDecimalComma(v); msg != "" {
			p.fail(name, v, "%s", msg)
			return nil
		}
	}
	if !plainDecimal(text) {
		if p.src.input.decimalComma {
			p.fail(name, v, "not a number (use a decimal comma or point, no thousands separators or units)")
		} else {
			p.fail(name, v, "not a number (use a decimal point, no thousands separators or units)")
		}
		return nil
	}
	f, err := strconv.ParseFloat(text, 64)
	if err != nil || math.IsInf(f, 0) || math.IsNaN(f) {
		p.fail(name, v, "not a finite number")
		return nil
	}
	return &f
}

// fromDecimalComma reads a number of a file written with decimal commas ("48,5") as one
// with a decimal point ("48.5"), or says why it cannot: a thousands separator would make a
// value mean one of two numbers, so none is read.
func fromDecimalComma(v string) (string, string) {
	commas, points := strings.Count(v, ","), strings.Count(v, ".")
	switch {
	case commas > 0 && points > 0:
		return "", "both a point and a comma: thousands separators are not read; write the number without them (1234,5)"
	case commas > 1:
		return "", "more than one comma: thousands separators are not read; write the number without them (1234,5)"
	case commas == 1:
		return strings.Replace(v, ",", ".", 1), ""
	case points == 1 && thousandsLike(v):
		return "", "ambiguous in a file with decimal commas: the point may separate thousands; write it with a decimal comma (12,5) or without a separator (12500)"
	}
	return v, ""
}

// thousandsLike reports whether v reads as a whole number with a point between thousands:
// one to three digits, not starting with 0, a point, three digits ("12.500").
func thousandsLike(v string) bool {
	v = strings.TrimLeft(v, "+-")
	whole, frac, _ := strings.Cut(v, ".")
	digits := func(s string) bool { return strings.Trim(s, "0123456789") == "" }
	return len(whole) >= 1 && len(whole) <= 3 && whole[0] != '0' && digits(whole) && len(frac) == 3 && digits(frac)
}

func plainDecimal(v string) bool {
	digits := false
	for i := 0; i < len(v); i++ {
		switch c := v[i]; {
		case c >= '0' && c <= '9':
			digits = true
		case c == '.' || c == '-' || c == '+' || c == 'e' || c == 'E':
		default:
			return false
		}
	}
	return digits
}

// quantity parses a metric column or its imperial alternative, converted to SI.
func (p *row) quantity(c column, metric, imperial string) *float64 {
	if p.src.has(c.alt) {
		f := p.number(c.alt, imperial, c.required)
		if f != nil {
			*f *= c.factor
		}
		return f
	}
	return p.number(c.name, metric, c.required)
}

// positive checks that a present value is > 0. name is the column the value came from.
func (p *row) positive(name, raw string, f *float64) {
	if f != nil && !(*f > 0) {
		p.fail(name, raw, "must be greater than zero")
	}
}

// atMost checks that a present value that is greater than zero is at most limit (in the
// unit given, after conversion from an imperial column). name is the column the value came
// from.
func (p *row) atMost(name, raw string, f *float64, limit float64, unit string) {
	if f != nil && *f > 0 && *f > limit {
		p.fail(name, raw, "must be at most %s: a larger value is a typing or unit error", strings.TrimSpace(fmt.Sprintf("%g %s", limit, unit)))
	}
}

// integer parses a whole number; empty gives def (failing when required).
func (p *row) integer(name, v string, required bool, def int) int {
	if v == "" {
		if required {
			p.fail(name, v, "a value is required")
		}
		return def
	}
	n, err := strconv.Atoi(v)
	if err != nil {
		p.fail(name, v, "not a whole number")
		return def
	}
	return n
}

// date parses an ISO 8601 calendar date (YYYY-MM-DD); empty gives nil.
func (p *row) date(name, v string) *time.Time {
	if v == "" {
		return nil
	}
	if p.src.input.sheet != "" {
		// A workbook keeps a date as a serial number of days; its raw value is that number.
		if serial, err := strconv.ParseFloat(v, 64); err == nil && serial >= 1 && serial < 2958466 {
			if d, err := excelize.ExcelDateToTime(serial, false); err == nil {
				d = time.Date(d.Year(), d.Month(), d.Day(), 0, 0, 0, 0, time.UTC)
				return &d
			}
		}
	}
	d, err := time.Parse(time.DateOnly, v)
	if err != nil {
		p.fail(name, v, "not a date in the form YYYY-MM-DD")
		return nil
	}
	return &d
}

// pick returns the column a quantity was read from, for messages.
func (p *row) pick(c column) string {
	if p.src.has(c.alt) {
		return c.alt
	}
	return c.name
}
