package mesh

import (
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// tubeStraight returns a capped straight tube of constant radius along +z.
func tubeStraight(r, length float64, rings, around int, leftHanded bool) *Mesh {
	centers := make([]mgl64.Vec3, rings)
	n1 := make([]mgl64.Vec3, rings)
	n2 := make([]mgl64.Vec3, rings)
	for i := range centers {
		centers[i] = mgl64.Vec3{0, 0, length * float64(i) / float64(rings-1)}
		n1[i] = mgl64.Vec3{1, 0, 0}
		n2[i] = mgl64.Vec3{0, 1, 0}
		if leftHanded {
			n2[i] = mgl64.Vec3{0, -1, 0}
		}
	}
	return SweepTube(centers, n1, n2, func(int, float64) float64 { return r }, around, true, true)
}

// tubeCanalLike sweeps a tapered tube along a straight run and a 40 degree arc of radius 5,
// like a curved root canal: rings*around*2 + 2*around triangles.
func tubeCanalLike(rings, around int) *Mesh {
	const straight, radius, angle = 8.0, 5.0, 40 * math.Pi / 180
	total := straight + radius*angle
	centers := make([]mgl64.Vec3, rings)
	n1 := make([]mgl64.Vec3, rings)
	n2 := make([]mgl64.Vec3, rings)
	rs := make([]float64, rings)
	for i := range centers {
		s := total * float64(i) / float64(rings-1)
		rs[i] = 0.5 - 0.375*s/total
		if s <= straight {
			centers[i] = mgl64.Vec3{0, 0, -s}
			n1[i] = mgl64.Vec3{1, 0, 0}
		} else {
			phi := (s - straight) / radius
			centers[i] = mgl64.Vec3{radius * (1 - math.Cos(phi)), 0, -straight - radius*math.Sin(phi)}
			n1[i] = mgl64.Vec3{math.Cos(phi), 0, math.Sin(phi)}
		}
		n2[i] = mgl64.Vec3{0, 1, 0}
	}
	return SweepTube(centers, n1, n2, func(i int, _ float64) float64 { return rs[i] }, around, true, true)
}

// tubeSphere returns a closed polyhedral sphere of radius r centred at c.
func tubeSphere(c mgl64.Vec3, r float64, rings, around int) *Mesh {
	centers := make([]mgl64.Vec3, rings)
	n1 := make([]mgl64.Vec3, rings)
	n2 := make([]mgl64.Vec3, rings)
	rs := make([]float64, rings)
	for i := range centers {
		phi := math.Pi * (float64(i) + 0.5) / float64(rings)
		centers[i] = c.Add(mgl64.Vec3{0, 0, -r * math.Cos(phi)})
		n1[i], n2[i] = mgl64.Vec3{1, 0, 0}, mgl64.Vec3{0, 1, 0}
		rs[i] = r * math.Sin(phi)
	}
	m := SweepTube(centers, n1, n2, func(i int, _ float64) float64 { return rs[i] }, around, true, true)
	// Move the cap centres to the poles so the solid is a proper polyhedral sphere.
	m.Vertices[len(m.Vertices)-2] = c.Add(mgl64.Vec3{0, 0, -r})
	m.Vertices[len(m.Vertices)-1] = c.Add(mgl64.Vec3{0, 0, r})
	return m
}

func TestSweepTubeClosedOutwardPrism(t *testing.T) {
	const r, length, around = 0.7, 3.0, 24
	for _, left := range []bool{false, true} {
		m := tubeStraight(r, length, 7, around, left)
		rep := Validate(m)
		// A capped sweep is a closed 2-manifold: every edge used by exactly two triangles,
		// in opposite directions (Euler/edge counting of a closed orientable surface).
		if !rep.Closed || !rep.Manifold || rep.InconsistentOrientation != 0 || rep.Shells != 1 {
			t.Fatalf("leftHanded=%v: report %+v", left, rep)
		}
		// Euler characteristic of a sphere-like surface: V - E + F = 2, E = 3F/2.
		if v, f := len(m.Vertices), len(m.Triangles); v-3*f/2+f != 2 {
			t.Errorf("leftHanded=%v: V-E+F = %d, want 2", left, v-3*f/2+f)
		}
		// Analytic: a prism over the regular polygon inscribed in the circle,
		// area = n/2 r^2 sin(2 pi / n); positive volume means outward triangles.
		want := float64(around) / 2 * r * r * math.Sin(2*math.Pi/around) * length
		if got := Volume(m); math.Abs(got-want) > 1e-9*want {
			t.Errorf("leftHanded=%v: volume %.12f, want %.12f", left, got, want)
		}
	}
}

func TestSweepTubeRingPlacementAndOpenEnds(t *testing.T) {
	centers := []mgl64.Vec3{{1, 2, 3}, {1, 2, 5}}
	n1 := []mgl64.Vec3{{1, 0, 0}, {1, 0, 0}}
	n2 := []mgl64.Vec3{{0, 1, 0}, {0, 1, 0}}
	// Radius law depending on ring and angle: ring i, theta -> 1 + i + cos(theta)/2.
	rf := func(i int, th float64) float64 { return 1 + float64(i) + math.Cos(th)/2 }
	m := SweepTube(centers, n1, n2, rf, 8, false, false)
	if len(m.Vertices) != 16 || len(m.Triangles) != 16 {
		t.Fatalf("got %d vertices, %d triangles; want 16, 16", len(m.Vertices), len(m.Triangles))
	}
	for i := range 2 {
		for j := range 8 {
			th := 2 * math.Pi * float64(j) / 8
			want := centers[i].Add(mgl64.Vec3{math.Cos(th), math.Sin(th), 0}.Mul(rf(i, th)))
			if got := m.Vertices[i*8+j]; !got.ApproxEqualThreshold(want, 1e-12) {
				t.Errorf("ring %d vertex %d at %v, want %v (definition of the sweep)", i, j, got, want)
			}
		}
	}
	// Without caps the two rims are open: 2*8 boundary edges.
	if rep := Validate(m); rep.BoundaryEdges != 16 || rep.Closed {
		t.Errorf("open tube: %+v, want 16 boundary edges", rep)
	}
	if got := SweepTube(centers[:1], n1, n2, rf, 8, true, true); len(got.Triangles) != 0 {
		t.Errorf("one ring gave %d triangles, want none", len(got.Triangles))
	}
}

func TestSweepTubeCanalLikeClosed(t *testing.T) {
	m := tubeCanalLike(60, 32)
	rep := Validate(m)
	if !rep.Closed || !rep.Manifold || rep.InconsistentOrientation != 0 {
		t.Fatalf("report %+v", rep)
	}
	if Volume(m) <= 0 {
		t.Errorf("volume %g: triangles face inward", Volume(m))
	}
}
