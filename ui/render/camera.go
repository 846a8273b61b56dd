package render

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// Camera is a perspective camera that orbits a target point with world +z up
// (a turntable: parametric canals run down -z, so they stand upright on screen).
// Yaw turns about +z; Pitch lifts the eye above (positive) or below the target.
// With Yaw = Pitch = 0 the eye sits on the -y side looking along +y, +x to the right.
// Angles are radians.
type Camera struct {
	Target   mgl64.Vec3
	Distance float64 // eye to target
	Yaw      float64
	Pitch    float64 // clamped to [-pi/2, pi/2]
	FovY     float64 // vertical field of view
	Near     float64 // near clipping distance; <= 0 picks 1/1000 of Distance
	Far      float64 // only used by Proj; the rasteriser has no far plane
}

// NewCamera returns a camera with a 35 degree field of view looking at the origin from the front.
func NewCamera() *Camera {
	return &Camera{Distance: 10, FovY: 35 * math.Pi / 180, Near: 0.01, Far: 100}
}

// towardEye is the unit vector from the target to the eye.
func (c *Camera) towardEye() mgl64.Vec3 {
	sy, cy := math.Sincos(c.Yaw)
	sp, cp := math.Sincos(c.Pitch)
	return mgl64.Vec3{sy * cp, -cy * cp, sp}
}

// basis returns the camera's right, up and forward (eye to target) unit vectors.
// Right stays horizontal, so the basis is defined even looking straight down.
func (c *Camera) basis() (right, up, forward mgl64.Vec3) {
	sy, cy := math.Sincos(c.Yaw)
	forward = c.towardEye().Mul(-1)
	right = mgl64.Vec3{cy, sy, 0}
	up = right.Cross(forward)
	return
}

// Eye returns the camera position.
func (c *Camera) Eye() mgl64.Vec3 {
	return c.Target.Add(c.towardEye().Mul(c.Distance))
}

// Orbit turns the eye about the target.
func (c *Camera) Orbit(dYaw, dPitch float64) {
	c.Yaw = math.Remainder(c.Yaw+dYaw, 2*math.Pi)
	c.Pitch = math.Max(-math.Pi/2, math.Min(math.Pi/2, c.Pitch+dPitch))
}

// Pan moves eye and target together, right by dx and up by dy, both in fractions of
// the view height at the target's distance (so a drag across the whole view height is 1).
func (c *Camera) Pan(dx, dy float64) {
	right, up, _ := c.basis()
	h := c.viewHeight()
	c.Target = c.Target.Add(right.Mul(dx * h)).Add(up.Mul(dy * h))
}

// viewHeight is the height of the view at the target's distance.
func (c *Camera) viewHeight() float64 {
	return 2 * c.Distance * math.Tan(c.FovY/2)
}

// Dolly multiplies the distance to the target by factor (< 1 moves closer).
func (c *Camera) Dolly(factor float64) {
	if !(factor > 0) || math.IsInf(factor, 0) {
		return
	}
	c.Distance = math.Max(c.Distance*factor, 1e-9)
}

// Fit aims at the centre of the box lo..hi and backs off until the box's bounding
// sphere fills the narrower side of a view of the given aspect (width/height).
func (c *Camera) Fit(lo, hi mgl64.Vec3, aspect float64) {
	if !(aspect > 0) {
		aspect = 1
	}
	if !(c.FovY > 0 && c.FovY < math.Pi) {
		c.FovY = 35 * math.Pi / 180
	}
	c.Target = lo.Add(hi).Mul(0.5)
	radius := hi.Sub(lo).Len() / 2
	if !(radius > 0) {
		radius = 1
	}
	half := c.FovY / 2
	if halfX := math.Atan(math.Tan(half) * aspect); halfX < half {
		half = halfX
	}
	c.Distance = radius / math.Sin(half) * 1.05
	c.Near = radius * 1e-3
	c.Far = c.Distance + 2*radius
}

// FitPoints keeps the direction and aims at the middle of the points as seen, backing off until
// they all lie inside a view of the given aspect (width/height) with margin (a share of the
// view, 0.05 = 5 % on each side). It fits a long, thin canal much closer than Fit's sphere.
func (c *Camera) FitPoints(aspect, margin float64, sets ...[]mgl64.Vec3) {
	if !(aspect > 0) {
		aspect = 1
	}
	if !(c.FovY > 0 && c.FovY < math.Pi) {
		c.FovY = 35 * math.Pi / 180
	}
	right, up, fwd := c.basis()
	lo, hi := [3]float64{math.Inf(1), math.Inf(1), math.Inf(1)}, [3]float64{math.Inf(-1), math.Inf(-1), math.Inf(-1)}
	for _, pts := range sets {
		for _, p := range pts {
			v := [3]float64{p.Dot(right), p.Dot(up), p.Dot(fwd)}
			for k := range v {
				lo[k], hi[k] = math.Min(lo[k], v[k]), math.Max(hi[k], v[k])
			}
		}
	}
	if math.IsInf(lo[0], 0) {
		return
	}
	mid := func(k int) float64 { return (lo[k] + hi[k]) / 2 }
	c.Target = right.Mul(mid(0)).Add(up.Mul(mid(1))).Add(fwd.Mul(mid(2)))
	ty := math.Tan(c.FovY/2) * (1 - 2*margin)
	tx := ty * aspect
	hx, hy, hz := (hi[0]-lo[0])/2, (hi[1]-lo[1])/2, (hi[2]-lo[2])/2
	// The nearest points are hz closer than the target: they must fit too.
	c.Distance = math.Max(hx/tx, hy/ty) + hz
	if !(c.Distance > 0) {
		c.Distance = 1
	}
	c.Near = c.Distance * 1e-3
	c.Far = c.Distance + 4*hz + 1
}

// LookFrom turns the camera so the eye lies in direction dir from the target. The turntable
// keeps +z up, so up is only used when dir is (anti)parallel to z, to choose the screen's up.
func (c *Camera) LookFrom(dir, up mgl64.Vec3) {
	if dir.Len() == 0 {
		return
	}
	d := dir.Normalize()
	c.Pitch = math.Asin(math.Max(-1, math.Min(1, d[2])))
	if math.Hypot(d[0], d[1]) > 1e-9 {
		c.Yaw = math.Atan2(d[0], -d[1])
		return
	}
	// Straight down (or up): the screen's up is (-sin yaw, cos yaw, 0) looking down,
	// (sin yaw, -cos yaw, 0) looking up.
	if d[2] < 0 {
		up = up.Mul(-1)
	}
	if math.Hypot(up[0], up[1]) > 1e-9 {
		c.Yaw = math.Atan2(-up[0], up[1])
	}
}

// View returns the world-to-camera matrix.
func (c *Camera) View() mgl64.Mat4 {
	_, up, _ := c.basis()
	return mgl64.LookAtV(c.Eye(), c.Target, up)
}

// Proj returns an OpenGL-style perspective matrix for the given aspect (width/height).
func (c *Camera) Proj(aspect float64) mgl64.Mat4 {
	near, far := c.nearDistance(), c.Far
	if !(far > near) {
		far = near + 2*c.Distance + 1
	}
	return mgl64.Perspective(c.FovY, aspect, near, far)
}

func (c *Camera) nearDistance() float64 {
	if c.Near > 0 {
		return c.Near
	}
	if c.Distance > 0 {
		return c.Distance * 1e-3
	}
	return 1e-6
}
