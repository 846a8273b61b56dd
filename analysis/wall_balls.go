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
func outsideTwoBalls(p mgl64.Vec3, a, b ball) float64 {
	da, db := p.Sub(a.c).Len(), p.Sub(b.c).Len()
	if !(da < a.r) && !(db < b.r) {
		return 0
	}
	best := math.Inf(1)
	// Each sphere's point nearest p, where the other ball does not hold it.
	for _, s := range [2]struct {
		own, other ball
		d          float64
	}{{a, b, da}, {b, a, db}} {
		if !(s.d < s.own.r) || s.d == 0 {
			continue
		}
		x := s.own.c.Add(p.Sub(s.own.c).Mul(s.own.r / s.d))
		if x.Sub(s.other.c).Len() >= s.other.r {
			best = min(best, s.own.r-s.d)
		}
	}
	// The circle where the spheres meet (none when one ball holds the other or they are apart).
	ab := b.c.Sub(a.c)
	l := ab.Len()
	if l > 0 && l < a.r+b.r && l > math.Abs(a.r-b.r) {
		u := ab.Mul(1 / l)
		t := (l*l + a.r*a.r - b.r*b.r) / (2 * l) // from a.c along u to the circle's plane
		rc := math.Sqrt(max(a.r*a.r-t*t, 0))
		cc := a.c.Add(u.Mul(t))
		off := p.Sub(cc)
		h := off.Dot(u)
		w := off.Sub(u.Mul(h)).Len() // p's distance from the line of centres
		best = min(best, math.Sqrt(h*h+(w-rc)*(w-rc)))
	}
	if math.IsInf(best, 1) {
		// One ball holds the other and p, and its sphere's point nearest p: that one counts.
		return max(a.r-da, b.r-db, 0)
	}
	// Rounding: a bound must not exceed the wall.
	return max(best-1e-9*(1+a.r+b.r), 0)
}
