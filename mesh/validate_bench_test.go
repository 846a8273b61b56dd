package mesh

import (
	"math/rand/v2"

	"github.com/go-gl/mathgl/mgl64"
	"sync"
	"testing"
)

// validateBenchMeshes are the 1M-triangle tube of BenchmarkLoadVsAdmesh as a binary STL
// reader leaves it: in build order, and with its triangles shuffled and the vertices numbered
// again by first appearance (what loading a file whose triangles are scattered gives).
var validateBenchMeshes = sync.OnceValues(func() (ordered, scattered *Mesh) {
	ordered = shapeCanalLike(512, 1000)
	tris := append([][3]int32(nil), ordered.Triangles...)
	rng := rand.New(rand.NewPCG(7, 7))
	rng.Shuffle(len(tris), func(i, j int) { tris[i], tris[j] = tris[j], tris[i] })
	scattered = renumberByFirstUse(ordered.Vertices, tris)
	return ordered, scattered
})

// renumberByFirstUse numbers the vertices in the order the triangles first use them.
func renumberByFirstUse(verts []mgl64.Vec3, tris [][3]int32) *Mesh {
	to := make([]int32, len(verts))
	for i := range to {
		to[i] = -1
	}
	m := &Mesh{Triangles: make([][3]int32, len(tris))}
	for t, tri := range tris {
		for k, v := range tri {
			if to[v] < 0 {
				to[v] = int32(len(m.Vertices))
				m.Vertices = append(m.Vertices, verts[v])
			}
			m.Triangles[t][k] = to[v]
		}
	}
	return m
}

func benchBothOrders(b *testing.B, f func(*Mesh)) {
	ordered, scattered := validateBenchMeshes()
	for _, c := range []struct {
		name string
		m    *Mesh
	}{{"ordered", ordered}, {"scattered", scattered}} {
		b.Run(c.name, func(b *testing.B) {
			cpu0 := cpuTime(cpuSelf)
			for b.Loop() {
				f(c.m)
			}
			b.ReportMetric(float64(cpuTime(cpuSelf)-cpu0)/1e6/float64(b.N), "cpu-ms/op")
		})
	}
}

// The parts of Validate on both meshes (cpu-ms/op is the CPU time of all the goroutines;
// compare it on a shared machine):
//
//	go test ./mesh -run XXX -bench 'EdgeCounts|CountShells|ValidateOrders' -benchtime 30x
func BenchmarkEdgeCounts(b *testing.B) {
	benchBothOrders(b, func(m *Mesh) { edgeCounts(m, 0) })
}

func BenchmarkCountShells(b *testing.B) {
	benchBothOrders(b, func(m *Mesh) { countShells(m, false) })
}

func BenchmarkValidateOrders(b *testing.B) {
	benchBothOrders(b, func(m *Mesh) { Validate(m) })
}

// BenchmarkCanalChecks is what measuring a canal asks of a 4M-triangle mesh's triangles: its
// area and volume, and the check of the surface.
//
//	go test ./mesh -run XXX -bench CanalChecks -benchtime 5x
func BenchmarkCanalChecks(b *testing.B) {
	m := shapeCanalLike(512, 4000)
	cpu0 := cpuTime(cpuSelf)
	for b.Loop() {
		s := SumTriangles(m)
		ValidateWithSums(m, s)
	}
	b.ReportMetric(float64(cpuTime(cpuSelf)-cpu0)/1e6/float64(b.N), "cpu-ms/op")
}

// The edge count by ranges of vertices on both meshes, on every core and on one (the order of
// the triangles should not matter to it):
//
//	go test ./mesh -run XXX -bench 'EdgeRanges' -benchtime 20x
func BenchmarkEdgeRanges(b *testing.B) {
	benchBothOrders(b, func(m *Mesh) { edgeCountsInRanges(m, 0) })
}

func BenchmarkEdgeRanges1(b *testing.B) {
	benchBothOrders(b, func(m *Mesh) { edgeCountsInRanges(m, 1) })
}
