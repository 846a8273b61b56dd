package plan

import (
	"context"
	"errors"
	"strings"
	"sync"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

var grooved struct {
	sync.Once
	c   *analysis.Canal
	err error
}

// groovedCanal is the demo canal narrowed, inside an oval root with a groove on the outer side
// of the main curve (thinnest wall about 0.18 mm as scanned, 7.6 mm from the apical end).
func groovedCanal(t *testing.T) *analysis.Canal {
	grooved.Do(func() {
		spec, err := models.ParseCanalSpec("grooved.json", []byte(`{"name": "grooved (invented)",
			"segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 40},
				{"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180}, {"kind": "straight", "length": 2}],
			"orifice_d": 0.7, "apical_d": 0.15, "oval": 1.4, "working_length": 17.5,
			"root": {"coronal_d": 4.2, "apical_d": 1.6, "oval": 1.7,
				"concavity": {"depth": 0.7, "toward_deg": 180, "width_deg": 90, "from_apex": 8, "length": 12}}}`))
		if err != nil {
			grooved.err = err
			return
		}
		grooved.c, grooved.err = analysis.CanalFromSpec(context.Background(), "grooved.json", spec, analysis.CanalOptions{})
	})
	if grooved.err != nil {
		t.Fatal(grooved.err)
	}
	return grooved.c
}

// TestPlanKeepsTheWall: the wall to keep is a constraint. Where the target file itself leaves
// less (it ends every plan), the answer is infeasible and names the wall; under a limit the
// target keeps, the plan's files all keep it (or, where the canal as scanned has less, do not
// thin it) and the explanation states the wall left. Without a root the constraint is refused.
func TestPlanKeepsTheWall(t *testing.T) {
	c := groovedCanal(t)
	tg := Target{Size: 25, Taper: 0.04}
	_, err := Propose(context.Background(), c, Options{Target: tg, KeepWallMM: 0.12})
	var inf *InfeasibleError
	if !errors.As(err, &inf) || inf.Constraint != ConstraintWall || inf.Needed >= 0.12 {
		t.Fatalf("keep 0.12 mm: %v, want infeasible on the wall (the 25/.04 alone leaves about 0.075 mm)", err)
	}
	pl, err := Propose(context.Background(), c, Options{Target: tg, KeepWallMM: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	said := false
	for _, line := range pl.Explanation {
		said = said || strings.Contains(line, "wall to keep")
	}
	if !said {
		t.Errorf("the explanation does not state the wall: %q", pl.Explanation)
	}
	for _, s := range pl.Result.Steps {
		if w := s.Metrics.ThinnestWallMM; w == nil || *w < 0.05 {
			t.Errorf("step %d leaves %v mm of wall, under the 0.05 to keep", s.Number, w)
		}
	}
	plain := gentleTestCanal(t)
	if _, err := Propose(context.Background(), plain, Options{Target: tg, KeepWallMM: 0.1}); err == nil || !strings.Contains(err.Error(), "root") {
		t.Errorf("a wall to keep without a root: %v", err)
	}
}
