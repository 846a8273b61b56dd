package analysis

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/models"
)

// TestSpecEndsAreNotGuessed: a nearly uniform canal (orifice 1.6 mm, apical end 1.4 mm) keeps
// s = 0 at the spec's orifice. Analytic geometry: straight 3 mm, a 90 degree arc of 3 mm,
// straight 17 mm; the tightest bend is the arc, s* its middle at 3 + 3 pi/4 mm; Schneider's
// construction (Oral Surg Oral Med Oral Pathol 1971;32:271) from the arc's start (0, 0, -3)
// to the apical end (20, 0, -6) gives acos(3/sqrt(409)) = 81.47 degrees.
func TestSpecEndsAreNotGuessed(t *testing.T) {
	spec := specJSON(t, `{"kind":"straight","length":3},{"kind":"arc","radius":3,"angle":90},{"kind":"straight","length":17}`, 1.6, 1.4, 0)
	c, err := CanalFromSpec(context.Background(), "uniform", spec, CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m := c.Measures
	wantS := 3 + 3*math.Pi/4
	wantDeg := mgl64.RadToDeg(math.Acos(3 / math.Sqrt(409)))
	if math.Abs(spec.SchneiderAngle()-wantDeg) > 1e-9 {
		t.Fatalf("the spec's own Schneider angle %.4f, want %.4f", spec.SchneiderAngle(), wantDeg)
	}
	if d := c.Line.Points[0].Len(); d > 0.1 {
		t.Errorf("the line starts %.3f mm from the spec's orifice", d)
	}
	if math.Abs(m.MaxCurvatureS-wantS) > 0.6 {
		t.Errorf("s* %.2f mm, want %.2f (the middle of the arc)", m.MaxCurvatureS, wantS)
	}
	if math.Abs(m.MaxCurvatureR-3)/3 > 0.1 {
		t.Errorf("radius at s* %.2f mm, want 3", m.MaxCurvatureR)
	}
	if math.Abs(m.SchneiderDeg-wantDeg) > 2 {
		t.Errorf("Schneider %.2f deg, want %.2f", m.SchneiderDeg, wantDeg)
	}
	if r := m.RadiusRange; !(r[0] <= 3 && 3 <= r[1]) || !(m.SchneiderRange[0] <= wantDeg && wantDeg <= m.SchneiderRange[1]) {
		t.Errorf("bands r %v, Schneider %v miss 3 mm, %.2f deg", r, m.SchneiderRange, wantDeg)
	}
	for _, w := range c.Warnings {
		if strings.Contains(w, "--orifice") {
			t.Errorf("a spec states its ends, yet: %q", w)
		}
	}
	t.Logf("s* %.2f, R %.2f %v, Schneider %.2f %v", m.MaxCurvatureS, m.MaxCurvatureR, m.RadiusRange, m.SchneiderDeg, m.SchneiderRange)
}

// TestSpecEndsFileFractures: in the canal of TestSpecEndsAreNotGuessed, read the right way
// round, a 25/.02 taken to working length meets the 3 mm arc 18-19 mm from its tip, where it
// is about 0.62 mm across (ISO 3630-1 sizes and taper): an outer-fibre strain of d/(2R),
// about 10 % (beam theory), beyond the recoverable strain of the default alloy (7 %). The model
// must call it fractured; read the wrong way round, the arc met the thin tip and it did not.
func TestSpecEndsFileFractures(t *testing.T) {
	spec := specJSON(t, `{"kind":"straight","length":3},{"kind":"arc","radius":3,"angle":90},{"kind":"straight","length":17}`, 1.6, 1.4, 0)
	c, err := CanalFromSpec(context.Background(), "uniform", spec, CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	seq, err := models.ParseSequence("one file.json", []byte(`{"steps":[{"size":25,"taper":0.02,"depth":"WL"}]}`))
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), c, seq, RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	m := res.Steps[0].Metrics
	if m.StrainAtMaxCurvaturePct == nil || math.Abs(*m.StrainAtMaxCurvaturePct-10) > 1.5 {
		t.Errorf("strain at the tightest bend %v %%, want about 10", m.StrainAtMaxCurvaturePct)
	}
	if m.FractureTimeS == nil {
		t.Errorf("a 25/.02 through a 3 mm arc 18-19 mm from its tip does not fracture in the model (fatigue use %.3g)", m.FatigueDamage)
	}
}

// TestTwoCurveSpecs: 54 canals with a gentle coronal curve and a sharp apical one (straight 8,
// r 8 mm 20 deg, straight 2, r 3 mm 20-40 deg, a 0.5-2 mm tail, 0.9 -> 0.3 mm), whose plane
// of symmetry holds a row of voxel centres for some of them. None may fold back, report a
// branch, or miss the analytic answers: length (sum of the segments), the sharp arc's radius
// and place, and Schneider's construction from the gentle arc's start (Schneider 1971).
// Long: the whole set runs without -short, a third of it with.
func TestTwoCurveSpecs(t *testing.T) {
	n := 0
	for _, a := range []float64{20, 22.5, 25, 27.5, 30, 32.5, 35, 37.5, 40} {
		for _, tail := range []float64{0.5, 0.8, 1.1, 1.4, 1.7, 2.0} {
			n++
			if testing.Short() && n%3 != 0 {
				continue
			}
			t.Run(fmt.Sprintf("%g deg tail %g", a, tail), func(t *testing.T) {
				t.Parallel()
				spec := specJSON(t, fmt.Sprintf(`{"kind":"straight","length":8},{"kind":"arc","radius":8,"angle":20},{"kind":"straight","length":2},{"kind":"arc","radius":3,"angle":%g},{"kind":"straight","length":%g}`, a, tail), 0.9, 0.3, 0)
				c, err := CanalFromSpec(context.Background(), "two curves", spec, CanalOptions{})
				if err != nil {
					t.Fatal(err)
				}
				m := c.Measures
				from, to, r, _ := spec.TightestArc()
				if d := math.Abs(m.Length - spec.Length()); d > 0.1 {
					t.Errorf("length %.2f, want %.2f", m.Length, spec.Length())
				}
				if math.Abs(m.MaxCurvatureR-r)/r > 0.1 || m.MaxCurvatureS < from-0.6 || m.MaxCurvatureS > to+0.6 {
					t.Errorf("tightest bend r %.2f at %.2f, want r %g in [%.2f, %.2f]", m.MaxCurvatureR, m.MaxCurvatureS, r, from, to)
				}
				if want := spec.SchneiderAngle(); math.Abs(m.SchneiderDeg-want) > 2 {
					t.Errorf("Schneider %.2f, want %.2f", m.SchneiderDeg, want)
				}
				for _, w := range c.Warnings {
					if strings.Contains(w, "branch") || strings.Contains(w, "separate") {
						t.Errorf("false warning: %q", w)
					}
				}
			})
		}
	}
}

// TestDoubledSurfaceIsNamed: the same closed surface twice over encloses no point an odd
// number of times; the error says so instead of counting voxels.
func TestDoubledSurfaceIsNamed(t *testing.T) {
	m := specJSON(t, `{"kind":"straight","length":10}`, 1, 0.4, 0).Mesh(0.1, 48)
	n := len(m.Triangles)
	m.Triangles = append(m.Triangles, m.Triangles[:n]...)
	_, err := NewCanal(context.Background(), "doubled.stl", m, CanalOptions{})
	if err == nil || !strings.Contains(err.Error(), "same surface twice") {
		t.Errorf("doubled surface: %v", err)
	}
}

// TestNearlyUniformEndsWarn: an STL of a canal whose ends differ by under 15 % in width says
// which end it took and how to name the other.
func TestNearlyUniformEndsWarn(t *testing.T) {
	spec := specJSON(t, `{"kind":"straight","length":6},{"kind":"arc","radius":5,"angle":30},{"kind":"straight","length":4}`, 1.0, 0.9, 0)
	m, err := models.ScanLike(spec, 0.08, 0, 1)
	if err != nil {
		t.Fatal(err)
	}
	c, err := NewCanal(context.Background(), "uniform.stl", m, CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !endsAmbiguous(c.Warnings) {
		t.Errorf("no warning names --orifice: %q", c.Warnings)
	}
	// A tapered one does not.
	spec = specJSON(t, `{"kind":"straight","length":6},{"kind":"arc","radius":5,"angle":30},{"kind":"straight","length":4}`, 1.0, 0.4, 0)
	if m, err = models.ScanLike(spec, 0.08, 0, 1); err != nil {
		t.Fatal(err)
	}
	if c, err = NewCanal(context.Background(), "tapered.stl", m, CanalOptions{}); err != nil {
		t.Fatal(err)
	}
	if endsAmbiguous(c.Warnings) || c.Line.Points[0].Len() > 0.3 {
		t.Errorf("tapered canal: orifice at %v, warnings %q", c.Line.Points[0], c.Warnings)
	}
}

// TestMeasureWarnings: a wide band and a tightest bend next to an end are said in plain
// words; a narrow band in the middle of the canal says nothing.
func TestMeasureWarnings(t *testing.T) {
	quiet := Measures{Length: 16, MaxCurvatureS: 10, MaxCurvatureR: 3, RadiusRange: [2]float64{2.8, 3.2},
		SRange: [2]float64{9.5, 10.5}, SchneiderRange: [2]float64{30, 33}}
	if w := quiet.Warnings(); len(w) != 0 {
		t.Errorf("narrow bands: %q", w)
	}
	wide := quiet
	wide.RadiusRange = [2]float64{2.6, 3.6}
	wide.SchneiderRange = [2]float64{25, 36}
	wide.SRange = [2]float64{7, 11}
	got := strings.Join(wide.Warnings(), " | ")
	for _, want := range []string{"better than r 2.6-3.6 mm", "5.0-9.0 mm from the apical end", "25-36 degrees"} {
		if !strings.Contains(got, want) {
			t.Errorf("wide bands: %q lacks %q", got, want)
		}
	}
	straightish := quiet
	straightish.RadiusRange = [2]float64{2.5, math.Inf(1)}
	if got := strings.Join(straightish.Warnings(), " | "); !strings.Contains(got, "cannot tell the tightest bend") {
		t.Errorf("open band: %q", got)
	}
	near := quiet
	near.MaxCurvatureS = 15.4
	if got := strings.Join(near.Warnings(), " | "); !strings.Contains(got, "0.6 mm from the apical end") {
		t.Errorf("bend near the apical end: %q", got)
	}
}

// TestBendAtTheForamenWarns: an arc of 2 mm radius and 30 degrees ending at the foramen has its
// middle 0.52 mm from the apical end (analytic geometry): the canal says the tightest bend lies
// within 1 mm of the end.
func TestBendAtTheForamenWarns(t *testing.T) {
	spec := specJSON(t, `{"kind":"straight","length":10},{"kind":"arc","radius":2,"angle":30}`, 1.0, 0.4, 0)
	c, err := CanalFromSpec(context.Background(), "foramen", spec, CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(c.Warnings, " | "); !strings.Contains(got, "from the apical end, where the end of the scan") {
		t.Errorf("s* %.2f of %.2f mm: warnings %q", c.Measures.MaxCurvatureS, c.Measures.Length, got)
	}
}

// TestSchneiderGentleThenSharp: with a gentle coronal curve before a sharp apical one,
// Schneider's construction (Oral Surg Oral Med Oral Pathol 1971;32:271) departs where the
// canal first leaves its coronal axis, at the start of the gentle curve, not at the sharp
// one. Analytic geometry of the spec gives the angle (models.CanalSpec.SchneiderAngle).
func TestSchneiderGentleThenSharp(t *testing.T) {
	spec := specJSON(t, `{"kind":"straight","length":5},{"kind":"arc","radius":15,"angle":15},{"kind":"straight","length":3},{"kind":"arc","radius":3,"angle":40},{"kind":"straight","length":1}`, 1.2, 0.35, 0)
	c, err := CanalFromSpec(context.Background(), "gentle then sharp", spec, CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := spec.SchneiderAngle()
	m := c.Measures
	if math.Abs(m.SchneiderDeg-want) > 2 || math.Abs(m.DepartureS-5) > 0.5 {
		t.Errorf("Schneider %.2f deg departing at %.2f mm, want %.2f deg at 5 mm", m.SchneiderDeg, m.DepartureS, want)
	}
	t.Logf("Schneider %.2f (exact %.2f) in %v, departure %.2f", m.SchneiderDeg, want, m.SchneiderRange, m.DepartureS)
}

// TestSecondBendAsTight: an S-curve of two arcs of the same radius (analytic geometry: both
// are the tightest bend) is read with a second bend named, in the JSON summary and a warning;
// with the second arc twice as wide, nothing is named.
func TestSecondBendAsTight(t *testing.T) {
	for _, tc := range []struct {
		r2   float64
		want bool
	}{{4, true}, {8, false}} {
		segs := fmt.Sprintf(`{"kind":"straight","length":5},{"kind":"arc","radius":4,"angle":30},{"kind":"straight","length":3},{"kind":"arc","radius":%g,"angle":30,"plane_turn":180},{"kind":"straight","length":3}`, tc.r2)
		spec := specJSON(t, segs, 1.2, 0.4, 0)
		c, err := CanalFromSpec(context.Background(), "two bends", spec, CanalOptions{})
		if err != nil {
			t.Fatal(err)
		}
		m := c.Measures
		named := c.Summary(false).MaxCurvature.SecondBendSRangeMM
		warned := strings.Contains(strings.Join(c.Warnings, " | "), "a second bend")
		// The arcs run 5-7.09 and 10.09-12.18 mm from the orifice (30 degrees of r 4 mm).
		first, second := [2]float64{5, 7.09}, [2]float64{10.09, 12.18}
		holds := func(band [2]float64, arc [2]float64) bool { return band[0] <= arc[1] && band[1] >= arc[0] }
		switch {
		case tc.want && (named == nil || !warned || !holds(m.SRange, first) || !holds(m.SRange, second)):
			t.Errorf("equal arcs: second bend %v, warned %v, place band %v, warnings %q", named, warned, m.SRange, c.Warnings)
		case !tc.want && (named != nil || warned):
			t.Errorf("second arc r %g mm: second bend %v named, warnings %q", tc.r2, named, c.Warnings)
		}
		t.Logf("r2 %g: s* %.2f, place band %v, second bend %v", tc.r2, m.MaxCurvatureS, m.SRange, m.AsTight)
	}
}
