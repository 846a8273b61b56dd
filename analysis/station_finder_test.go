package analysis

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// The station finder must give exactly what a scan of every station gives (the definition
// of the nearest point, lowest index among equals), whatever the hint, with reach
// certificates and without: on a helix, a line that doubles back on itself (a far stretch
// nearer than the hint's), repeated points and points far from the line.
func TestStationFinderMatchesFullScan(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	lines := map[string][]mgl64.Vec3{}
	var helix, hairpin, repeats []mgl64.Vec3
	for i := 0; i < 400; i++ {
		a := float64(i) * 0.05
		helix = append(helix, mgl64.Vec3{math.Cos(a), math.Sin(a), 0.02 * a})
		// Out along x and back 0.3 above: the way back is nearer for points between.
		if i < 200 {
			hairpin = append(hairpin, mgl64.Vec3{float64(i) * 0.05, 0, 0})
		} else {
			hairpin = append(hairpin, mgl64.Vec3{float64(399-i) * 0.05, 0.3, 0})
		}
		repeats = append(repeats, mgl64.Vec3{float64(i/5) * 0.05, 0, 0})
	}
	lines["helix"], lines["hairpin"], lines["repeats"] = helix, hairpin, repeats
	lines["one point"] = []mgl64.Vec3{{1, 2, 3}}
	for name, pts := range lines {
		f := newStationFinder(pts)
		if name != "helix" {
			f.buildReach(0) // the helix without certificates, the rest with
		}
		for q := 0; q < 20000; q++ {
			p := pts[rng.IntN(len(pts))].Add(mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Mul(0.3))
			if q%100 == 0 {
				p = p.Mul(50) // far away
			}
			if q%7 == 0 {
				p = pts[rng.IntN(len(pts))] // on a station: distance 0, ties on repeats
			}
			want, wd := 0, math.Inf(1)
			for i, s := range pts {
				if d := s.Sub(p).Len(); d < wd {
					want, wd = i, d
				}
			}
			for _, hint := range []int{-1, 0, len(pts) - 1, rng.IntN(len(pts)), want} {
				if got := f.nearest(&p, hint); got != want {
					t.Fatalf("%s: point %v hint %d: station %d (%.17g), full scan %d (%.17g)",
						name, p, hint, got, pts[got].Sub(p).Len(), want, wd)
				}
			}
		}
	}
}

// lenLess must order two squares exactly as their roots (math.Sqrt, correctly rounded by IEEE
// 754) order: squares a few units apart in the last place (whose roots are often equal), tiny
// and subnormal squares, zero, infinity and NaN, and random pairs over a wide range.
func TestLenLessOrdersAsTheRoots(t *testing.T) {
	rng := rand.New(rand.NewPCG(18, 3))
	var pairs [][2]float64
	special := []float64{0, math.SmallestNonzeroFloat64, 0x1p-1000, 0x1p-1022, 1e-300, 1, 2, 1e300,
		math.MaxFloat64, math.Inf(1), math.NaN()}
	for _, a := range special {
		for _, b := range special {
			pairs = append(pairs, [2]float64{a, b})
		}
	}
	for range 200000 {
		a := math.Exp(rng.NormFloat64() * 20)
		switch rng.IntN(10) {
		case 0:
			a = math.Ldexp(rng.Float64(), -1074+rng.IntN(80)) // the smallest subnormals
		case 1:
			a = math.Ldexp(rng.Float64(), -1022+rng.IntN(3)) // the largest subnormals and the smallest normals
		}
		b := a
		for range rng.IntN(6) {
			b = math.Nextafter(b, math.Inf(1))
		}
		if rng.IntN(4) == 0 {
			b = a * (1 + rng.NormFloat64()*1e-14)
		}
		pairs = append(pairs, [2]float64{a, b}, [2]float64{b, a})
	}
	for _, p := range pairs {
		if got, want := lenLess(p[0], p[1]), math.Sqrt(p[0]) < math.Sqrt(p[1]); got != want {
			t.Fatalf("lenLess(%g, %g) = %v, roots %.17g and %.17g", p[0], p[1], got, math.Sqrt(p[0]), math.Sqrt(p[1]))
		}
	}
}

// Whenever a point lies within a station's reach certificate, every station outside the
// window around it is farther from the point than that station, by Len (the certificate's
// promise, checked station by station): on a helix, a line that turns back 0.3 mm from
// itself, a tight circle, a line of uneven steps and a zigzag, at points spread across the
// line up to twice each station's reach and along it up to twice the reach along.
func TestReachCertificateHolds(t *testing.T) {
	rng := rand.New(rand.NewPCG(18, 4))
	lines := map[string][]mgl64.Vec3{}
	var helix, hairpin, circle, uneven, zigzag []mgl64.Vec3
	x := 0.0
	for i := 0; i < 400; i++ {
		a := float64(i) * 0.05
		helix = append(helix, mgl64.Vec3{math.Cos(a), math.Sin(a), 0.02 * a})
		if i < 200 {
			hairpin = append(hairpin, mgl64.Vec3{float64(i) * 0.05, 0, 0})
		} else {
			hairpin = append(hairpin, mgl64.Vec3{float64(399-i) * 0.05, 0.3, 0})
		}
		b := float64(i) * 2 * math.Pi / 400
		circle = append(circle, mgl64.Vec3{0.6 * math.Cos(b), 0.6 * math.Sin(b), 0})
		x += 0.01 + 0.08*rng.Float64()
		uneven = append(uneven, mgl64.Vec3{x, 0.02 * rng.NormFloat64(), 0})
		zigzag = append(zigzag, mgl64.Vec3{float64(i) * 0.04, 0.03 * float64(i%2), 0})
	}
	lines["helix"], lines["hairpin"], lines["circle"], lines["uneven"], lines["zigzag"] = helix, hairpin, circle, uneven, zigzag
	for name, pts := range lines {
		f := newStationFinder(pts)
		f.buildReach(0)
		n, certified := len(pts), 0
		for q := 0; q < 40000; q++ {
			h := rng.IntN(n)
			if f.reach2[h] < 0 {
				continue
			}
			u := mgl64.Vec3(f.axis[h])
			side := anyPerpendicular(u)
			turn := mgl64.QuatRotate(2*math.Pi*rng.Float64(), u)
			across := turn.Rotate(side).Mul(2 * math.Sqrt(f.reach2[h]) * rng.Float64())
			p := pts[h].Add(across).Add(u.Mul(2 * f.along * (2*rng.Float64() - 1)))
			d := pts[h].Sub(p)
			if !f.certified(h, d[0], d[1], d[2], d.Dot(d)) {
				continue
			}
			certified++
			dh := pts[h].Sub(p).Len()
			for j := range pts {
				if j >= h-reachWindow && j <= h+reachWindow {
					continue
				}
				if dj := pts[j].Sub(p).Len(); !(dj > dh) {
					t.Fatalf("%s: point %v certified at station %d (%.17g) but station %d is as near (%.17g)", name, p, h, dh, j, dj)
				}
			}
		}
		if certified < 1000 {
			t.Errorf("%s: only %d points of 40000 certified", name, certified)
		}
	}
}
