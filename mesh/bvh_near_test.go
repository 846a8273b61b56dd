package mesh

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// TestNearTreeMatchesBVH: the near tree finds what the BVH finds, the same distance bit for
// bit, and what testing every triangle finds (Ericson's closest point on a triangle per
// triangle), with slabs and without, from points inside and outside tubes, a bent tube, a
// sphere and a soup of random triangles, under limits above and below the answer.
func TestNearTreeMatchesBVH(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 9))
	soup := &Mesh{}
	for i := 0; i < 300; i++ {
		a, b, c := randVec(rng, -2, 2), randVec(rng, -2, 2), randVec(rng, -2, 2)
		n := int32(len(soup.Vertices))
		soup.Vertices = append(soup.Vertices, a, b, c)
		soup.Triangles = append(soup.Triangles, [3]int32{n, n + 1, n + 2})
	}
	for _, tc := range []struct {
		name string
		m    *Mesh
	}{
		{"cylinder", shapeCylinder(1.5, 8, 64, 60)},
		{"bent tube", shapeTorusSection(9, 1.2, 0.8, 48, 80)},
		{"sphere", shapeUVSphere(2, 64, 32)},
		{"soup", soup},
	} {
		for _, slabs := range []bool{false, true} {
			b := NewBVH(tc.m)
			if slabs {
				b.AddSlabs()
			}
			nt := b.NewNearTree()
			lo, hi := tc.m.Vertices[0], tc.m.Vertices[0]
			for _, v := range tc.m.Vertices {
				growBox(&lo, &hi, v, v)
			}
			for n := 0; n < 150; n++ {
				var p mgl64.Vec3
				for k := 0; k < 3; k++ {
					p[k] = lo[k] - 0.5 + (hi[k]-lo[k]+1)*rng.Float64()
				}
				want := bruteClosest(tc.m, p)
				for _, limit := range []float64{math.Inf(1), want * 1.01, want * 0.99} {
					q1, tri1, d1, ok1 := b.ClosestWithin(p, limit)
					q2, tri2, d2, ok2 := nt.ClosestWithin(p, limit)
					if ok1 != ok2 || d1 != d2 && !(math.IsInf(d1, 1) && math.IsInf(d2, 1)) {
						t.Fatalf("%s (slabs %v) point %v limit %g: near tree %g (%v), BVH %g (%v)", tc.name, slabs, p, limit, d2, ok2, d1, ok1)
					}
					if ok2 && (math.Abs(d2-want) > 1e-12 || math.Abs(q2.Sub(p).Len()-d2) > 1e-12) {
						t.Fatalf("%s (slabs %v): %g, every triangle tested %g", tc.name, slabs, d2, want)
					}
					if ok2 && tri1 != tri2 && q1 != q2 {
						// Another triangle exactly as near: its point must be as far.
						if q2.Sub(p).Len() != q1.Sub(p).Len() && math.Abs(q2.Sub(p).Len()-q1.Sub(p).Len()) > 1e-15 {
							t.Fatalf("%s: triangles %d and %d differ", tc.name, tri1, tri2)
						}
					}
				}
			}
		}
	}
}

// BenchmarkClosestInsideTube: closest-point queries from inside a 200k-triangle tube, each
// seeded by the one before around a ring (as the wall to a root makes them), by the BVH and
// the near tree.
func BenchmarkClosestInsideTube(b *testing.B) {
	m := shapeCylinder(2, 20, 256, 400)
	bvh := NewBVH(m)
	bvh.AddSlabs()
	nt := bvh.NewNearTree()
	// 32 rings of 128 points, 0.4 off the axis (a canal's wall in a root).
	pts := make([]mgl64.Vec3, 4096)
	for i := range pts {
		th := 2 * math.Pi * float64(i%128) / 128
		pts[i] = mgl64.Vec3{0.4 * math.Cos(th), 0.4 * math.Sin(th), 2 + 0.5*float64(i/128)}
	}
	for _, tc := range []struct {
		name string
		q    func(p mgl64.Vec3, limit float64) (mgl64.Vec3, int32, float64, bool)
	}{{"bvh", bvh.ClosestWithin}, {"near-tree", nt.ClosestWithin}} {
		b.Run(tc.name, func(b *testing.B) {
			for n := 0; n < b.N; n++ {
				prev := pts[0].Add(mgl64.Vec3{2, 0, 0})
				for _, p := range pts {
					q, _, _, ok := tc.q(p, p.Sub(prev).Len()*(1+1e-9)+1e-12)
					if ok {
						prev = q
					}
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*len(pts)), "ns/query")
		})
	}
}
