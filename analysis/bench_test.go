package analysis

import (
	"context"
	"sync"
	"syscall"
	"testing"
	"time"

	"tapersweep/mesh"
	"tapersweep/models"
)

var (
	benchOnce  sync.Once
	benchMesh  *mesh.Mesh
	benchCanal *Canal
)

// benchScan is the demo canal as a fine segmented scan: voxel 0.022 mm, vertex noise 0.005 mm,
// about 200k triangles (the size the speed targets are stated for).
func benchScan(b *testing.B) (*mesh.Mesh, *Canal) {
	benchOnce.Do(func() {
		m, err := models.ScanLike(models.DemoCanal(), 0.022, 0.005, 1)
		if err != nil {
			b.Fatal(err)
		}
		benchMesh = m
		benchCanal, err = NewCanal(context.Background(), "bench", m, CanalOptions{WorkingLength: models.DemoCanal().WorkingLength()})
		if err != nil {
			b.Fatal(err)
		}
	})
	if len(benchMesh.Triangles) < 190_000 {
		b.Fatalf("benchmark mesh has only %d triangles", len(benchMesh.Triangles))
	}
	return benchMesh, benchCanal
}

// BenchmarkCenterlineAndRadiusMap measures a canal from its mesh: BVH, centerline, radius map
// and each vertex's place. Target: <= 1.5 s on 2 cores for 200k triangles.
func BenchmarkCenterlineAndRadiusMap(b *testing.B) {
	m, _ := benchScan(b)
	b.ReportMetric(float64(len(m.Triangles)), "triangles")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := NewCanal(context.Background(), "bench", m, CanalOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRadiusMap is the ray-cast part alone.
func BenchmarkRadiusMap(b *testing.B) {
	_, c := benchScan(b)
	cc := *c
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		cc.buildRadiusMap()
	}
}

// BenchmarkSequenceRun runs an 8-step sequence at ds 0.05 mm and 128 angles on the measured
// canal. Targets: <= 50 ms centred; the elastic path adds <= 20 ms.
func BenchmarkSequenceRun(b *testing.B) {
	_, c := benchScan(b)
	seq, err := models.ParseSequence("bench.json", []byte(`{"steps": [
		{"size": 10, "taper": 0.02, "depth": "WL"}, {"size": 15, "taper": 0.02, "depth": "WL"},
		{"size": 20, "taper": 0.04, "depth": "WL-3"}, {"size": 25, "taper": 0.06, "depth": "WL-2"},
		{"size": 25, "taper": 0.04, "depth": "WL"}, {"size": 30, "taper": 0.06, "depth": "WL-1"},
		{"size": 30, "taper": 0.04, "depth": "WL"}, {"size": 35, "taper": 0.06, "depth": "WL-0.5"}]}`))
	if err != nil {
		b.Fatal(err)
	}
	for _, model := range []string{"centred", "elastic"} {
		b.Run(model, func(b *testing.B) {
			start := cpuTime()
			for i := 0; i < b.N; i++ {
				if _, err := Run(context.Background(), c, seq, RunOptions{PathModel: model}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(cpuTime()-start)/1e6/float64(b.N), "cpu-ms/op")
		})
	}
}

// cpuTime is the process's user and system CPU time. On a shared machine it measures the work a
// benchmark does, where wall-clock time also counts the waits for a core.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
