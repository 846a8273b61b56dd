package analysis

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/models"
)

// specJSON builds a canal spec from segments with the given diameters.
func specJSON(t testing.TB, segments string, orificeD, apicalD, oval float64) *models.CanalSpec {
	t.Helper()
	ov := ""
	if oval > 0 {
		ov = fmt.Sprintf(`, "oval": %g`, oval)
	}
	js := fmt.Sprintf(`{"name": "test canal", "segments": [%s], "orifice_d": %g, "apical_d": %g%s}`, segments, orificeD, apicalD, ov)
	spec, err := models.ParseCanalSpec("test.json", []byte(js))
	if err != nil {
		t.Fatalf("spec: %v", err)
	}
	return spec
}

// exactLine is the spec's own centerline with its exact curvature, for Schneider's
// construction and s* on the true geometry.
func exactLine(spec *models.CanalSpec) *Centerline {
	pts, _, _ := spec.Centerline(StationSpacing)
	c := NewCenterline(pts, StationSpacing, 0.1, 0, math.Inf(1), 0, 0)
	for i, s := range c.S {
		c.K[i] = spec.Curvature(s)
	}
	return c
}

// distanceToPolyline is the distance from p to the nearest point of the polyline.
func distanceToPolyline(p mgl64.Vec3, line []mgl64.Vec3) float64 {
	best := math.Inf(1)
	for i := 0; i+1 < len(line); i++ {
		a, b := line[i], line[i+1]
		ab := b.Sub(a)
		t := math.Max(0, math.Min(1, p.Sub(a).Dot(ab)/ab.Dot(ab)))
		best = math.Min(best, p.Sub(a.Add(ab.Mul(t))).Len())
	}
	return best
}

type lineCase struct {
	name     string
	segments string
	oval     float64
	radius   float64 // radius of the tightest arc (0: straight)
}

var parametricCases = []lineCase{
	{"straight", `{"kind":"straight","length":16}`, 0, 0},
	{"20deg r3", `{"kind":"straight","length":9},{"kind":"arc","radius":3,"angle":20},{"kind":"straight","length":4}`, 0, 3},
	{"45deg r5", `{"kind":"straight","length":9},{"kind":"arc","radius":5,"angle":45},{"kind":"straight","length":3}`, 0, 5},
	{"70deg r10", `{"kind":"straight","length":6},{"kind":"arc","radius":10,"angle":70}`, 0, 10},
	{"60deg r3 at the end", `{"kind":"straight","length":10},{"kind":"arc","radius":3,"angle":60}`, 0, 3},
	{"s-curve", `{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":40},{"kind":"arc","radius":8,"angle":20,"plane_turn":180},{"kind":"straight","length":2}`, 0, 5},
	{"3d curve", `{"kind":"straight","length":7},{"kind":"arc","radius":6,"angle":35},{"kind":"arc","radius":4,"angle":30,"plane_turn":90},{"kind":"straight","length":2}`, 0, 4},
	{"oval 45deg r5", `{"kind":"straight","length":9},{"kind":"arc","radius":5,"angle":45},{"kind":"straight","length":3}`, 1.4, 5},
	{"90deg r2", `{"kind":"straight","length":8},{"kind":"arc","radius":2,"angle":90},{"kind":"straight","length":3}`, 0, 2},
}

// TestParametricCenterline checks extraction against the exact centerline of parametric
// canals. Tolerances are the issue's: 0.05 mm away from the last 0.5 mm at each end, ends within
// 0.3 mm, length within 1 %, radius at s* within 10 %, Schneider within 2 degrees. The
// reference is analytic geometry (straight lines and circular arcs) and Schneider's
// construction (Oral Surg Oral Med Oral Pathol 1971;32:271) applied to the exact line.
func TestParametricCenterline(t *testing.T) {
	for _, tc := range parametricCases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			spec := specJSON(t, tc.segments, 1.0, 0.3, tc.oval)
			c, err := CanalFromSpec(context.Background(), tc.name, spec, CanalOptions{})
			if err != nil {
				t.Fatal(err)
			}
			radiusTol := 0.10
			if tc.radius <= 2 {
				radiusTol = 0.20 // the issue allows 20 % on a 2 mm radius
			}
			checkAgainstExact(t, c, spec, 0.05, radiusTol, 2)
		})
	}
}

func checkAgainstExact(t *testing.T, c *Canal, spec *models.CanalSpec, tol, radiusTol, schneiderTol float64) {
	t.Helper()
	exact := c.Exact
	L := spec.Length()
	worst := 0.0
	for i, p := range c.Line.Points {
		if s := c.Line.S[i]; s < 0.5 || s > c.Line.Length()-0.5 {
			continue
		}
		worst = math.Max(worst, distanceToPolyline(p, exact))
	}
	if worst > tol {
		t.Errorf("centerline strays %.3f mm from the exact one (limit %.3f)", worst, tol)
	}
	if d := c.Line.Points[0].Sub(exact[0]).Len(); d > 0.3 {
		t.Errorf("orifice end %.3f mm from the exact one (limit 0.3)", d)
	}
	if d := c.Line.Points[c.Line.Len()-1].Sub(exact[len(exact)-1]).Len(); d > 0.3 {
		t.Errorf("apical end %.3f mm from the exact one (limit 0.3)", d)
	}
	if rel := math.Abs(c.Line.Length()-L) / L; rel > 0.01 {
		t.Errorf("length %.3f mm against %.3f exact (%.2f%%, limit 1%%)", c.Line.Length(), L, 100*rel)
	}
	ex := Measure(exactLine(spec), 0.005)
	m := c.Measures
	if math.IsInf(ex.MaxCurvatureR, 1) {
		if !math.IsInf(m.MaxCurvatureR, 1) && m.MaxCurvatureR < 50 {
			t.Errorf("straight canal measured with a radius of %.2f mm", m.MaxCurvatureR)
		}
	} else if rel := math.Abs(m.MaxCurvatureR-ex.MaxCurvatureR) / ex.MaxCurvatureR; rel > radiusTol {
		t.Errorf("radius at s* %.3f mm against %.3f exact (%.1f%%, limit %.0f%%)", m.MaxCurvatureR, ex.MaxCurvatureR, 100*rel, 100*radiusTol)
	}
	if d := math.Abs(m.SchneiderDeg - ex.SchneiderDeg); d > schneiderTol {
		t.Errorf("Schneider angle %.2f deg against %.2f on the exact line (limit %.0f)", m.SchneiderDeg, ex.SchneiderDeg, schneiderTol)
	}
	t.Logf("worst %.4f mm, length %.3f/%.3f, R* %.3f/%.3f, Schneider %.2f/%.2f, arc %.2f mm %.1f deg",
		worst, c.Line.Length(), L, m.MaxCurvatureR, ex.MaxCurvatureR, m.SchneiderDeg, ex.SchneiderDeg, m.ArcRadius, m.ArcAngleDeg)
}

// TestSchneiderConstruction checks the construction itself on exact arcs: an arc of angle a
// ending at the foramen gives a/2, and with a straight apical part the angle of the chord from
// the arc's start to the apical end (geometry of Schneider's construction, references.md).
func TestSchneiderConstruction(t *testing.T) {
	for _, a := range []float64{20, 40, 70} {
		spec := specJSON(t, fmt.Sprintf(`{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":%g}`, a), 1, 0.3, 0)
		m := Measure(exactLine(spec), 0.005)
		if d := math.Abs(m.SchneiderDeg - a/2); d > 0.3 {
			t.Errorf("arc of %g deg at the foramen: Schneider %.2f, want %.2f", a, m.SchneiderDeg, a/2)
		}
	}
	// Straight apical part of 3 mm after a 45 degree arc on 5 mm: chord from the arc's start.
	R, a, tail := 5.0, mgl64.DegToRad(45), 3.0
	x := R*(1-math.Cos(a)) + tail*math.Sin(a)
	z := R*math.Sin(a) + tail*math.Cos(a)
	want := mgl64.RadToDeg(math.Atan2(x, z))
	spec := specJSON(t, `{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":45},{"kind":"straight","length":3}`, 1, 0.3, 0)
	m := Measure(exactLine(spec), 0.005)
	if d := math.Abs(m.SchneiderDeg - want); d > 0.3 {
		t.Errorf("arc with straight tail: Schneider %.2f, want %.2f", m.SchneiderDeg, want)
	}
	if math.Abs(m.ArcRadius-5) > 0.05 || math.Abs(m.ArcAngleDeg-45) > 2 {
		t.Errorf("fitted arc %.3f mm %.1f deg, want 5 mm 45 deg", m.ArcRadius, m.ArcAngleDeg)
	}
}

// TestFramesInnerSide checks theta = 0 points to the inner side of the main curve: at s* the
// centre of curvature of an arc in the xz plane bending toward +x lies toward +x (DEVELOPERS.md,
// "How the centerline is found"), and the frame stays orthonormal along the line.
func TestFramesInnerSide(t *testing.T) {
	spec := specJSON(t, `{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":45},{"kind":"straight","length":3}`, 1, 0.3, 0)
	c := exactLine(spec)
	star := c.peakStation()
	p := c.Points[star]
	// The arc starts at (0,0,-8) bending toward +x: its centre is (5, 0, -8).
	toCentre := mgl64.Vec3{5, 0, -8}.Sub(p).Normalize()
	if d := c.N1[star].Dot(toCentre); d < 0.999 {
		t.Errorf("N1 at s* is %v, want toward the centre of curvature %v", c.N1[star], toCentre)
	}
	for i := range c.Points {
		if math.Abs(c.N1[i].Dot(c.T[i])) > 1e-6 || math.Abs(c.N1[i].Len()-1) > 1e-6 {
			t.Fatalf("frame not orthonormal at station %d", i)
		}
	}
}

// TestScanLikeCenterline checks extraction on canals that look like a segmented scan
// (voxelised at 0.08-0.1 mm, surface extracted, vertex noise 0.015 mm) against the exact
// centerline they came from: within one voxel, radius at s* within 20 %, Schneider within
// 3 degrees (analytic geometry; Schneider 1971 construction on the exact line).
func TestScanLikeCenterline(t *testing.T) {
	cases := []struct {
		lineCase
		voxel float64
	}{
		{parametricCases[2], 0.08},
		{parametricCases[6], 0.1},
		{parametricCases[7], 0.08},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			spec := specJSON(t, tc.segments, 1.2, 0.4, tc.oval)
			m, err := models.ScanLike(spec, tc.voxel, 0.015, 7)
			if err != nil {
				t.Fatal(err)
			}
			c, err := NewCanal(context.Background(), tc.name, m, CanalOptions{})
			if err != nil {
				t.Fatal(err)
			}
			c.Exact, _, _ = spec.Centerline(StationSpacing)
			checkAgainstExact(t, c, spec, tc.voxel, 0.20, 3)
		})
	}
}
