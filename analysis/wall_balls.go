package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// ball is a ball known to hold no point of the root's surface: a point of the canal's wall
// and a lower bound of its wall.
type ball struct {
	c mgl64.Vec3
	r float64
}

// outsideTwoBalls is the distance from p to the nearest point outside both balls (0 when p
// lies in neither): a lower bound of p's wall when both hold no point of the surface, and a
// tighter one than either ball's alone (r - |p - c|) where p lies between them. The nearest
// point outside the union lies on its boundary: on one sphere where that sphere's point
// nearest p lies outside the other ball, else on the circle where the spheres meet (on a
// sphere the distance from p only grows away from its nearest point, so over the part of a
// sphere outside the other ball, a cap, it is least at the cap's rim).
func outsideTwoBalls(p *mgl64.Vec3, a, b *ball) float64 {
	// Written out on plain numbers, each operation in the order the Vec3 methods take it (so
	// every result rounds as theirs did): this runs for every pair of balls at every cell of a
	// wall map, and vectors passed and kept as arrays went through memory.
	px, py, pz := p[0], p[1], p[2]
	da := math.Sqrt((px-a.c[0])*(px-a.c[0]) + (py-a.c[1])*(py-a.c[1]) + (pz-a.c[2])*(pz-a.c[2]))
	db := math.Sqrt((px-b.c[0])*(px-b.c[0]) + (py-b.c[1])*(py-b.c[1]) + (pz-b.c[2])*(pz-b.c[2]))
	if !(da < a.r) && !(db < b.r) {
		return 0
	}
	// Each sphere's point nearest p, where the other ball does not hold it.
	best := min(sphereOutside(px, py, pz, a, b, da), sphereOutside(px, py, pz, b, a, db))
	// The circle where the spheres meet (none when one ball holds the other or they are apart).
	abx, aby, abz := b.c[0]-a.c[0], b.c[1]-a.c[1], b.c[2]-a.c[2]
	l := math.Sqrt(abx*abx + aby*aby + abz*abz)
	if l > 0 && l < a.r+b.r && l > math.Abs(a.r-b.r) {
		il := 1 / l
		ux, uy, uz := abx*il, aby*il, abz*il
		t := (l*l + a.r*a.r - b.r*b.r) / (2 * l) // from a.c along u to the circle's plane
		rc := math.Sqrt(max(a.r*a.r-t*t, 0))
		ox, oy, oz := px-(a.c[0]+ux*t), py-(a.c[1]+uy*t), pz-(a.c[2]+uz*t)
		h := ox*ux + oy*uy + oz*uz
		wx, wy, wz := ox-ux*h, oy-uy*h, oz-uz*h
		w := math.Sqrt(wx*wx + wy*wy + wz*wz) // p's distance from the line of centres
		best = min(best, math.Sqrt(h*h+(w-rc)*(w-rc)))
	}
	if math.IsInf(best, 1) {
		// One ball holds the other and p, and its sphere's point nearest p: that one counts.
		return max(a.r-da, b.r-db, 0)
	}
	// Rounding: a bound must not exceed the wall.
	return max(best-1e-9*(1+a.r+b.r), 0)
}

// sphereOutside is the distance from p, at d from own's centre, to own's sphere's point
// nearest p when that point lies outside other; +Inf when it does not, or p is not strictly
// inside own, or at its centre.
func sphereOutside(px, py, pz float64, own, other *ball, d float64) float64 {
	if !(d < own.r) || d == 0 {
		return math.Inf(1)
	}
	k := own.r / d
	x := own.c[0] + (px-own.c[0])*k - other.c[0]
	y := own.c[1] + (py-own.c[1])*k - other.c[1]
	z := own.c[2] + (pz-own.c[2])*k - other.c[2]
	if math.Sqrt(x*x+y*y+z*z) >= other.r {
		return own.r - d
	}
	return math.Inf(1)
}
