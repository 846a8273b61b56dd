package analysis

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// The station finder must give exactly what a scan of every station gives (the definition
// of the nearest point, lowest index among equals), whatever the hint: on a helix, a line
// that doubles back on itself (a far stretch nearer than the hint's), repeated points and
// points far from the line.
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
				if got := f.nearest(p, hint); got != want {
					t.Fatalf("%s: point %v hint %d: station %d (%.17g), full scan %d (%.17g)",
						name, p, hint, got, pts[got].Sub(p).Len(), want, wd)
				}
			}
		}
	}
}
