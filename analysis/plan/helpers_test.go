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

var (
	canalsOnce            sync.Once
	demoCanal, curveCanal *analysis.Canal
	canalsErr             error
)

// testCanals measures the demo canal and the 60 degree curve once for all tests.
func testCanals(t testing.TB) (demo, curve *analysis.Canal) {
	t.Helper()
	canalsOnce.Do(func() {
		ctx := context.Background()
		if demoCanal, canalsErr = analysis.CanalFromSpec(ctx, "demo", models.DemoCanal(), analysis.CanalOptions{}); canalsErr != nil {
			return
		}
		spec, err := models.ParseCanalSpec("curve60r3.json", []byte(curve60r3JSON))
		if err != nil {
			canalsErr = err
			return
		}
		curveCanal, canalsErr = analysis.CanalFromSpec(ctx, "curve60r3", spec, analysis.CanalOptions{})
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
