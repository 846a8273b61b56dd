package mesh

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// TestSlabsKeepClosestExact: with the slabs added, every closest point is the one found without
// them and the one a scan over all triangles finds (the slabs only prune, never answer), on a
// tube from inside and outside and on a sphere, for points near, far and on the axis.
func TestSlabsKeepClosestExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, m := range []*Mesh{shapeCylinder(1.5, 10, 96, 60), shapeCanalLike(48, 80), shapeUVSphere(2, 40, 20)} {
		plain, slab := NewBVH(m), NewBVH(m)
		slab.AddSlabs()
		lo, hi := m.Bounds()
		for k := 0; k < 400; k++ {
			var p mgl64.Vec3
			for i := range p {
				p[i] = lo[i] + (hi[i]-lo[i])*(1.4*rng.Float64()-0.2)
			}
			if k%5 == 0 { // on the axis of the tube, where every wall point is nearly as near
				p[0], p[1] = 0, 0
			}
			_, _, d0 := plain.Closest(p)
			_, _, d1 := slab.Closest(p)
			brute := math.Inf(1)
			for tr := range m.Triangles {
				a, b, c := m.Corners(tr)
				brute = math.Min(brute, closestOnTriangle(p, a, b, c).Sub(p).Len())
			}
			if math.Abs(d1-brute) > 1e-12 || math.Abs(d0-brute) > 1e-12 {
				t.Fatalf("point %v: closest %.15g with slabs, %.15g without, %.15g over all triangles", p, d1, d0, brute)
			}
		}
	}
}
