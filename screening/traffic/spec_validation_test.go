package traffic

import (
	"errors"
	"strings"
	"testing"
)

// TestBadSpecs: every malformed train or allowance names what is wrong.
func TestBadSpecs(t *testing.T) {
	trains := map[string]string{
		"lm71:alpha=NaN":           "not a number",
		"lm71:alpha=3":             "between 0.75 and 1.46",
		"cooper-alt:e=Inf":         "at most 200",
		"uniform:q=NaN":            "not a number",
		"cooper:e":                 "needs a value",
		"lm71:alpha=1.33,alpha=.8": "given twice",
		"cooper:x=1":               "unknown parameter",
		"nosuch":                   "no built-in model",
		"configs/trains/nope.yaml": "not found",
	}
	for spec, says := range trains {
		_, err := ParseSpec(spec, nil)
		if err == nil || !strings.Contains(err.Error(), says) {
			t.Errorf("%s: got %v, want an error saying %q", spec, err, says)
		}
		// Only a name found nowhere lets a caller look further (a stored train).
		if unknown := spec == "nosuch" || spec == "configs/trains/nope.yaml"; errors.Is(err, ErrUnknownTrain) != unknown {
			t.Errorf("%s: errors.Is(err, ErrUnknownTrain) = %v, want %v", spec, !unknown, unknown)
		}
	}
	for spec, says := range map[string]string{"fixed:NaN": "from 0 to 2", "fixed:1e308": "from 0 to 2", "fixed:-0.1": "from 0 to 2", "phi9": "unknown", "phi2:l=-3": "positive length"} {
		if _, err := ParseDynamic(spec); err == nil || !strings.Contains(err.Error(), says) {
			t.Errorf("%s: got %v, want an error saying %q", spec, err, says)
		}
	}
	// An unlimited length is a length: allowed.
	if _, err := ParseSpec("uniform:q=10,max=inf", nil); err != nil {
		t.Errorf("uniform with max=inf: %v", err)
	}
}
