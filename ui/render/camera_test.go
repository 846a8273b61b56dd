package render

import (
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// project maps p through the camera's own View and Proj matrices to NDC.
func project(c *Camera, aspect float64, p mgl64.Vec3) mgl64.Vec3 {
	q := c.Proj(aspect).Mul4(c.View()).Mul4x1(p.Vec4(1))
	return q.Vec3().Mul(1 / q[3])
}

func TestCameraMatchesPinholeModel(t *testing.T) {
	// Pinhole camera: a point at depth d and lateral offset x lands at x / (d tan(fov/2) aspect).
	c := &Camera{Target: mgl64.Vec3{1, 2, 3}, Distance: 10, FovY: 40 * math.Pi / 180, Near: 0.1, Far: 100}
	eye := c.Eye()
	if eye.Sub(mgl64.Vec3{1, -8, 3}).Len() > 1e-12 {
		t.Fatalf("eye %v, want (1,-8,3)", eye)
	}
	p := mgl64.Vec3{1 + 0.7, 2 + 4, 3 - 1.1}
	ndc := project(c, 1.6, p)
	tn := math.Tan(20 * math.Pi / 180)
	want := mgl64.Vec2{0.7 / (14 * tn * 1.6), -1.1 / (14 * tn)}
	if math.Abs(ndc[0]-want[0]) > 1e-12 || math.Abs(ndc[1]-want[1]) > 1e-12 {
		t.Errorf("ndc %v, want %v", ndc, want)
	}
}

func TestOrbitPanDolly(t *testing.T) {
	c := &Camera{Distance: 5, FovY: 0.6}
	c.Orbit(math.Pi/2, 0)
	// A quarter turn about +z moves the eye from -y to +x.
	if e := c.Eye(); e.Sub(mgl64.Vec3{5, 0, 0}).Len() > 1e-12 {
		t.Errorf("eye after quarter turn %v", e)
	}
	c.Orbit(0, 10) // clamped straight overhead
	if c.Pitch != math.Pi/2 {
		t.Errorf("pitch %v, want pi/2", c.Pitch)
	}
	c.Orbit(0, -math.Pi/2)
	before := c.Target
	c.Pan(0.5, 0)
	moved := c.Target.Sub(before)
	// Half the view height at the target: 0.5 * 2 * 5 * tan(0.3), along the screen's right.
	if want := 0.5 * 2 * 5 * math.Tan(0.3); math.Abs(moved.Len()-want) > 1e-12 {
		t.Errorf("pan moved %v, want %v", moved.Len(), want)
	}
	if ndc := project(c, 1, before); !(ndc[0] < -0.1) || math.Abs(ndc[1]) > 1e-12 {
		t.Errorf("after panning right the old target should sit left of centre, got %v", ndc)
	}
	c.Dolly(0.5)
	if c.Distance != 2.5 {
		t.Errorf("distance %v after dolly 0.5", c.Distance)
	}
	c.Dolly(math.NaN())
	c.Dolly(-1)
	if c.Distance != 2.5 {
		t.Errorf("bad dolly factors changed the distance to %v", c.Distance)
	}
}

func TestFitShowsWholeBox(t *testing.T) {
	lo, hi := mgl64.Vec3{-1, 2, -20}, mgl64.Vec3{3, 2.5, 0}
	for _, aspect := range []float64{0.5, 1, 1.6} {
		c := NewCamera()
		c.Orbit(0.7, 0.3)
		c.Fit(lo, hi, aspect)
		for i := 0; i < 8; i++ {
			p := mgl64.Vec3{pick(i&1, lo[0], hi[0]), pick(i&2, lo[1], hi[1]), pick(i&4, lo[2], hi[2])}
			ndc := project(c, aspect, p)
			if math.Abs(ndc[0]) > 1 || math.Abs(ndc[1]) > 1 || ndc[2] < -1 || ndc[2] > 1 {
				t.Errorf("aspect %v: corner %v at ndc %v, outside the view", aspect, p, ndc)
			}
		}
	}
}

func pick(bit int, a, b float64) float64 {
	if bit != 0 {
		return b
	}
	return a
}

func TestLookFromNamedViews(t *testing.T) {
	c := &Camera{Distance: 4, FovY: 0.6}
	c.LookFrom(mgl64.Vec3{1, 0, 0}, mgl64.Vec3{0, 0, 1})
	if e := c.Eye(); e.Sub(mgl64.Vec3{4, 0, 0}).Len() > 1e-12 {
		t.Errorf("view from +x: eye %v", e)
	}
	// From above with +y up on screen: a point at +y projects above the centre.
	c.LookFrom(mgl64.Vec3{0, 0, 1}, mgl64.Vec3{0, 1, 0})
	if e := c.Eye(); e.Sub(mgl64.Vec3{0, 0, 4}).Len() > 1e-12 {
		t.Errorf("view from above: eye %v", e)
	}
	if ndc := project(c, 1, mgl64.Vec3{0, 1, 0}); !(ndc[1] > 0.1) || math.Abs(ndc[0]) > 1e-9 {
		t.Errorf("view from above: +y at %v, want straight up", ndc)
	}
	// From below with +x up.
	c.LookFrom(mgl64.Vec3{0, 0, -1}, mgl64.Vec3{1, 0, 0})
	if ndc := project(c, 1, mgl64.Vec3{1, 0, 0}); !(ndc[1] > 0.1) || math.Abs(ndc[0]) > 1e-9 {
		t.Errorf("view from below: +x at %v, want straight up", ndc)
	}
}
