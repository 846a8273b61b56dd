package plan

import (
	"context"
	"sync"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

// curve60r3JSON is an invented canal: 10 mm straight, a 60 degree arc on a 3 mm radius, 2 mm
// straight; 1.0 mm across at the orifice narrowing to 0.25 mm.
const curve60r3JSON = `{"name": "test canal: 60 deg curve on a 3 mm radius (invented)",
 "segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 3, "angle": 60},
              {"kind": "straight", "length": 2}],
 "orifice_d": 1.0, "apical_d": 0.25}`

// curve45r5JSON is an invented canal: 10 mm straight, a 45 degree arc on a 5 mm radius, 3 mm
// straight; 1.0 mm across at the orifice narrowing to 0.25 mm.
const curve45r5JSON = `{"name": "test canal: 45 deg curve on a 5 mm radius (invented)",
 "segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 45},
              {"kind": "straight", "length": 3}],
 "orifice_d": 1.0, "apical_d": 0.25}`

var (
	canalsOnce            sync.Once
	demoCanal, curveCanal *analysis.Canal
	gentleCanal           *analysis.Canal
	canalsErr             error
)

// testCanals measures the demo canal and the 60 degree curve once for all tests (and the 45
// degree one, gentleTestCanal).
// earlierDemoJSON is the demo canal before issue 17 (no root, 1.0 to 0.25 mm wide).
const earlierDemoJSON = `{"name": "demo lower molar, mesial canal (invented)",
 "segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 40},
              {"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180}, {"kind": "straight", "length": 2}],
 "orifice_d": 1.0, "apical_d": 0.25, "oval": 1.4, "working_length": 17.5}`

func testCanals(t testing.TB) (demo, curve *analysis.Canal) {
	t.Helper()
	canalsOnce.Do(func() {
		ctx := context.Background()
		// The planner's tests keep the demo canal as it was before it got its root and its
		// narrower canal (the cases below were worked out on it).
		old, err := models.ParseCanalSpec("demo.json", []byte(earlierDemoJSON))
		if err != nil {
			canalsErr = err
			return
		}
		if demoCanal, canalsErr = analysis.CanalFromSpec(ctx, "demo", old, analysis.CanalOptions{}); canalsErr != nil {
			return
		}
		spec, err := models.ParseCanalSpec("curve60r3.json", []byte(curve60r3JSON))
		if err != nil {
			canalsErr = err
			return
		}
		if curveCanal, canalsErr = analysis.CanalFromSpec(ctx, "curve60r3", spec, analysis.CanalOptions{}); canalsErr != nil {
			return
		}
		if spec, canalsErr = models.ParseCanalSpec("curve45r5.json", []byte(curve45r5JSON)); canalsErr != nil {
			return
		}
		gentleCanal, canalsErr = analysis.CanalFromSpec(ctx, "curve45r5", spec, analysis.CanalOptions{})
	})
	if canalsErr != nil {
		t.Fatal(canalsErr)
	}
	return demoCanal, curveCanal
}

// stress is a run's largest engaged length, highest peak torque and highest fatigue use.
func stress(res *analysis.Result) (engaged, torque, fatigue float64) {
	for _, s := range res.Steps {
		m := s.Metrics
		engaged, torque, fatigue = max(engaged, m.EngagedLengthMM), max(torque, m.PeakTorqueIndex), max(fatigue, m.FatigueDamage)
	}
	return
}

func runSteps(t testing.TB, c *analysis.Canal, steps string) *analysis.Result {
	t.Helper()
	seq, err := models.ParseSequence("compare.json", []byte(`{"steps": [`+steps+`]}`))
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Run(context.Background(), c, seq, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// gentleTestCanal is the 45 degree curve on a 5 mm radius.
func gentleTestCanal(t testing.TB) *analysis.Canal {
	testCanals(t)
	return gentleCanal
}
