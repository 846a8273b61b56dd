package plan

import (
	"context"
	"errors"
	"math"
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

// coronalGrooveJSON is an invented canal (the demo's shape, narrowed) in an oval root with a
// groove on the outer side of the main curve (180°) whose bottom lies 1 mm below the orifice:
// 17.28 mm from the apical end of a canal 10 + 5*40π/180 + 8*20π/180 + 2 = 18.28 mm long.
const coronalGrooveJSON = `{"name": "coronal groove (invented)",
	"segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 40},
		{"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180}, {"kind": "straight", "length": 2}],
	"orifice_d": 0.7, "apical_d": 0.15, "oval": 1.4, "working_length": 17.5,
	"root": {"coronal_d": 4.2, "apical_d": 1.6, "oval": 1.7,
		"concavity": {"depth": 0.73, "toward_deg": 180, "width_deg": 90, "from_apex": 17.28, "length": 4}}}`

func coronalGrooveCanal(t testing.TB) *analysis.Canal {
	t.Helper()
	spec, err := models.ParseCanalSpec("coronal-groove.json", []byte(coronalGrooveJSON))
	if err != nil {
		t.Fatal(err)
	}
	c, err := analysis.CanalFromSpec(context.Background(), "coronal-groove.json", spec, analysis.CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// leastRadialWall is the least wall, measured along the radius toward the groove (180°), that a
// centred file of tip diameter tip (mm) and taper, its tip at depth D, leaves along its 16 mm of
// flutes (ISO 3630-1's least flute length, the catalogue's) in coronalGrooveJSON, and where (mm
// from the orifice); analytic geometry of the spec: the root's area-equivalent diameter is
// 4.2 + (1.6 - 4.2) s/L; 180° lies on the oval's short axis (the long one is at 90°), where
// the radius is (diameter/2)/sqrt(1.7), less the groove, 0.73 (1 + cos(pi u/2))/2 at u mm from
// its bottom (|u| < 2); the file's radius is (tip + taper (D - s))/2. The shortest distance to
// the root is at most the radial one.
func leastRadialWall(tip, taper, D float64) (wall, at float64) {
	L := 10 + 5*40*math.Pi/180 + 8*20*math.Pi/180 + 2
	bottom := L - 17.28
	wall = math.Inf(1)
	for s := max(0, D-models.DefaultCuttingLength); s <= D; s += 0.005 {
		groove := 0.0
		if u := s - bottom; math.Abs(u) < 2 {
			groove = 0.73 * (1 + math.Cos(math.Pi*u/2)) / 2
		}
		root := (4.2+(1.6-4.2)*s/L)/2/math.Sqrt(1.7) - groove
		if w := root - (tip+taper*(D-s))/2; w < wall {
			wall, at = w, s
		}
	}
	return wall, at
}

// TestKeepWallSteersThePlan: a groove 1 mm below the orifice leaves a thin wall where the
// opening files of wide taper pass. The 25/.04 taken to working length ends its flutes 1.5 mm
// below the orifice and leaves about 0.46 mm along the radius, a 20/.10 taken to 9.5 mm about
// 0.30 mm (leastRadialWall), so a wall of 0.33 mm to keep rules out wide openers there yet
// leaves the target possible. Without the
// constraint the planner opens with files that leave less than 0.33 mm; with it, it proposes a
// different plan whose every step leaves at least 0.33 mm (measured by analysis.Run at full
// resolution), names the constraint as binding, and comes out the same on one core as on all.
// A wall of 0.47 mm is more than the target alone leaves: infeasible, naming the wall.
func TestKeepWallSteersThePlan(t *testing.T) {
	const keep = 0.33
	target, _ := leastRadialWall(0.25, 0.04, 17.5)
	if !(target > keep+0.05) {
		t.Fatalf("test set-up: the target leaves %.3f mm along the radius, want more than %.2f", target, keep+0.05)
	}
	if w, _ := leastRadialWall(0.20, 0.10, 9.5); !(w < keep-0.02) {
		t.Fatalf("test set-up: a 20/.10 to 9.5 mm leaves %.3f mm along the radius, want less than %.2f", w, keep-0.02)
	}
	c := coronalGrooveCanal(t)
	ctx := context.Background()
	tg := Target{Size: 25, Taper: 0.04}
	free, err := Propose(ctx, c, Options{Target: tg})
	if err != nil {
		t.Fatal(err)
	}
	kept, err := Propose(ctx, c, Options{Target: tg, KeepWallMM: keep})
	if err != nil {
		t.Fatal(err)
	}
	thinnest := func(res *analysis.Result) float64 {
		least := math.Inf(1)
		for _, s := range res.Steps {
			least = min(least, *s.Metrics.ThinnestWallMM)
		}
		return least
	}
	// The checks below re-run each plan through analysis.Run: the same full-resolution wall
	// the outputs state (checked against analytic tubes and VTK in analysis/wall_test.go).
	rerun := func(seq *models.Sequence) *analysis.Result {
		res, err := analysis.Run(ctx, c, seq, analysis.RunOptions{MinWallMM: keep})
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	if w := thinnest(rerun(free.Sequence)); !(w < keep) {
		t.Errorf("without a wall to keep the plan leaves %.3f mm: the case does not test the constraint", w)
	}
	if w := thinnest(rerun(kept.Sequence)); w < keep {
		t.Errorf("keeping %.2f mm the plan leaves %.3f mm", keep, w)
	}
	if labels(free.Sequence) == labels(kept.Sequence) {
		t.Errorf("the wall to keep did not change the plan: %s", labels(kept.Sequence))
	}
	binds := false
	for _, line := range kept.Explanation {
		binds = binds || strings.Contains(line, "wall to keep (0.33 mm) binds")
	}
	if !binds {
		t.Errorf("the explanation does not say the wall binds: %q", kept.Explanation)
	}
	one, err := Propose(ctx, c, Options{Target: tg, KeepWallMM: keep, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if labels(one.Sequence) != labels(kept.Sequence) {
		t.Errorf("one core: %s, all cores: %s", labels(one.Sequence), labels(kept.Sequence))
	}

	const tooMuch = 0.47
	if !(target < tooMuch) {
		t.Fatalf("test set-up: the target leaves %.3f mm along the radius, want less than %.2f", target, tooMuch)
	}
	_, err = Propose(ctx, c, Options{Target: tg, KeepWallMM: tooMuch})
	var inf *InfeasibleError
	if !errors.As(err, &inf) || inf.Constraint != ConstraintWall || !(inf.Needed < tooMuch) || !strings.Contains(err.Error(), "wall") {
		t.Fatalf("keep %.2f mm: %v, want infeasible naming the wall", tooMuch, err)
	}
	// The shortest distance is at most the radial one (0.01 mm: the radius map's sampling).
	if inf.Needed > target+0.01 {
		t.Errorf("infeasible: the target leaves %.3f mm, more than the %.3f mm along the radius", inf.Needed, target)
	}
}

// labels writes a sequence's steps: "25/.06 to WL-4, 25/.04 to WL".
func labels(seq *models.Sequence) string {
	var out []string
	for _, st := range seq.Steps {
		out = append(out, stepText(st))
	}
	return strings.Join(out, ", ")
}
