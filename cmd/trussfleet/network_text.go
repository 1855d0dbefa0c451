package main

import (
	"fmt"
	"strings"
)

// fmtE prints a Cooper E rating (E 64), or - where there is none.
func fmtE(e *float64) string {
	if e == nil {
		return "-"
	}
	return fmt.Sprintf("E%.0f", *e)
}

// categoriesText prints the highest line categories carried: "C4 D2", "none" where not even
// A is carried, "-" where the run did not rate them.
func categoriesText(c []string) string {
	switch {
	case c == nil:
		return "-"
	case len(c) == 0:
		return "none"
	}
	return strings.Join(c, " ")
}
