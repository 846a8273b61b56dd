package plan

import (
	"testing"
)

// TestParseTarget reads sizes and tapers the way the trade writes them (ISO 3630-1 sizes,
// tapers in mm per mm).
func TestParseTarget(t *testing.T) {
	good := map[string]Target{"30/.04": {30, 0.04}, "30/0.04": {30, 0.04}, " 25 / .06 ": {25, 0.06}, "40/04": {40, 0.04}}
	for s, want := range good {
		if got, err := ParseTarget(s); err != nil || got != want {
			t.Errorf("%q: got %+v, %v", s, got, err)
		}
	}
	for _, s := range []string{"30", "x/.04", "30/", "30/-.04", "30/1e-2", "0/.04", "30/NaN", "30/2.0"} {
		if _, err := ParseTarget(s); err == nil {
			t.Errorf("%q: no error", s)
		}
	}
	if l := (Target{30, 0.04}).Label(); l != "30/.04" {
		t.Errorf("label %q", l)
	}
}
