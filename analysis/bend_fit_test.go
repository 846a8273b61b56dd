package analysis

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// arcPoints samples an arc of radius r and angle deg (every ds mm) in a tilted plane, with
// Gaussian noise of sigma mm on every coordinate.
func arcPoints(r, deg, ds, sigma float64, rng *rand.Rand) []mgl64.Vec3 {
	turn := mgl64.QuatRotate(0.7, mgl64.Vec3{1, 2, 3}.Normalize())
	n := int(mgl64.DegToRad(deg)*r/ds) + 1
	pts := make([]mgl64.Vec3, n)
	for i := range pts {
		a := float64(i) * ds / r
		p := mgl64.Vec3{r * (1 - math.Cos(a)), 0, r * math.Sin(a)}
		if sigma > 0 {
			p = p.Add(mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Mul(sigma))
		}
		pts[i] = turn.Rotate(p).Add(mgl64.Vec3{1, -2, 5})
	}
	return pts
}

// TestFitCircleExact: points on an exact arc give its radius (analytic geometry), and a line
// gives no circle.
func TestFitCircleExact(t *testing.T) {
	for _, c := range []struct{ r, deg float64 }{{2.7, 20}, {5, 45}, {0.8, 120}} {
		f := fitCircle(arcPoints(c.r, c.deg, StationSpacing, 0, nil))
		if math.Abs(f.radius-c.r) > 1e-6*c.r || f.rms > 1e-6 {
			t.Errorf("arc r %g, %g deg: fitted r %.9f (rms %.2g)", c.r, c.deg, f.radius, f.rms)
		}
	}
	var line []mgl64.Vec3
	for i := range 40 {
		line = append(line, mgl64.Vec3{0.1, 0.2, 1}.Mul(float64(i)*0.05))
	}
	if f := fitCircle(line); !math.IsInf(f.radius, 1) {
		t.Errorf("a straight line fitted with a circle of radius %g", f.radius)
	}
}

// TestFitCircleNoise: on a short arc (1 mm on r 2.7, sagitta 0.046 mm) with noise of a tenth
// of the sagitta, the geometric fit stays within 2 % of the radius on average, where the
// algebraic fit alone is pulled further (geometric versus algebraic fits: Chernov N,
// Circular and linear regression, CRC Press 2010, ch. 5-7, from memory).
func TestFitCircleNoise(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	const r, trials = 2.7, 400
	var geo, alg float64
	for range trials {
		pts := arcPoints(r, mgl64.RadToDeg(1/r), StationSpacing, 0.0046, rng)
		geo += fitCircle(pts).radius / r
		_, _, ra, _ := kasa(inPlane(pts))
		alg += ra / r
	}
	geo, alg = geo/trials-1, alg/trials-1
	t.Logf("mean relative error: geometric %+.3f, algebraic %+.3f", geo, alg)
	if math.Abs(geo) > 0.02 {
		t.Errorf("geometric fit off by %+.1f %% on average", 100*geo)
	}
	if math.Abs(alg) <= math.Abs(geo) {
		t.Errorf("algebraic fit (%+.3f) no worse than the geometric one (%+.3f): the comment above is wrong", alg, geo)
	}
}

// TestTightestBendShortArc: on the exact line of a short tight arc (1 mm on r 2.7 between
// straight parts) and of a tight arc running into a wider one out of its plane, the tightest
// bend reads its radius within 3 % (analytic geometry: the exact arc), and the bands hold it
// and the arc's middle.
func TestTightestBendShortArc(t *testing.T) {
	for _, c := range []struct {
		name, segs string
		r          float64
	}{
		{"short arc", `{"kind":"straight","length":8},{"kind":"arc","radius":2.7,"angle":21.2},{"kind":"straight","length":4}`, 2.7},
		{"out of plane", `{"kind":"straight","length":8},{"kind":"arc","radius":3,"angle":25},{"kind":"arc","radius":4,"angle":30,"plane_turn":90},{"kind":"straight","length":3}`, 3},
		{"long arc", `{"kind":"straight","length":6},{"kind":"arc","radius":7,"angle":55},{"kind":"straight","length":2}`, 7},
	} {
		t.Run(c.name, func(t *testing.T) {
			spec := specJSON(t, c.segs, 1.2, 0.3, 0)
			pts, _, _ := spec.Centerline(StationSpacing)
			line := NewCenterline(pts, StationSpacing, 0.3, 0, math.Inf(1), 0.5, 0.5)
			m := Measure(line, 0.02)
			if rel := math.Abs(m.MaxCurvatureR-c.r) / c.r; rel > 0.03 {
				t.Errorf("radius %.3f mm, want %g (%.1f %%)", m.MaxCurvatureR, c.r, 100*rel)
			}
			if r := m.RadiusRange; !(r[0] <= c.r && c.r <= r[1]) {
				t.Errorf("band %.3f-%.3f mm misses %g", r[0], r[1], c.r)
			}
			from, to, _, _ := spec.TightestArc()
			if mid := (from + to) / 2; !(m.SRange[0] <= mid && mid <= m.SRange[1]) {
				t.Errorf("place band %.2f-%.2f misses the arc's middle %.2f", m.SRange[0], m.SRange[1], mid)
			}
			t.Logf("%s", fmt.Sprintf("R %.3f in %.3f-%.3f, s* %.2f in %.2f-%.2f", m.MaxCurvatureR, m.RadiusRange[0], m.RadiusRange[1], m.MaxCurvatureS, m.SRange[0], m.SRange[1]))
		})
	}
}

// TestBendBandShortBend: the band's growth on a bend short against the resolution follows
// its model (analytic geometry). An arc whose middle is pushed off by d = lineError * tol
// (a smooth bump, as a wander of the sections' centres over the whole bend would) changes its
// sagitta by d; the band around the circle fitted to the pushed points still holds the true
// curvature, while the fixed 6 % alone would not; and a long bend keeps the 6 %.
func TestBendBandShortBend(t *testing.T) {
	const r, tol = 3.0, 0.05 // a 0.1 mm voxel
	d := lineError * tol
	for _, length := range []float64{1.0, 1.25} {
		for _, sign := range []float64{-1, 1} {
			pts := arcPoints(r, mgl64.RadToDeg(length/r), StationSpacing, 0, nil)
			centre := pts[0].Add(pts[len(pts)-1]).Mul(0.5)
			mid := pts[len(pts)/2]
			out := mid.Sub(centre).Normalize() // toward the outside of the bend's chord
			for i := range pts {
				u := 2*float64(i)/float64(len(pts)-1) - 1
				pts[i] = pts[i].Add(out.Mul(sign * d * (1 - u*u)))
			}
			k := 1 / fitCircle(pts).radius
			lo, hi := bendBand(k, length, tol, k, k)
			if 1/r < lo || 1/r > hi {
				t.Errorf("L %g, bump %+.4f mm: band 1/k %.3f-%.3f misses r %g", length, sign*d, 1/hi, 1/lo, r)
			}
			if f := math.Abs(k*r - 1); f <= bendSpread {
				t.Errorf("L %g, bump %+.4f mm: the bump moved the fit by only %.1f %%, the test shows nothing", length, sign*d, 100*f)
			}
		}
	}
	k := 1 / r
	lo, hi := bendBand(k, 8, tol, k, k)
	if hi/k-1 > bendSpread+0.005 || 1-lo/k > bendSpread+0.005 {
		t.Errorf("an 8 mm bend: band %.3f-%.3f of k, want about +-%.0f %%", lo/k, hi/k, 100*bendSpread)
	}
}
