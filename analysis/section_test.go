package analysis

import (
	"fmt"
	"math"
	"testing"
)

// circleOffset is the distance from the origin to a circle of radius b whose centre lies e from
// the origin toward phi, along the direction theta (analytic geometry: the law of cosines
// solved for the far intersection, valid while e < b).
func circleOffset(b, e, phi, theta float64) float64 {
	c := math.Cos(theta - phi)
	s := math.Sin(theta - phi)
	return e*c + math.Sqrt(b*b-e*e*s*s)
}

// TestSectionCircleOffsetInCircle: a round canal of radius a prepared by a round file of radius b
// whose axis lies e off the canal's toward phi (b >= a + e, so the file's circle holds the
// canal's). By analytic geometry the removed area is pi (b² - a²), the outline's centroid moves
// by e toward phi, and Gambill's transportation, (m1 - m2) - (d1 - d2) on opposite sides
// (Gambill JM et al., J Endod 1996;22:369-375), is the difference of the wall removed on the two
// sides, (e + b - a) - (b - e - a) = 2e, toward phi.
func TestSectionCircleOffsetInCircle(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":12}`, 0.6, 0.6)
	a := c.MeanRadius(c.Line.Station(6))
	const b, e = 0.42, 0.07
	for _, phiDeg := range []float64{0, 30, 200} {
		phi := phiDeg * math.Pi / 180
		prepared := make([]float32, len(c.Rho))
		for i := 0; i < c.Line.Len(); i++ {
			for j := 0; j < c.Angles; j++ {
				th := 2 * math.Pi * float64(j) / float64(c.Angles)
				prepared[i*c.Angles+j] = float32(math.Max(float64(c.Rho[i*c.Angles+j]), circleOffset(b, e, phi, th)))
			}
		}
		st := &StepResult{Number: 1, Before: c.Rho, Prepared: prepared, TipDepth: 0}
		res := &Result{Canal: c, Steps: []*StepResult{st}}
		sec, err := SectionAt(c, res, 1, 6)
		if err != nil {
			t.Fatal(err)
		}
		name := fmt.Sprintf("phi %g°", phiDeg)
		// The canal as meshed is a 96-gon of mean radius a; the file's circle holds it whole.
		within(t, name+": scanned area", sec.ScannedAreaMM2, math.Pi*a*a, 1e-3)
		within(t, name+": removed area", sec.RemovedMM2, math.Pi*b*b-sec.ScannedAreaMM2, 1e-4)
		within(t, name+": transportation", sec.TransportationMM, 2*e, 1e-6)
		if d := math.Remainder(sec.TowardDeg-phiDeg, 360); math.Abs(d) > 0.01 {
			t.Errorf("%s: transportation toward %.4f°, want %g°", name, sec.TowardDeg, phiDeg)
		}
		x0, y0 := sec.Before.Centroid()
		x1, y1 := sec.After.Centroid()
		within(t, name+": centroid shift", math.Hypot(x1-x0, y1-y0), e, 1e-3)
		// The inner and outer sides lose b-e-a and b+e-a: no ratio of 1 unless e = 0.
		if phiDeg == 0 {
			if sec.CenteringRatio == nil {
				t.Fatalf("%s: no centring ratio", name)
			}
			inner, outer := sec.Before.R[0], sec.Before.R[c.Angles/2]
			within(t, name+": centring ratio", *sec.CenteringRatio, (b-e-outer)/(b+e-inner), 1e-6)
		}
	}
}

// TestSectionOfCentredFile: a centred 25/.06 taken to 10 mm in a straight canal narrower than it
// removes, at each level it reaches, the ring between the canal and the file's circle of the ISO
// 3630-1 diameter d = 0.25 + 0.06 u; the file's section is that circle on the centerline and the
// wall moves evenly (no transportation, centring ratio 1).
func TestSectionOfCentredFile(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":14}`, 0.3, 0.3)
	res := runFor(t, c, `{"size":25,"taper":0.06,"depth":10}`, RunOptions{ContactThreshold: 1e-7})
	L := c.Line.Length()
	for _, level := range []float64{L - 9, L - 6, L - 2} {
		sec, err := SectionAt(c, res, 1, level)
		if err != nil {
			t.Fatal(err)
		}
		u := 10 - (L - level)
		r := (0.25 + 0.06*u) / 2
		if sec.File == nil {
			t.Fatalf("%.2f mm from the apical end: no file section", level)
		}
		within(t, "file radius", sec.File.RadiusMM, r, 1e-9)
		if math.Hypot(sec.File.X, sec.File.Y) > 1e-12 {
			t.Errorf("centred file off the centerline by (%g, %g)", sec.File.X, sec.File.Y)
		}
		a2 := sec.Before.Area()
		within(t, "removed area", sec.RemovedMM2, math.Pi*r*r-a2, 2e-3)
		if sec.TransportationMM > 1e-4 {
			t.Errorf("centred file in a round canal transports %.5f mm", sec.TransportationMM)
		}
		if sec.CenteringRatio == nil || math.Abs(*sec.CenteringRatio-1) > 1e-3 {
			t.Errorf("centring ratio %v, want 1", sec.CenteringRatio)
		}
	}
	// Beyond the tip the file has no section and nothing is removed.
	sec, err := SectionAt(c, res, 1, 1)
	if err != nil {
		t.Fatal(err)
	}
	if sec.File != nil || sec.RemovedMM2 != 0 {
		t.Errorf("1 mm from the apical end, below the tip: file %v, removed %g mm²", sec.File, sec.RemovedMM2)
	}
	// The level's transportation is the step's own figure at 1, 3 and 5 mm.
	for _, x := range SectionLevels {
		sec, _ := SectionAt(c, res, 1, x)
		if got, want := round(sec.TransportationMM, 4), res.Steps[0].Metrics.TransportationMM[fmt.Sprint(x)]; got != want {
			t.Errorf("%g mm: section transportation %g, step's %g", x, got, want)
		}
	}
}

func TestSectionRefusesOutsideLevels(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":8}`, 0.6, 0.3)
	for _, x := range []float64{-0.1, 8.5, math.NaN()} {
		if _, err := SectionAt(c, nil, 0, x); err == nil {
			t.Errorf("level %g: no error", x)
		}
	}
	if _, err := SectionAt(c, nil, 2, 3); err == nil {
		t.Error("step 2 without a run: no error")
	}
	sec, err := SectionAt(c, nil, 0, 3)
	if err != nil || sec.File != nil || len(sec.Scanned.R) != c.Angles {
		t.Errorf("canal alone: %v, %+v", err, sec)
	}
}
