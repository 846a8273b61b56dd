package mesh

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// closestOnTriangleVec3 is the closest point on a triangle by its Voronoi regions, written with
// Vec3 methods as in Ericson, Real-Time Collision Detection, 5.1.5: the reference the plain-
// number closestOnTriangle must match bit for bit.
func closestOnTriangleVec3(p, a, b, c mgl64.Vec3) mgl64.Vec3 {
	ab, ac, ap := b.Sub(a), c.Sub(a), p.Sub(a)
	d1, d2 := ab.Dot(ap), ac.Dot(ap)
	if d1 <= 0 && d2 <= 0 {
		return a
	}
	bp := p.Sub(b)
	d3, d4 := ab.Dot(bp), ac.Dot(bp)
	if d3 >= 0 && d4 <= d3 {
		return b
	}
	vc := d1*d4 - d3*d2
	if vc <= 0 && d1 >= 0 && d3 <= 0 {
		return a.Add(ab.Mul(d1 / (d1 - d3)))
	}
	cp := p.Sub(c)
	d5, d6 := ab.Dot(cp), ac.Dot(cp)
	if d6 >= 0 && d5 <= d6 {
		return c
	}
	vb := d5*d2 - d1*d6
	if vb <= 0 && d2 >= 0 && d6 <= 0 {
		return a.Add(ac.Mul(d2 / (d2 - d6)))
	}
	va := d3*d6 - d5*d4
	if va <= 0 && d4-d3 >= 0 && d5-d6 >= 0 {
		return b.Add(c.Sub(b).Mul((d4 - d3) / ((d4 - d3) + (d5 - d6))))
	}
	den := va + vb + vc
	if den == 0 {
		return nearestOf(p, a, b, c)
	}
	v, w := vb/den, vc/den
	return a.Add(ab.Mul(v)).Add(ac.Mul(w))
}

// Every Voronoi region (corners, edges, face), slivers, needles, zero-area triangles and
// points on the triangle: the plain-number test gives the reference's point, bit for bit, and
// the stored-triangle form its squared distance too.
func TestClosestOnTriangleMatchesVec3Form(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 29))
	vec := func(s float64) mgl64.Vec3 {
		return mgl64.Vec3{s * (rng.Float64()*2 - 1), s * (rng.Float64()*2 - 1), s * (rng.Float64()*2 - 1)}
	}
	bitsEqual := func(u, v mgl64.Vec3) bool {
		for k := range 3 {
			if math.Float64bits(u[k]) != math.Float64bits(v[k]) {
				return false
			}
		}
		return true
	}
	regions := map[string]int{}
	for i := 0; i < 200000; i++ {
		a, b, c := vec(1), vec(1), vec(1)
		switch i % 5 {
		case 1: // a sliver
			c = a.Add(b.Sub(a).Mul(rng.Float64())).Add(vec(1e-9))
		case 2: // zero area: three points on a line, or a repeated corner
			c = a.Add(b.Sub(a).Mul(rng.Float64() * 2))
			if i%10 == 2 {
				c = b
			}
		case 3: // far from the origin, small
			off := vec(1e4)
			a, b, c = a.Mul(1e-3).Add(off), b.Mul(1e-3).Add(off), c.Mul(1e-3).Add(off)
		}
		p := vec(3)
		if i%7 == 0 { // on the triangle
			u, v := rng.Float64(), rng.Float64()
			if u+v > 1 {
				u, v = 1-u, 1-v
			}
			p = a.Add(b.Sub(a).Mul(u)).Add(c.Sub(a).Mul(v))
		}
		want := closestOnTriangleVec3(p, a, b, c)
		if got := closestOnTriangle(p, a, b, c); !bitsEqual(got, want) {
			t.Fatalf("p %v, triangle %v %v %v: %v, want %v", p, a, b, c, got, want)
		}
		tr := bvhTri{a: a, e1: b.Sub(a), e2: c.Sub(a)}
		wantStored := closestOnTriangleVec3(p, tr.a, tr.a.Add(tr.e1), tr.a.Add(tr.e2))
		d2, got := closestOnStored(&p, &tr)
		if d := wantStored.Sub(p); !bitsEqual(got, wantStored) || math.Float64bits(d2) != math.Float64bits(d.Dot(d)) {
			t.Fatalf("stored triangle %v: %v at %v, want %v at %v", tr, got, d2, wantStored, d.Dot(d))
		}
		switch {
		case want == a || want == b || want == c:
			regions["corner"]++
		default:
			regions["edge or face"]++
		}
	}
	if regions["corner"] < 1000 || regions["edge or face"] < 1000 {
		t.Errorf("regions met: %v; want corners and edges or faces a thousand times each", regions)
	}
}
