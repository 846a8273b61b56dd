package mesh

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// RayFan must give exactly what Ray gives for each of its rays (the same T, bit for bit, and
// no hit where Ray finds none): fans from stations on a tube's axis in its own frames (rays
// that run through vertices and along edges of a regular mesh), from random points in random
// planes, through a soup of overlapping triangles, with and without a reach.
func TestRayFanMatchesRay(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	soup := &Mesh{}
	for i := 0; i < 600; i++ {
		c := randVec(rng, -5, 5)
		n := int32(len(soup.Vertices))
		soup.Vertices = append(soup.Vertices, c, c.Add(randVec(rng, -1, 1)), c.Add(randVec(rng, -1, 1)))
		soup.Triangles = append(soup.Triangles, [3]int32{n, n + 1, n + 2})
	}
	type station struct{ o, u, v mgl64.Vec3 }
	cylinder := func(r, h float64, seg int) ([]station, *Mesh) {
		var st []station
		for k := 0; k <= 20; k++ {
			st = append(st, station{mgl64.Vec3{0, 0, h * float64(k) / 20}, mgl64.Vec3{1, 0, 0}, mgl64.Vec3{0, 1, 0}})
		}
		return st, shapeCylinder(r, h, seg, 40)
	}
	arc := func(frame func(float64) shapeFrame, m *Mesh) ([]station, *Mesh) {
		var st []station
		for k := 0; k <= 40; k++ {
			f := frame(float64(k) / 40)
			st = append(st, station{f.c, f.n, f.b})
		}
		return st, m
	}
	cases := map[string]func() ([]station, *Mesh){
		"cylinder 64":    func() ([]station, *Mesh) { return cylinder(1, 10, 64) },
		"cylinder 96":    func() ([]station, *Mesh) { return cylinder(0.5, 4, 96) },
		"canal-like":     func() ([]station, *Mesh) { return arc(arcFrame(12, 1.4), shapeCanalLike(24, 60)) },
		"canal-like big": func() ([]station, *Mesh) { return arc(arcFrame(12, 1.4), shapeCanalLike(64, 160)) },
		"sphere":         func() ([]station, *Mesh) { return nil, shapeUVSphere(2, 48, 24) },
		"cylinder 700":   func() ([]station, *Mesh) { return cylinder(0.5, 4, 700) },
		"soup":           func() ([]station, *Mesh) { return nil, soup },
	}
	for name, build := range cases {
		stations, m := build()
		b := NewBVH(m)
		lo, hi := m.Bounds()
		for i := 0; i < 60; i++ {
			// Random planes through random points in and around the mesh.
			o := randVec(rng, 0, 1)
			for k := range 3 {
				o[k] = lo[k] - 0.5 + o[k]*(hi[k]-lo[k]+1)
			}
			if i%2 == 0 {
				o = m.Vertices[rng.IntN(len(m.Vertices))].Add(randVec(rng, -0.3, 0.3))
			}
			u := randVec(rng, -1, 1).Normalize()
			v := u.Cross(randVec(rng, -1, 1)).Normalize()
			stations = append(stations, station{o, u, v})
		}
		hits, rays := 0, 0
		fc := &FanCaster{BVH: b}
		rayByRay := 0
		for i, st := range stations {
			for _, n := range []int{128, 96, 7} {
				cs, sn := make([]float64, n), make([]float64, n)
				for j := range n {
					a := 2 * math.Pi * float64(j) / float64(n)
					cs[j], sn[j] = math.Cos(a), math.Sin(a)
				}
				tMax := math.Inf(1)
				if i%3 == 1 {
					tMax = 0.3 + rng.Float64()
				}
				got := make([]float64, n)
				b.RayFan(st.o, st.u, st.v, cs, sn, tMax, got)
				// The caster, fan or ray by ray as it judges, gives the same.
				if fc.skip > 0 {
					rayByRay++
				}
				cast := make([]float64, n)
				fc.Cast(st.o, st.u, st.v, cs, sn, tMax, cast)
				for j := range n {
					if math.Float64bits(cast[j]) != math.Float64bits(got[j]) {
						t.Fatalf("%s station %d, %d rays, ray %d: caster %v, fan %v", name, i, n, j, cast[j], got[j])
					}
				}
				for j := range n {
					want := -1.0
					if h, ok := b.Ray(st.o, st.u.Mul(cs[j]).Add(st.v.Mul(sn[j])), tMax); ok {
						want = h.T
						hits++
					}
					rays++
					if math.Float64bits(got[j]) != math.Float64bits(want) {
						t.Fatalf("%s station %d, %d rays, ray %d: fan %v, Ray %v", name, i, n, j, got[j], want)
					}
				}
			}
		}
		if name == "cylinder 700" && rayByRay == 0 {
			t.Errorf("%s: the caster never went ray by ray on a surface of 1400 facets around", name)
		}
		if hits < rays/5 {
			t.Errorf("%s: only %d of %d rays hit, the check is too weak", name, hits, rays)
		}
	}
}
