package analysis

import (
	"strings"
	"testing"
)

// A stretch the scan does not resolve draws the apex-unresolved advice on the first step that
// reaches it, with the stretch measured from the apical end, and is stated in the summary.
func TestUnresolvedStretchDrawsAdvice(t *testing.T) {
	c := canalFor(t, `{"kind": "straight", "length": 16}`, 1.0, 0.3)
	u := *c
	L := u.Line.Length()
	u.Unresolved = []Stretch{{From: L - 3, To: L}}
	res := runFor(t, &u, `{"size": 15, "taper": 0.02, "depth": "WL-4"}, {"size": 20, "taper": 0.04, "depth": "WL"}, {"size": 25, "taper": 0.04, "depth": "WL"}`, RunOptions{})
	var with []int
	for _, st := range res.Steps {
		for _, a := range st.Metrics.Advice {
			if a.Code == AdviceApexUnresolved {
				with = append(with, st.Number)
				if !strings.Contains(a.Text, "from 3.0 to 0.0 mm from the apical end") {
					t.Errorf("advice text %q", a.Text)
				}
			}
		}
	}
	// Step 1 stops 4 mm short (1 mm before the stretch); step 2 is the first to enter it.
	if len(with) != 1 || with[0] != 2 {
		t.Errorf("apex-unresolved on steps %v, want [2]", with)
	}
	if s := u.Summary(false); len(s.Unresolved) != 1 || s.Unresolved[0].FromApexMM != 3 || s.Unresolved[0].ToApexMM != 0 {
		t.Errorf("summary %+v", s.Unresolved)
	}
	if s := c.Summary(false); s.Unresolved == nil || len(s.Unresolved) != 0 {
		t.Errorf("a spec canal's summary: %+v (want an empty list, not null)", s.Unresolved)
	}
}
