package plan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

// TestPlanBeatsSingleFileAndSameTaperSeries: with the default alloy parameters, on the demo
// canal and on a 45 degree curve of 5 mm radius, the plan ends with the target at working
// length, keeps every constraint, and has a lower largest engaged length and a lower peak
// torque than the target file taken straight to length and than a series of same-taper files,
// with no higher peak fatigue use. Sources: common practice of the trade (change taper when
// changing files; torque grows with the wall area a file engages); file diameters from
// ISO 3630-1 (d = d0 + taper * u).
func TestPlanBeatsSingleFileAndSameTaperSeries(t *testing.T) {
	demo, _ := testCanals(t)
	for _, tc := range []struct {
		c      *analysis.Canal
		target Target
	}{
		{demo, Target{Size: 30, Taper: 0.04}},
		// (A 30/.04 is bent past its recoverable strain in the 3 mm curve of the other test
		// canal: see TestPlanRefusesWhatItWouldWarnAgainst.)
		{gentleTestCanal(t), Target{Size: 30, Taper: 0.04}},
	} {
		c, tg := tc.c, tc.target
		t.Run(c.Name, func(t *testing.T) {
			opt := Options{Target: tg, MaxSteps: 6}
			pl, err := Propose(context.Background(), c, opt)
			if err != nil {
				t.Fatal(err)
			}
			for _, line := range pl.Explanation {
				t.Log(line)
			}
			steps := pl.Sequence.Steps
			if len(steps) > opt.MaxSteps || len(pl.Result.Steps) != len(steps) {
				t.Fatalf("%d steps planned, %d run; at most %d allowed", len(steps), len(pl.Result.Steps), opt.MaxSteps)
			}
			// Reaches the target: the last file is the target at working length.
			last := steps[len(steps)-1]
			if in := last.Instrument; in.Size != tg.Size || in.Taper != tg.Taper || in.IsVariableTaper() || last.Depth != models.DepthWL(0) {
				t.Errorf("last step is %s, want %s to WL", stepText(last), tg.Label())
			}
			// The canal left is at least as wide as the target file, d(u) = d0 + taper u
			// (ISO 3630-1), everywhere its flutes reach from the orifice to working length
			// (beyond its 16 mm of flutes the shaft cuts nothing).
			prep := pl.Result.Steps[len(steps)-1].Prepared
			line := c.Line
			for i := 0; i < line.Len() && line.S[i] <= c.WorkingLength; i++ {
				if line.S[i] < c.WorkingLength-16 {
					continue
				}
				r := math.Min(float64(tg.Size)/100+tg.Taper*(c.WorkingLength-line.S[i]), 1.2) / 2
				for j := 0; j < c.Angles; j++ {
					if float64(prep[i*c.Angles+j]) < r-1e-5 {
						t.Fatalf("at s = %.2f mm the prepared canal is %.4f mm from the axis, less than the target's radius %.4f",
							line.S[i], prep[i*c.Angles+j], r)
					}
				}
			}
			// Tip sizes never go down (common practice: a smaller tip after a larger one
			// enlarges nothing at its tip), and the plan draws none of the tool's own advice
			// against it (no glide path, strain past the recoverable, a fracture).
			res := pl.Result.Steps
			for k := range res {
				if k > 0 && steps[k].Instrument.Size < steps[k-1].Instrument.Size {
					t.Errorf("step %d (%s) has a smaller tip than step %d (%s)", k+1, stepText(steps[k]), k, stepText(steps[k-1]))
				}
				if b := analysis.Blocking(&res[k].Metrics); len(b) > 0 {
					t.Errorf("step %d (%s) draws %s: %s", k+1, stepText(steps[k]), b[0].Code, b[0].Text)
				}
				// A change to a smaller taper is explained.
				if k > 0 && steps[k].Instrument.Taper < steps[k-1].Instrument.Taper &&
					!strings.Contains(strings.Join(pl.Explanation, "\n"), fmt.Sprintf("(step %d, %s)", k+1, res[k].Metrics.Label)) {
					t.Errorf("the taper goes down at step %d with no reason given", k+1)
				}
			}
			// Constraints: each file once, consecutive tapers differ, nothing above the target
			// file alone (engaged length, torque) or above its fatigue use.
			single := runSteps(t, c, fmt.Sprintf(`{"size":%d,"taper":%g,"depth":"WL"}`, tg.Size, tg.Taper))
			se, st, sf := stress(single)
			seen := map[string]bool{}
			for k, s := range pl.Result.Steps {
				m := s.Metrics
				key := s.Step.Instrument.Identity()
				if seen[key] {
					t.Errorf("step %d uses %s a second time", k+1, m.Label)
				}
				seen[key] = true
				if k > 0 && s.Step.Instrument.Taper == pl.Result.Steps[k-1].Step.Instrument.Taper {
					t.Errorf("steps %d and %d share the taper %g", k, k+1, s.Step.Instrument.Taper)
				}
				if m.EngagedLengthMM > se || m.PeakTorqueIndex > st || m.FatigueDamage > sf {
					t.Errorf("step %d (%s) exceeds the single file: engaged %.2f/%.2f, torque %.3f/%.3f, fatigue %.4f/%.4f",
						k+1, m.Label, m.EngagedLengthMM, se, m.PeakTorqueIndex, st, m.FatigueDamage, sf)
				}
			}
			pe, pt, pf := stress(pl.Result)
			series := runSteps(t, c, fmt.Sprintf(`{"size":%d,"taper":%g,"depth":"WL"},{"size":%d,"taper":%g,"depth":"WL"},`+
				`{"size":%d,"taper":%g,"depth":"WL"}`, tg.Size-10, tg.Taper, tg.Size-5, tg.Taper, tg.Size, tg.Taper))
			for _, cmp := range []struct {
				name string
				res  *analysis.Result
			}{{tg.Label() + " alone to WL", single}, {"a series of " + models.TaperLabel(tg.Taper) + " files to WL", series}} {
				e, tq, f := stress(cmp.res)
				t.Logf("plan: engaged %.2f mm, torque %.3f N*cm, fatigue %.4f; %s: %.2f mm, %.3f N*cm, %.4f",
					pe, pt, pf, cmp.name, e, tq, f)
				if !(pe < e) || !(pt < tq) || pf > f {
					t.Errorf("the plan does not beat %s", cmp.name)
				}
			}
		})
	}
}

// TestPlanRefusesWhatItWouldWarnAgainst: a proposal passes the tool's own advice or is refused
// with the reason. On the 60 degree, 3 mm radius curve a 30/.04 taken to working length is bent
// to about 8 % where the curve begins, past the superelastic alloy's 7 % (beam theory, d k / 2):
// no plan ends with it. A 30/.02 is not, but its 0.30 mm tip is wider than the canal at working
// length (0.25 mm): the plan opens a glide path with a smaller file taken there first (common
// practice), and nothing in it draws a blocking advice when the plan is analysed. With a shelf
// of files no narrower than 0.30 mm no glide path can be opened: refused.
func TestPlanRefusesWhatItWouldWarnAgainst(t *testing.T) {
	_, curve := testCanals(t)
	ctx := context.Background()
	_, err := Propose(ctx, curve, Options{Target: Target{Size: 30, Taper: 0.04}})
	var inf *InfeasibleError
	if !errors.As(err, &inf) || inf.Constraint != ConstraintStrain || !strings.Contains(inf.Msg, "cannot follow this path") {
		t.Errorf("30/.04 in the 3 mm curve: got %v", err)
	} else {
		t.Log(inf)
	}
	pl, err := Propose(ctx, curve, Options{Target: Target{Size: 30, Taper: 0.02}})
	if err != nil {
		t.Fatal(err)
	}
	first := pl.Result.Steps[0]
	t.Logf("plan: %s", strings.Join(pl.Explanation, " | "))
	if !(first.Step.Instrument.TipDiameter() <= analysis.GlidePathOf(curve).Width) || first.Step.Depth != models.DepthWL(0) {
		t.Errorf("the plan opens with %s, not a glide path to working length", stepText(first.Step))
	}
	for _, s := range pl.Result.Steps {
		if b := analysis.Blocking(&s.Metrics); len(b) > 0 {
			t.Errorf("step %d draws %s", s.Number, b[0].Code)
		}
	}
	var wide []models.Instrument
	for _, tp := range []float64{0.02, 0.03, 0.04} {
		wide = append(wide, models.NewInstrument(30, tp))
	}
	_, err = Propose(ctx, curve, Options{Target: Target{Size: 30, Taper: 0.02}, Instruments: wide})
	if !errors.As(err, &inf) || inf.Constraint != ConstraintGlidePath {
		t.Errorf("no narrow file on the shelf: got %v", err)
	} else {
		t.Log(inf)
	}
}

// TestPlanIsDeterministic: the same input gives the same sequence, byte for byte, whether the
// candidates are measured on one core or on all (common practice: a planning tool must be
// reproducible).
func TestPlanIsDeterministic(t *testing.T) {
	demo, _ := testCanals(t)
	opt := Options{Target: Target{Size: 25, Taper: 0.06}, Instruments: sixtyInstruments(), MaxSteps: 5}
	a, err := Propose(context.Background(), demo, opt)
	if err != nil {
		t.Fatal(err)
	}
	opt.Workers = 1 // one goroutine against every core
	b, err := Propose(context.Background(), demo, opt)
	if err != nil {
		t.Fatal(err)
	}
	ja, _ := a.Sequence.MarshalJSON()
	jb, _ := b.Sequence.MarshalJSON()
	if string(ja) != string(jb) {
		t.Errorf("two runs differ:\n%s\n%s", ja, jb)
	}
	if strings.Join(a.Explanation, "\n") != strings.Join(b.Explanation, "\n") {
		t.Errorf("explanations differ")
	}
	// The written plan reads back as the same sequence and runs to the same figures.
	back, err := models.ParseSequence("plan.json", ja)
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Run(context.Background(), demo, back, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for k := range res.Steps {
		if got, want := res.Steps[k].Metrics.PeakTorqueIndex, a.Result.Steps[k].Metrics.PeakTorqueIndex; got != want {
			t.Errorf("step %d read back: torque %g, planned %g", k+1, got, want)
		}
	}
}

// TestInfeasibleNamesTheBindingConstraint: when no plan keeps the constraints, the error says
// which one binds and what the best plan found needs.
func TestInfeasibleNamesTheBindingConstraint(t *testing.T) {
	demo, _ := testCanals(t)
	ctx := context.Background()
	target := Target{Size: 30, Taper: 0.04}

	// An engaged length cap of 2 mm within 3 files: the demo canal's straight part alone
	// (10 mm, wider than any 30/.04 there only near the orifice) makes every file engage more.
	_, err := Propose(ctx, demo, Options{Target: target, MaxSteps: 3, MaxEngagedMM: 2})
	var inf *InfeasibleError
	if !errors.As(err, &inf) {
		t.Fatalf("want an InfeasibleError, got %v", err)
	}
	t.Log(inf)
	if inf.Constraint != ConstraintEngaged || inf.Limit != 2 || !(inf.Needed > 2) || inf.Step < 1 || inf.Step > 3 ||
		!strings.Contains(inf.Msg, "no plan within 3 steps keeps every file's engaged length under 2 mm") {
		t.Errorf("engaged cap: got %+v", inf)
	}

	// A fatigue cap below what the target file itself uses at working length cannot be met.
	single := runSteps(t, demo, `{"size":30,"taper":0.04,"depth":"WL"}`)
	f := single.Steps[0].Metrics.FatigueDamage
	_, err = Propose(ctx, demo, Options{Target: target, MaxFatigue: f / 2})
	if !errors.As(err, &inf) || inf.Constraint != ConstraintFatigue || inf.Needed != f {
		t.Errorf("fatigue cap: got %v", err)
	} else {
		t.Log(inf)
	}

	// A shelf of .04 files only: the cap can be met only by two files of one taper in a row,
	// so the taper rule binds (common practice: change taper when changing files).
	var shelf []models.Instrument
	for _, s := range []int{15, 20, 25, 30, 35, 40} {
		shelf = append(shelf, models.NewInstrument(s, 0.04))
	}
	_, err = Propose(ctx, demo, Options{Target: target, Instruments: shelf, MaxEngagedMM: 17})
	if !errors.As(err, &inf) || inf.Constraint != ConstraintTaper || !strings.Contains(inf.Msg, "same taper") {
		t.Errorf("taper rule: got %v", err)
	} else {
		t.Log(inf)
	}
	// Lifting the rule gives a plan that keeps the cap.
	pl, err := Propose(ctx, demo, Options{Target: target, Instruments: shelf, MaxEngagedMM: 17, AllowSameTaper: true})
	if err != nil {
		t.Fatal(err)
	}
	if e, _, _ := stress(pl.Result); e > 17 {
		t.Errorf("with the rule lifted the plan engages %.2f mm, over the 17 mm cap", e)
	}
}

// TestProposeHonoursCancel: a cancelled context stops the search with the context's error.
func TestProposeHonoursCancel(t *testing.T) {
	demo, _ := testCanals(t)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Propose(ctx, demo, Options{Target: Target{Size: 30, Taper: 0.04}}); !errors.Is(err, context.Canceled) {
		t.Errorf("got %v, want context.Canceled", err)
	}
}

// TestProposeRejectsBadOptions: a target not on the shelf and out-of-range settings are
// errors that say what is wrong.
func TestProposeRejectsBadOptions(t *testing.T) {
	demo, _ := testCanals(t)
	ctx := context.Background()
	cases := []struct {
		opt  Options
		want string
	}{
		{Options{}, "target size and taper is required"},
		{Options{Target: Target{30, 0.04}, Instruments: []models.Instrument{models.NewInstrument(25, 0.06)}}, "not among the 1 instruments"},
		{Options{Target: Target{30, 0.04}, MaxSteps: 40}, "from 1 to 12"},
		{Options{Target: Target{30, 0.04}, Weights: Weights{1, -1, 1}}, "not negative"},
		{Options{Target: Target{30, 0.04}, MaxEngagedMM: -1}, "must not be negative"},
	}
	for _, c := range cases {
		_, err := Propose(ctx, demo, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: got %v, want an error containing %q", c.opt, err, c.want)
		}
	}
}
