package models

import (
	"math"
	"testing"

	"tapersweep/mesh"
)

func canalCheckClosed(t *testing.T, what string, m *mesh.Mesh) {
	t.Helper()
	// Closed orientable 2-manifold: every edge in two triangles that run it oppositely.
	rep := mesh.Validate(m)
	if !rep.Closed || !rep.Manifold || rep.InconsistentOrientation != 0 || rep.Shells != 1 || rep.Degenerate != 0 {
		t.Errorf("%s: %+v", what, rep)
	}
}

func TestCanalMeshConeVolume(t *testing.T) {
	const l, d0, d1, around = 16.0, 1.0, 0.3, 64
	c := canalSpecOf(t, d0, d1, 0, `{"kind": "straight", "length": 16}`)
	m := c.Mesh(0.1, around)
	canalCheckClosed(t, "cone", m)
	// Frustum: V = pi L (R^2 + R r + r^2) / 3; the inscribed 64-gon loses under 0.2 %.
	r0, r1 := d0/2, d1/2
	want := math.Pi * l * (r0*r0 + r0*r1 + r1*r1) / 3
	if got := mesh.Volume(m); math.Abs(got-want) > 0.01*want {
		t.Errorf("volume %.5f, frustum %.5f", got, want)
	}
	// Rings follow ds: ceil(L/ds)+1 rings of `around` vertices, plus two cap centres.
	if n := len(m.Vertices); n != 161*around+2 {
		t.Errorf("%d vertices, want %d", n, 161*around+2)
	}
}

func TestCanalMeshCurvedVolume(t *testing.T) {
	for _, oval := range []float64{0, 1.6} {
		c := canalSpecOf(t, 1.0, 0.3, oval, `{"kind": "straight", "length": 5}, {"kind": "arc", "radius": 3, "angle": 70},
			{"kind": "arc", "radius": 6, "angle": 30, "plane_turn": 120}, {"kind": "straight", "length": 1}`)
		m := c.Mesh(0.05, 96)
		canalCheckClosed(t, "curved", m)
		// Pappus for tubes: a section swept normal to a curve whose radius of curvature
		// exceeds the section encloses the integral of its area, int pi r(s)^2 ds; with r
		// linear that is the frustum formula over the centerline length. An ellipse of
		// semi-axes r sqrt(q), r / sqrt(q) has the same area pi r^2.
		r0, r1, l := 0.5, 0.15, c.Length()
		want := math.Pi * l * (r0*r0 + r0*r1 + r1*r1) / 3
		if got := mesh.Volume(m); math.Abs(got-want) > 0.01*want {
			t.Errorf("oval %g: volume %.5f, integral %.5f", oval, got, want)
		}
	}
}

func TestCanalMeshOvalSection(t *testing.T) {
	const q, around = 1.4, 128
	c := canalSpecOf(t, 1.0, 1.0, q, `{"kind": "straight", "length": 2}, {"kind": "arc", "radius": 5, "angle": 30}`)
	m := c.Mesh(0.1, around)
	// Ring 5 (straight part): semi-axes r sqrt(q) along the long axis (y) and
	// r / sqrt(q) across it (x); area-equivalent to the nominal circle of r = 0.5.
	_, _, stations := c.Centerline(0.1)
	centre, _, long := c.At(stations[5])
	lo, hi := math.Inf(1), 0.0
	var area float64
	ring := m.Vertices[5*around : 6*around]
	for j, p := range ring {
		d := p.Sub(centre).Len()
		lo, hi = math.Min(lo, d), math.Max(hi, d)
		a, b := p.Sub(centre), ring[(j+1)%around].Sub(centre)
		area += a.Cross(b).Len() / 2
	}
	if math.Abs(hi-0.5*math.Sqrt(q)) > 1e-9 || math.Abs(lo-0.5/math.Sqrt(q)) > 1e-9 {
		t.Errorf("semi-axes %g, %g; want %g, %g", hi, lo, 0.5*math.Sqrt(q), 0.5/math.Sqrt(q))
	}
	if d := ring[0].Sub(centre).Normalize(); math.Abs(math.Abs(d.Dot(long))-1) > 1e-9 {
		t.Errorf("first vertex direction %v, want along the long axis %v", d, long)
	}
	if want := math.Pi * 0.25; math.Abs(area-want) > 0.005*want {
		t.Errorf("section area %.5f, want pi r^2 = %.5f", area, want)
	}
}
