package mesh

import (
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// bruteRay tests every triangle with the same Moller-Trumbore formula (Moller & Trumbore,
// "Fast, minimum storage ray-triangle intersection", 1997).
func bruteRay(m *Mesh, o, d mgl64.Vec3, tMax float64) (float64, bool) {
	best, ok := tMax, false
	for f := range m.Triangles {
		a, b, c := m.Corners(f)
		tr := bvhTri{a: a, e1: b.Sub(a), e2: c.Sub(a)}
		if t, _, _, _, hit := rayTri(&tr, o, d); hit && t > 0 && t < best {
			best, ok = t, true
		}
	}
	return best, ok
}

func bruteClosest(m *Mesh, p mgl64.Vec3) float64 {
	best := math.Inf(1)
	for f := range m.Triangles {
		a, b, c := m.Corners(f)
		best = math.Min(best, closestOnTriangle(p, a, b, c).Sub(p).Len())
	}
	return best
}

func randVec(rng *rand.Rand, lo, hi float64) mgl64.Vec3 {
	return mgl64.Vec3{lo + (hi-lo)*rng.Float64(), lo + (hi-lo)*rng.Float64(), lo + (hi-lo)*rng.Float64()}
}

// A random soup of overlapping triangles plus a canal-like tube: the BVH must find exactly
// what testing every triangle finds.
func TestBVHRayMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	soup := &Mesh{}
	for i := 0; i < 600; i++ {
		c := randVec(rng, -5, 5)
		n := int32(len(soup.Vertices))
		soup.Vertices = append(soup.Vertices, c, c.Add(randVec(rng, -1, 1)), c.Add(randVec(rng, -1, 1)))
		soup.Triangles = append(soup.Triangles, [3]int32{n, n + 1, n + 2})
	}
	// "big" is above bvhForkAbove, so it is built as tasks and joined.
	meshes := map[string]*Mesh{"soup": soup, "tube": shapeCanalLike(24, 60), "big": shapeCanalLike(128, 160)}
	if len(meshes["big"].Triangles) <= bvhForkAbove {
		t.Fatal("the big mesh must be built as tasks")
	}
	for name, m := range meshes {
		b := NewBVH(m)
		lo, hi := m.Bounds()
		hits := 0
		rays := 1000
		if name == "big" {
			rays = 150
		}
		for i := 0; i < rays; i++ {
			// Start near a random vertex so a good share of rays meet the thin tube.
			o := m.Vertices[rng.IntN(len(m.Vertices))].Add(randVec(rng, -0.7, 0.7))
			if i%2 == 0 {
				o = randVec(rng, lo[0]-1, hi[0]+1)
			}
			d := randVec(rng, -1, 1).Mul(0.1 + 3*rng.Float64()) // not unit: T is in units of dir
			tMax := math.Inf(1)
			if i%3 == 0 {
				tMax = 2 * rng.Float64()
			}
			want, wok := bruteRay(m, o, d, tMax)
			h, ok := b.Ray(o, d, tMax)
			if ok != wok || (ok && math.Abs(h.T-want) > 1e-9*(1+want)) {
				t.Fatalf("%s ray %d: bvh (%v %v) brute (%v %v)", name, i, h.T, ok, want, wok)
			}
			if ok {
				hits++
				if h.Point.Sub(o.Add(d.Mul(h.T))).Len() > 1e-9 {
					t.Fatalf("hit point off the ray")
				}
				a, bb, c := m.Corners(int(h.Tri))
				if closestOnTriangle(h.Point, a, bb, c).Sub(h.Point).Len() > 1e-9 {
					t.Fatalf("hit point not on triangle %d", h.Tri)
				}
			}
		}
		if hits < rays/10 {
			t.Errorf("%s: only %d hits, the check is too weak", name, hits)
		}
	}
}

// TestBVHTasksJoinAsSerialBuild: the tree built as tasks on goroutines and joined is the tree
// one serial build makes, node for node and triangle for triangle (the layout a serial build
// gives is what the join promises), on canal tubes many tasks deep, a soup and a mesh whose
// triangles are shuffled. Small fork sizes make many tasks of uneven size.
func TestBVHTasksJoinAsSerialBuild(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	shuffled := shapeCanalLike(48, 120)
	rng.Shuffle(len(shuffled.Triangles), func(i, j int) {
		shuffled.Triangles[i], shuffled.Triangles[j] = shuffled.Triangles[j], shuffled.Triangles[i]
	})
	soup := &Mesh{}
	for i := 0; i < 5000; i++ {
		c := randVec(rng, -5, 5)
		n := int32(len(soup.Vertices))
		soup.Vertices = append(soup.Vertices, c, c.Add(randVec(rng, -1, 1)), c.Add(randVec(rng, -1, 1)))
		soup.Triangles = append(soup.Triangles, [3]int32{n, n + 1, n + 2})
	}
	for name, m := range map[string]*Mesh{"tube": shapeCanalLike(64, 160), "shuffled": shuffled, "soup": soup} {
		want := newBVH(m, math.MaxInt)
		for _, fork := range []int{bvhForkAbove, 1000, 37} {
			got := newBVH(m, fork)
			if len(got.nodes) != len(want.nodes) || len(got.tris) != len(want.tris) {
				t.Fatalf("%s, fork above %d: %d nodes %d triangles, serial %d %d", name, fork,
					len(got.nodes), len(got.tris), len(want.nodes), len(want.tris))
			}
			for i := range want.nodes {
				if got.nodes[i] != want.nodes[i] {
					t.Fatalf("%s, fork above %d: node %d is %+v, serial %+v", name, fork, i, got.nodes[i], want.nodes[i])
				}
			}
			for i := range want.tris {
				if got.tris[i] != want.tris[i] {
					t.Fatalf("%s, fork above %d: triangle %d differs", name, fork, i)
				}
			}
		}
		if len(m.Triangles) > 1000 && len(want.nodes) < len(m.Triangles)/8 {
			t.Fatalf("%s: only %d nodes, the check is too weak", name, len(want.nodes))
		}
	}
}

// Analytic geometry: from a cylinder's axis, a ray along a radius meets the wall of the
// inscribed polygon at r cos(pi/n) at worst and r at a vertex.
func TestBVHRayCylinderAnalytic(t *testing.T) {
	r, seg := 1.0, 64
	b := NewBVH(shapeCylinder(r, 10, seg, 10))
	for k := 0; k < 100; k++ {
		phi := 2 * math.Pi * float64(k) / 100
		h, ok := b.Ray(mgl64.Vec3{0, 0, 5}, mgl64.Vec3{math.Cos(phi), math.Sin(phi), 0}, 10)
		if !ok || h.T < r*math.Cos(math.Pi/float64(seg))-1e-12 || h.T > r+1e-12 {
			t.Fatalf("phi %g: %v %v", phi, h, ok)
		}
	}
	// Up the axis: the top cap at z = 10 (T = 5 with |dir| = 1, 2.5 with |dir| = 2).
	if h, ok := b.Ray(mgl64.Vec3{0.1, 0.2, 5}, mgl64.Vec3{0, 0, 2}, math.Inf(1)); !ok || math.Abs(h.T-2.5) > 1e-12 {
		t.Errorf("cap hit %v %v, want T = 2.5", h, ok)
	}
	if _, ok := b.Ray(mgl64.Vec3{0, 0, 5}, mgl64.Vec3{1, 0, 0}, 0.5); ok {
		t.Error("tMax must cut the ray short")
	}
	if _, ok := NewBVH(&Mesh{}).Ray(mgl64.Vec3{}, mgl64.Vec3{1, 0, 0}, 1); ok {
		t.Error("empty mesh hit")
	}
}

func TestBVHClosestMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	m := shapeCanalLike(24, 60)
	b := NewBVH(m)
	lo, hi := m.Bounds()
	for i := 0; i < 1000; i++ {
		p := mgl64.Vec3{}
		for k := 0; k < 3; k++ {
			p[k] = lo[k] - 1 + (hi[k]-lo[k]+2)*rng.Float64()
		}
		q, tri, d := b.Closest(p)
		want := bruteClosest(m, p)
		if math.Abs(d-want) > 1e-12 || math.Abs(q.Sub(p).Len()-d) > 1e-12 {
			t.Fatalf("point %v: bvh %g brute %g", p, d, want)
		}
		a, bb, c := m.Corners(int(tri))
		if closestOnTriangle(q, a, bb, c).Sub(q).Len() > 1e-12 {
			t.Fatalf("closest point not on its triangle")
		}
	}
	if _, tri, d := NewBVH(&Mesh{}).Closest(mgl64.Vec3{}); tri != -1 || !math.IsInf(d, 1) {
		t.Error("empty mesh")
	}
}

// Inside/outside against the analytic cylinder (a point within r cos(pi/n) of the axis and
// between the caps is inside the inscribed prism), including points on the axis and in the
// planes of the ring vertices, where rays are likely to graze edges.
func TestBVHInsideCylinder(t *testing.T) {
	r, h, seg := 1.0, 4.0, 32
	m := shapeCylinder(r, h, seg, 8)
	b := NewBVH(m)
	rin := r * math.Cos(math.Pi/float64(seg))
	rng := rand.New(rand.NewPCG(9, 10))
	for i := 0; i < 3000; i++ {
		p := mgl64.Vec3{3*rng.Float64() - 1.5, 3*rng.Float64() - 1.5, 6*rng.Float64() - 1}
		switch i % 4 {
		case 1:
			p[0], p[1] = 0, 0 // on the axis, through the cap fans' centres
		case 2:
			p[2] = math.Round(p[2]*2) / 2 // in the plane of a vertex ring
		}
		rad := math.Hypot(p[0], p[1])
		in := rad < rin-1e-6 && p[2] > 1e-6 && p[2] < h-1e-6
		out := rad > r+1e-6 || p[2] < -1e-6 || p[2] > h+1e-6
		if !in && !out {
			continue
		}
		if got := b.Inside(p); got != in {
			t.Fatalf("point %v: inside %v, want %v", p, got, in)
		}
	}
}

// Queries share nothing mutable: many goroutines get the answers one goroutine gets.
func TestBVHConcurrent(t *testing.T) {
	m := shapeCanalLike(16, 30)
	b := NewBVH(m)
	rng := rand.New(rand.NewPCG(11, 12))
	pts := make([]mgl64.Vec3, 200)
	want := make([]float64, len(pts))
	for i := range pts {
		pts[i] = randVec(rng, -2, 12)
		_, _, want[i] = b.Closest(pts[i])
	}
	var wg sync.WaitGroup
	for g := 0; g < 8; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i, p := range pts {
				if _, _, d := b.Closest(p); d != want[i] {
					t.Errorf("goroutine got %g, want %g", d, want[i])
				}
				b.Inside(p)
				b.Ray(p, mgl64.Vec3{1, 0.3, 0.1}, 100)
			}
		}()
	}
	wg.Wait()
	if n := testing.AllocsPerRun(100, func() {
		b.Closest(pts[3])
		b.Ray(pts[3], mgl64.Vec3{0, 1, 0}, 50)
		b.Inside(pts[3])
	}); n != 0 {
		t.Errorf("queries allocate %v times", n)
	}
}
