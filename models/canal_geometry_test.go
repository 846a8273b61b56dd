package models

import (
	"fmt"
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

func canalSpecOf(t *testing.T, orifice, apical, oval float64, segs string) *CanalSpec {
	t.Helper()
	data := fmt.Sprintf(`{"name": "test", "orifice_d": %g, "apical_d": %g, "oval": %g, "segments": [%s]}`, orifice, apical, oval, segs)
	if oval == 0 {
		data = fmt.Sprintf(`{"name": "test", "orifice_d": %g, "apical_d": %g, "segments": [%s]}`, orifice, apical, segs)
	}
	c, err := ParseCanalSpec("test.json", []byte(data))
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func canalNear(a, b mgl64.Vec3, tol float64) bool { return a.Sub(b).Len() <= tol }

func TestCanalLengthIsSumOfSegments(t *testing.T) {
	c := canalSpecOf(t, 1, 0.25, 0, `{"kind": "straight", "length": 8}, {"kind": "arc", "radius": 5, "angle": 40},
		{"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180}, {"kind": "straight", "length": 2}`)
	// Arc length = R * angle in radians (circle geometry).
	want := 8 + 5*40*math.Pi/180 + 8*20*math.Pi/180 + 2
	if got := c.Length(); math.Abs(got-want) > 1e-12 {
		t.Errorf("length %.15f, want %.15f", got, want)
	}
	_, _, s := c.Centerline(0.05)
	if s[0] != 0 || math.Abs(s[len(s)-1]-want) > 1e-12 {
		t.Errorf("stations run %g..%g, want 0..%g", s[0], s[len(s)-1], want)
	}
	for i := 1; i < len(s); i++ {
		if d := s[i] - s[i-1]; d > 0.05+1e-12 || d <= 0 {
			t.Fatalf("step %g at %d, want (0, 0.05]", d, i)
		}
	}
}

func TestCanalArcEndPointAndTangent(t *testing.T) {
	for _, tc := range []struct{ r, deg float64 }{{3, 20}, {5, 45}, {10, 70}, {2, 180}} {
		c := canalSpecOf(t, 1, 0.3, 0, fmt.Sprintf(`{"kind": "arc", "radius": %g, "angle": %g}`, tc.r, tc.deg))
		a := tc.deg * math.Pi / 180
		// A circle of radius R starting at the origin down -z, bending toward +x:
		// centre (R, 0, 0); end (R(1 - cos a), 0, -R sin a); tangent (sin a, 0, -cos a).
		centre := mgl64.Vec3{tc.r, 0, 0}
		pts, tans, _ := c.Centerline(0.1)
		end, tan := pts[len(pts)-1], tans[len(tans)-1]
		if want := (mgl64.Vec3{tc.r * (1 - math.Cos(a)), 0, -tc.r * math.Sin(a)}); !canalNear(end, want, 1e-12) {
			t.Errorf("R%g %g deg: end %v, want %v", tc.r, tc.deg, end, want)
		}
		if want := (mgl64.Vec3{math.Sin(a), 0, -math.Cos(a)}); !canalNear(tan, want, 1e-12) {
			t.Errorf("R%g %g deg: end tangent %v, want %v", tc.r, tc.deg, tan, want)
		}
		for i, p := range pts {
			if d := p.Sub(centre).Len(); math.Abs(d-tc.r) > 1e-12 {
				t.Fatalf("point %d at %g from the centre, want %g (exact circle)", i, d, tc.r)
			}
			if math.Abs(tans[i].Dot(p.Sub(centre))) > 1e-12 {
				t.Fatalf("tangent %d not perpendicular to the radius", i)
			}
		}
	}
}

func TestCanalPlaneTurn180IsAnSCurve(t *testing.T) {
	const r, deg = 5.0, 30.0
	c := canalSpecOf(t, 1, 0.3, 0, `{"kind": "straight", "length": 4}, {"kind": "arc", "radius": 5, "angle": 30},
		{"kind": "arc", "radius": 5, "angle": 30, "plane_turn": 180}`)
	pts, tans, _ := c.Centerline(0.05)
	for i, p := range pts {
		if math.Abs(p[1]) > 1e-12 {
			t.Fatalf("point %d leaves the xz plane: %v", i, p)
		}
	}
	// Two equal arcs bending opposite ways: point-symmetric about the inflection, so the
	// canal ends parallel to where it started, offset by 2R(1 - cos a) and 2R sin a down.
	a := deg * math.Pi / 180
	want := mgl64.Vec3{2 * r * (1 - math.Cos(a)), 0, -4 - 2*r*math.Sin(a)}
	if end := pts[len(pts)-1]; !canalNear(end, want, 1e-12) {
		t.Errorf("end %v, want %v", end, want)
	}
	if tan := tans[len(tans)-1]; !canalNear(tan, mgl64.Vec3{0, 0, -1}, 1e-12) {
		t.Errorf("end tangent %v, want (0,0,-1)", tan)
	}
}

func TestCanalPlaneTurn90LeavesThePlane(t *testing.T) {
	const r1, r2 = 5.0, 4.0
	a1, a2 := 30*math.Pi/180, 50*math.Pi/180
	c := canalSpecOf(t, 1, 0.3, 0, `{"kind": "arc", "radius": 5, "angle": 30},
		{"kind": "arc", "radius": 4, "angle": 50, "plane_turn": 90}`)
	// After the first arc: p1, tangent t1, and n1 toward its centre. A right-handed quarter
	// turn of n1 about t1 is t1 x n1 = (0, -1, 0): the second arc bends toward -y.
	p1 := mgl64.Vec3{r1 * (1 - math.Cos(a1)), 0, -r1 * math.Sin(a1)}
	t1 := mgl64.Vec3{math.Sin(a1), 0, -math.Cos(a1)}
	bend := mgl64.Vec3{0, -1, 0}
	want := p1.Add(t1.Mul(r2 * math.Sin(a2))).Add(bend.Mul(r2 * (1 - math.Cos(a2))))
	pts, tans, _ := c.Centerline(0.05)
	if end := pts[len(pts)-1]; !canalNear(end, want, 1e-12) {
		t.Errorf("end %v, want %v", end, want)
	}
	if tan, wantT := tans[len(tans)-1], t1.Mul(math.Cos(a2)).Add(bend.Mul(math.Sin(a2))); !canalNear(tan, wantT, 1e-12) {
		t.Errorf("end tangent %v, want %v", tan, wantT)
	}
	// The same quarter turn on the first arc turns +x about -z toward -y.
	c0 := canalSpecOf(t, 1, 0.3, 0, `{"kind": "arc", "radius": 5, "angle": 30, "plane_turn": 90}`)
	pts0, _, _ := c0.Centerline(0.1)
	if end, w := pts0[len(pts0)-1], (mgl64.Vec3{0, -r1 * (1 - math.Cos(a1)), -r1 * math.Sin(a1)}); !canalNear(end, w, 1e-12) {
		t.Errorf("first-arc quarter turn: end %v, want %v", end, w)
	}
}

func TestCanalCurvatureAndDiameter(t *testing.T) {
	c := canalSpecOf(t, 1.2, 0.3, 0, `{"kind": "straight", "length": 6}, {"kind": "arc", "radius": 4, "angle": 45},
		{"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180}, {"kind": "straight", "length": 2}`)
	l := c.Length()
	a1 := 4 * 45 * math.Pi / 180
	for _, tc := range []struct{ s, k float64 }{{1, 0}, {6.5, 0.25}, {6 + a1 + 0.5, 0.125}, {l - 0.5, 0}} {
		if got := c.Curvature(tc.s); got != tc.k {
			t.Errorf("curvature at %g: %g, want %g", tc.s, got, tc.k)
		}
	}
	// Discrete curvature of the sampled centerline (turning angle over arc length) agrees
	// with 1/R inside each arc (circle geometry).
	pts, tans, s := c.Centerline(0.02)
	for i := 1; i+1 < len(pts); i++ {
		k := math.Acos(min(1, tans[i-1].Dot(tans[i+1]))) / (s[i+1] - s[i-1])
		if want := c.Curvature(s[i]); c.Curvature(s[i-1]) == want && c.Curvature(s[i+1]) == want && math.Abs(k-want) > 1e-6 {
			t.Fatalf("discrete curvature %g at s=%g, want %g", k, s[i], want)
		}
	}
	// README, "Canal spec files": the diameter varies linearly from orifice_d to apical_d.
	for _, tc := range []struct{ s, d float64 }{{0, 1.2}, {l, 0.3}, {l / 2, 0.75}, {l / 3, 1.2 - 0.9/3}, {-1, 1.2}, {l + 1, 0.3}} {
		if got := c.Diameter(tc.s); math.Abs(got-tc.d) > 1e-12 {
			t.Errorf("diameter at %g: %g, want %g", tc.s, got, tc.d)
		}
	}
}

func TestCanalOvalAxisTransported(t *testing.T) {
	c := canalSpecOf(t, 1, 0.3, 1.5, `{"kind": "straight", "length": 3}, {"kind": "arc", "radius": 5, "angle": 40},
		{"kind": "arc", "radius": 4, "angle": 30, "plane_turn": 60}`)
	_, _, long0 := c.At(0)
	// Long axis across the plane of the first arc: its binormal, -y for a bend toward +x.
	if math.Abs(math.Abs(long0[1])-1) > 1e-12 {
		t.Errorf("long axis at the orifice %v, want +/-y", long0)
	}
	// Parallel transport keeps a unit vector normal to the tangent and does not spin it
	// about the tangent: d(long)/ds has no component along t x long (Bishop frame). A
	// frame that followed the curve's torsion would spin at the order of 0.1 rad/mm here;
	// the finite difference itself leaves about k^2 ds.
	const ds = 1e-4
	for s := 0.05; s < c.Length()-ds; s += 0.37 {
		_, ta, la := c.At(s)
		_, _, lb := c.At(s + ds)
		if math.Abs(la.Len()-1) > 1e-12 || math.Abs(la.Dot(ta)) > 1e-12 {
			t.Fatalf("long axis at %g: %v not a unit normal", s, la)
		}
		if spin := lb.Sub(la).Mul(1 / ds).Dot(ta.Cross(la)); math.Abs(spin) > 1e-4 {
			t.Fatalf("long axis spins at %g: %g rad/mm", s, spin)
		}
	}
}
