package mesh

import (
	"bytes"
	"context"
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// benchMesh is a closed tapered curved tube of 205,312 triangles, the size of a fine canal scan.
var benchMesh = sync.OnceValue(func() *Mesh { return shapeCanalLike(256, 400) })

var benchSTL = sync.OnceValue(func() []byte {
	var buf bytes.Buffer
	if err := WriteSTL(&buf, benchMesh(), "demo bench tube"); err != nil {
		panic(err)
	}
	return buf.Bytes()
})

// Target: at least 150 MB/s of binary STL, weld and validation included.
func BenchmarkLoadSTL(b *testing.B) {
	data := benchSTL()
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		m, _, err := Load(context.Background(), "bench.stl", bytes.NewReader(data), int64(len(data)), LoadOptions{})
		if err != nil || len(m.Triangles) != len(benchMesh().Triangles) {
			b.Fatal(err)
		}
	}
}

func BenchmarkWeld(b *testing.B) {
	soup := shapeSoup(benchMesh())
	b.SetBytes(int64(len(soup) * 24))
	for b.Loop() {
		Weld(soup, 1e-6)
	}
}

func BenchmarkValidate(b *testing.B) {
	m := benchMesh()
	for b.Loop() {
		Validate(m)
	}
}

// Target: well under 100 ms for 200k triangles.
func BenchmarkBVHBuild(b *testing.B) {
	m := benchMesh()
	for b.Loop() {
		NewBVH(m)
	}
}

// Rays from points on the centre curve toward the wall, as the radius map casts them.
func BenchmarkRay(b *testing.B) {
	m := benchMesh()
	bvh := NewBVH(m)
	rng := rand.New(rand.NewPCG(1, 1))
	type ray struct{ o, d mgl64.Vec3 }
	rays := make([]ray, 4096)
	fr := arcFrame(12, 1.4)
	for i := range rays {
		f := fr(rng.Float64())
		phi := 6.283 * rng.Float64()
		rays[i] = ray{f.c, f.n.Mul(math.Cos(phi)).Add(f.b.Mul(math.Sin(phi)))}
	}
	b.ResetTimer()
	i := 0
	for b.Loop() {
		r := rays[i%len(rays)]
		if _, ok := bvh.Ray(r.o, r.d, 10); !ok {
			b.Fatal("ray from inside the tube missed the wall")
		}
		i++
	}
}

func BenchmarkClosest(b *testing.B) {
	m := benchMesh()
	bvh := NewBVH(m)
	rng := rand.New(rand.NewPCG(2, 2))
	pts := make([]mgl64.Vec3, 4096)
	fr := arcFrame(12, 1.4)
	for i := range pts {
		pts[i] = fr(rng.Float64()).c.Add(randVec(rng, -0.5, 0.5))
	}
	b.ResetTimer()
	i := 0
	for b.Loop() {
		bvh.Closest(pts[i%len(pts)])
		i++
	}
}

func BenchmarkInside(b *testing.B) {
	m := benchMesh()
	bvh := NewBVH(m)
	rng := rand.New(rand.NewPCG(3, 3))
	pts := make([]mgl64.Vec3, 4096)
	fr := arcFrame(12, 1.4)
	for i := range pts {
		pts[i] = fr(rng.Float64()).c.Add(randVec(rng, -0.5, 0.5))
	}
	b.ResetTimer()
	i := 0
	for b.Loop() {
		bvh.Inside(pts[i%len(pts)])
		i++
	}
}
