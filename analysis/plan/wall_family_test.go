package plan

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"strings"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

var wallFamily = flag.Bool("wall-family", false, "TestKeepWallFamily over every groove (depth, place, side); false = the subset of normal tests")

// TestKeepWallFamily: grooved roots of several depths, places along the canal and sides (the
// demo canal's shape, narrowed). For each, the plan without a wall to keep leaves least wall
// W (analysis.Run at full resolution). Keeping W - 0.02 mm the constraint is not active at that
// plan, so the planner proposes the same plan and says the wall does not bind (an optimum that
// meets a constraint stays the optimum when the constraint is added). Keeping W + 0.02 mm that
// plan is ruled out: the answer is either infeasible naming the wall, when the target file taken
// to working length alone leaves less (checked by analysis.Run), or another plan whose every
// step leaves at least that much (analysis.Run) and whose explanation says the wall binds.
func TestKeepWallFamily(t *testing.T) {
	type groove struct{ depth, fromApex, toward float64 }
	cases := []groove{{0.6, 15, 180}, {0.3, 9, 0}}
	if *wallFamily {
		cases = nil
		for _, d := range []float64{0.3, 0.6} {
			for _, a := range []float64{4, 9, 15} {
				for _, tw := range []float64{0, 90, 180} {
					cases = append(cases, groove{d, a, tw})
				}
			}
		}
	}
	ctx := context.Background()
	tg := Target{Size: 25, Taper: 0.04}
	for _, g := range cases {
		name := fmt.Sprintf("groove %.1f mm deep, %g mm from the apical end, toward %g°", g.depth, g.fromApex, g.toward)
		spec, err := models.ParseCanalSpec("grooved.json", []byte(fmt.Sprintf(`{"name": "grooved (invented)",
			"segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 40},
				{"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180}, {"kind": "straight", "length": 2}],
			"orifice_d": 0.7, "apical_d": 0.15, "oval": 1.4, "working_length": 17.5,
			"root": {"coronal_d": 4.2, "apical_d": 1.6, "oval": 1.7,
				"concavity": {"depth": %g, "toward_deg": %g, "width_deg": 90, "from_apex": %g, "length": 5}}}`,
			g.depth, g.toward, g.fromApex)))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		c, err := analysis.CanalFromSpec(ctx, "grooved.json", spec, analysis.CanalOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		least := func(seq *models.Sequence) float64 {
			res, err := analysis.Run(ctx, c, seq, analysis.RunOptions{})
			if err != nil {
				t.Fatal(err)
			}
			w := 1e9
			for _, s := range res.Steps {
				w = min(w, *s.Metrics.ThinnestWallMM)
			}
			return w
		}
		said := func(pl *Plan, words string) bool {
			for _, line := range pl.Explanation {
				if strings.Contains(line, words) {
					return true
				}
			}
			return false
		}
		free, err := Propose(ctx, c, Options{Target: tg})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		W := least(free.Sequence)
		if loose := W - 0.02; loose > 0 {
			pl, err := Propose(ctx, c, Options{Target: tg, KeepWallMM: loose})
			switch {
			case err != nil:
				t.Errorf("%s, keep %.3f mm (the free plan leaves %.3f): %v", name, loose, W, err)
			case labels(pl.Sequence) != labels(free.Sequence) || !said(pl, "does not bind"):
				t.Errorf("%s, keep %.3f mm (the free plan leaves %.3f): %s, want the free plan %s, not binding", name, loose, W,
					labels(pl.Sequence), labels(free.Sequence))
			}
		}
		tight := W + 0.02
		pl, err := Propose(ctx, c, Options{Target: tg, KeepWallMM: tight})
		var inf *InfeasibleError
		switch {
		case errors.As(err, &inf):
			alone := &models.Sequence{PathModel: models.PathCentred,
				Steps: []models.Step{models.NewStep(models.NewInstrument(25, 0.04), models.DepthWL(0))}}
			if inf.Constraint != ConstraintWall || !(least(alone) < tight) {
				t.Errorf("%s, keep %.3f mm: %v (the 25/.04 alone leaves %.3f)", name, tight, err, least(alone))
			}
		case err != nil:
			t.Errorf("%s, keep %.3f mm: %v", name, tight, err)
		default:
			if w := least(pl.Sequence); w < tight || !said(pl, "binds") {
				t.Errorf("%s, keep %.3f mm: %s leaves %.3f mm; explanation %q", name, tight, labels(pl.Sequence), w, pl.Explanation)
			}
		}
	}
}
