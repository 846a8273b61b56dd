package analysis

import (
	"context"
	"testing"

	"tapersweep/models"
)

func BenchmarkTmpElastic(b *testing.B) {
	c := canalFor(b, `{"kind":"straight","length":10},{"kind":"arc","radius":5,"angle":40},{"kind":"arc","radius":8,"angle":20,"plane_turn":180},{"kind":"straight","length":2}`, 1.0, 0.25)
	seq, _ := models.ParseSequence("bench.json", []byte(`{"steps": [
		{"size": 10, "taper": 0.02, "depth": "WL"}, {"size": 15, "taper": 0.02, "depth": "WL"},
		{"size": 20, "taper": 0.04, "depth": "WL-3"}, {"size": 25, "taper": 0.06, "depth": "WL-2"},
		{"size": 25, "taper": 0.04, "depth": "WL"}, {"size": 30, "taper": 0.06, "depth": "WL-1"},
		{"size": 30, "taper": 0.04, "depth": "WL"}, {"size": 35, "taper": 0.06, "depth": "WL-0.5"}]}`))
	for _, m := range []string{"centred", "elastic"} {
		b.Run(m, func(b *testing.B) {
			st := cpuTime()
			for i := 0; i < b.N; i++ {
				Run(context.Background(), c, seq, RunOptions{PathModel: m})
			}
			b.ReportMetric(float64(cpuTime()-st)/1e6/float64(b.N), "cpu-ms/op")
		})
	}
}
