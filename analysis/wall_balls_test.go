package analysis

import (
	"math"
	"math/rand"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// outsideTwoBallsVec3 is outsideTwoBalls as first written, with Vec3 methods: the reference
// the plain-number form must match bit for bit.
func outsideTwoBallsVec3(p mgl64.Vec3, a, b ball) float64 {
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

// TestOutsideTwoBallsMatchesVec3Form: on random balls and points (apart, overlapping, one
// inside the other, equal, concentric, p at a centre or on a sphere) the plain-number form
// gives the Vec3 form's bound, bit for bit.
func TestOutsideTwoBallsMatchesVec3Form(t *testing.T) {
	rng := rand.New(rand.NewSource(41))
	rnd := func(s float64) mgl64.Vec3 {
		return mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Mul(s)
	}
	nonzero := 0
	for n := 0; n < 200000; n++ {
		a := ball{c: rnd(0.3), r: 0.05 + rng.Float64()}
		b := ball{c: rnd(0.3), r: 0.05 + rng.Float64()}
		p := rnd(0.4)
		switch n % 6 {
		case 1:
			b = a // equal balls
		case 2:
			b.c = a.c // concentric
		case 3:
			p = a.c // at a centre
		case 4: // on a sphere
			d := rnd(1)
			p = a.c.Add(d.Mul(a.r / d.Len()))
		}
		want := outsideTwoBallsVec3(p, a, b)
		if got := outsideTwoBalls(&p, &a, &b); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("p %v, balls %v %v: %v, want %v", p, a, b, got, want)
		}
		if want > 0 {
			nonzero++
		}
	}
	if nonzero < 50000 {
		t.Errorf("only %d of 200000 bounds above 0: the cases hardly reach the spheres and the circle", nonzero)
	}
}
