package analysis

import (
	"context"
	"math"
	"sync"
	"syscall"
	"testing"

	"tapersweep/mesh"
	"tapersweep/models"
)

// benchDemo is the demo canal's shape at the widths the speed targets were set on (1.0 to
// 0.25 mm, the demo before issue 17 narrowed it), without a root.
func benchDemo() *models.CanalSpec {
	c := models.DemoCanal()
	c.OrificeD, c.ApicalD, c.Root = 1.0, 0.25, nil
	return c
}

var (
	benchOnce  sync.Once
	benchMesh  *mesh.Mesh
	benchCanal *Canal
)

// benchScan is the demo canal as a fine segmented scan: voxel 0.022 mm, vertex noise 0.005 mm,
// about 200k triangles (the size the speed targets are stated for).
func benchScan(b testing.TB) (*mesh.Mesh, *Canal) {
	benchOnce.Do(func() {
		m, err := models.ScanLike(benchDemo(), 0.022, 0.005, 1)
		if err != nil {
			b.Fatal(err)
		}
		benchMesh = m
		benchCanal, err = NewCanal(context.Background(), "bench", m, CanalOptions{WorkingLength: benchDemo().WorkingLength()})
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
		cc.buildRadiusMap(0)
	}
}

// BenchmarkSequenceRun runs an 8-step sequence at ds 0.05 mm and 128 angles on the measured
// canal. Target: <= 16 ms centred and elastic, so the window's tip slider stays live at 60 Hz.
func BenchmarkSequenceRun(b *testing.B) {
	_, c := benchScan(b)
	benchSequenceRun(b, c)
}

// benchSequence is the 8-step sequence the run benchmarks take through a canal.
const benchSequence = `{"steps": [
		{"size": 10, "taper": 0.02, "depth": "WL"}, {"size": 15, "taper": 0.02, "depth": "WL"},
		{"size": 20, "taper": 0.04, "depth": "WL-3"}, {"size": 25, "taper": 0.06, "depth": "WL-2"},
		{"size": 25, "taper": 0.04, "depth": "WL"}, {"size": 30, "taper": 0.06, "depth": "WL-1"},
		{"size": 30, "taper": 0.04, "depth": "WL"}, {"size": 35, "taper": 0.06, "depth": "WL-0.5"}]}`

// BenchmarkSequenceRunSpec runs the same sequence through the demo canal measured from its
// parametric spec: the run's cost depends on the canal's stations and directions, not on its
// triangles, and this canal is quick to set up (for counting instructions under valgrind,
// where the 200k-triangle scan takes most of the time).
func BenchmarkSequenceRunSpec(b *testing.B) {
	c, err := CanalFromSpec(context.Background(), "demo", benchDemo(), CanalOptions{})
	if err != nil {
		b.Fatal(err)
	}
	benchSequenceRun(b, c)
}

// benchSequenceRun times Run of the bench sequence on c, centred and elastic, in wall-clock time
// and in the process's CPU time (the steadier figure on a shared machine).
func benchSequenceRun(b *testing.B, c *Canal) {
	seq, err := models.ParseSequence("bench.json", []byte(benchSequence))
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

// benchMeshes are canals of the sizes the speed targets name: a typical scan-derived canal
// (the demo canal segmented at 0.06 mm, about 30k triangles), a fine scan (0.02 mm, about 240k)
// and a 4M-triangle surface (the demo canal's own mesh, 4000 rings of 512).
var benchMeshes = struct {
	sync.Once
	typical, fine, huge *mesh.Mesh
}{}

func benchMeshSet(b *testing.B) (typical, fine, huge *mesh.Mesh) {
	benchMeshes.Do(func() {
		c := benchDemo()
		var err error
		if benchMeshes.typical, err = models.ScanLike(c, 0.06, 0.01, 1); err != nil {
			b.Fatal(err)
		}
		if benchMeshes.fine, err = models.ScanLike(c, 0.02, 0.005, 1); err != nil {
			b.Fatal(err)
		}
		benchMeshes.huge = c.Mesh(c.Length()/4000, 512)
	})
	return benchMeshes.typical, benchMeshes.fine, benchMeshes.huge
}

// BenchmarkMeasureCanal measures a canal from its mesh (BVH, centerline, measures, radius
// map, each vertex's place). Targets (issue: speed for scans as they come): typical <= 0.1 s,
// fine <= 0.25 s, 4M triangles <= 2 s.
func BenchmarkMeasureCanal(b *testing.B) {
	typical, fine, huge := benchMeshSet(b)
	for _, tc := range []struct {
		name string
		m    *mesh.Mesh
	}{{"typical", typical}, {"fine", fine}, {"4M", huge}} {
		b.Run(tc.name, func(b *testing.B) {
			b.ReportMetric(float64(len(tc.m.Triangles)), "triangles")
			cpu0 := cpuSeconds()
			for b.Loop() {
				if _, err := NewCanal(context.Background(), "bench", tc.m, CanalOptions{}); err != nil {
					b.Fatal(err)
				}
			}
			// CPU time over all cores: steadier than the wall clock on a shared machine.
			b.ReportMetric((cpuSeconds()-cpu0)/float64(b.N), "cpu-s/op")
		})
	}
}

// cpuSeconds is the CPU time this process has used, user and system.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return float64(ru.Utime.Sec+ru.Stime.Sec) + float64(ru.Utime.Usec+ru.Stime.Usec)/1e6
}

var (
	benchRootOnce  sync.Once
	benchRootCanal *Canal
)

// benchRootScan is the bench canal (the demo canal as a fine scan, about 200k triangles)
// inside a root of about 200k triangles (an oval root with a groove, as the spec makes it).
func benchRootScan(b testing.TB) *Canal {
	_, c := benchScan(b)
	benchRootOnce.Do(func() {
		spec := benchDemo()
		spec.Root = &models.RootSpec{CoronalD: 4.4, ApicalD: 1.8, Oval: 1.6,
			Concavity: &models.Concavity{DepthMM: 0.5, TowardDeg: 0, WidthDeg: 90}}
		if err := spec.Validate(); err != nil {
			b.Fatal(err)
		}
		root := spec.RootMesh(0.05, 256)
		cc := *c
		if err := cc.attachRoot(root, "bench", 0); err != nil {
			b.Fatal(err)
		}
		benchRootCanal = &cc
	})
	if n := len(benchRootCanal.Root.Mesh.Triangles); n < 190_000 {
		b.Fatalf("benchmark root has only %d triangles", n)
	}
	return benchRootCanal
}

// BenchmarkWallThickness is what the root adds to an 8-step run (the bench sequence) on a
// 200k-triangle canal inside a 200k-triangle root. "steps": every step's wall figures, each cell
// bounded from the map the step met and measured exactly where the bounds leave a figure open
// (target of issue 17: at most 50 ms); "maps": the maps of all 8 steps to within
// wallMapTolerance, for pictures, measured on request; "as-scanned": the map of the canal as
// scanned, measured once when the root is attached.
func BenchmarkWallThickness(b *testing.B) {
	c := benchRootScan(b)
	seq, err := models.ParseSequence("bench.json", []byte(benchSequence))
	if err != nil {
		b.Fatal(err)
	}
	res, err := Run(context.Background(), c, seq, RunOptions{})
	if err != nil {
		b.Fatal(err)
	}
	b.ReportMetric(float64(len(c.Root.Mesh.Triangles)), "root-triangles")
	b.ReportMetric(float64(len(c.Mesh.Triangles)), "canal-triangles")
	b.Run("steps", func(b *testing.B) {
		start := cpuTime()
		for i := 0; i < b.N; i++ {
			res.measureWall()
		}
		b.ReportMetric(float64(cpuTime()-start)/1e6/float64(b.N), "cpu-ms/op")
	})
	b.Run("maps", func(b *testing.B) {
		start := cpuTime()
		for i := 0; i < b.N; i++ {
			r := &Result{Canal: res.Canal, Steps: res.Steps, Options: res.Options}
			r.WallMap(1)
		}
		b.ReportMetric(float64(cpuTime()-start)/1e6/float64(b.N), "cpu-ms/op")
	})
	b.Run("as-scanned", func(b *testing.B) {
		start := cpuTime()
		for i := 0; i < b.N; i++ {
			c.wallThickness(c.Rho, nil, math.NaN(), wallScanned, 0)
		}
		b.ReportMetric(float64(cpuTime()-start)/1e6/float64(b.N), "cpu-ms/op")
	})
	b.Run("exact", func(b *testing.B) {
		start := cpuTime()
		for i := 0; i < b.N; i++ {
			c.WallThickness(c.Rho, 0)
		}
		b.ReportMetric(float64(cpuTime()-start)/1e6/float64(b.N), "cpu-ms/op")
	})
}

// BenchmarkPlaceVertices gives every wall vertex its (s, theta) (the last stage of measuring a
// canal): the typical scan (~14k vertices), the fine scan (~240k triangles, ~125k vertices)
// and the 4M-triangle mesh (~2M vertices), on all cores.
func BenchmarkPlaceVertices(b *testing.B) {
	typical, fine, huge := benchMeshSet(b)
	for _, tc := range []struct {
		name string
		m    *mesh.Mesh
	}{{"typical", typical}, {"fine", fine}, {"4M", huge}} {
		b.Run(tc.name, func(b *testing.B) {
			c, err := NewCanal(context.Background(), "bench", tc.m, CanalOptions{})
			if err != nil {
				b.Fatal(err)
			}
			cc := *c
			cpu0 := cpuSeconds()
			for b.Loop() {
				cc.placeVertices(0)
			}
			b.ReportMetric((cpuSeconds()-cpu0)/float64(b.N)*1e3, "cpu-ms/op")
			b.ReportMetric(float64(len(tc.m.Vertices)), "vertices")
			b.ReportMetric(float64(cc.Line.Len()), "stations")
		})
	}
}
