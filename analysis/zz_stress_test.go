package analysis

import (
	"context"
	"math/rand"
	"testing"

	"tapersweep/models"
)

func TestZZStressPipeline(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	for it := 0; it < 150; it++ {
		f := func(lo, hi float64) float64 { return lo + rng.Float64()*(hi-lo) }
		js := fuzzSpec(f(0, 15), f(0.5, 30), f(0, 180), f(0, 360), f(0.5, 30), f(0, 180), f(0, 10), f(0.15, 2), f(0.15, 2), f(0, 3))
		spec, err := models.ParseCanalSpec("z.json", []byte(js))
		if err != nil {
			continue
		}
		c, err := CanalFromSpec(context.Background(), "z.json", spec, CanalOptions{})
		if err != nil {
			t.Logf("%d %s: %v", it, js, err)
			continue
		}
		seq, _ := models.ParseSequence("s", []byte(`{"path_model": "elastic", "steps": [{"size": 15, "taper": 0.02, "depth": "WL"}, {"size": 30, "taper": 0.06, "depth": "WL-1"}]}`))
		if _, err := Run(context.Background(), c, seq, RunOptions{}); err != nil {
			t.Logf("%d run: %v", it, err)
		}
	}
}
