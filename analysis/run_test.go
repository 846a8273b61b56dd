package analysis

import (
	"context"
	"fmt"
	"math"
	"testing"

	"tapersweep/models"
)

func canalFor(t testing.TB, segments string, orificeD, apicalD float64) *Canal {
	t.Helper()
	c, err := CanalFromSpec(context.Background(), "test", specJSON(t, segments, orificeD, apicalD, 0), CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func sequenceFor(t testing.TB, steps string) *models.Sequence {
	t.Helper()
	seq, err := models.ParseSequence("test-sequence.json", []byte(`{"steps": [`+steps+`]}`))
	if err != nil {
		t.Fatal(err)
	}
	return seq
}

func runFor(t testing.TB, c *Canal, steps string, opt RunOptions) *Result {
	t.Helper()
	res, err := Run(context.Background(), c, sequenceFor(t, steps), opt)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func within(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.5f, want %.5f within %.1f%%", what, got, want, 100*rel)
	} else {
		t.Logf("%s = %.5f (analytic %.5f)", what, got, want)
	}
}

// integrate is the composite Simpson rule over [a, b] with n (even) intervals.
func integrate(f func(float64) float64, a, b float64, n int) float64 {
	h := (b - a) / float64(n)
	sum := f(a) + f(b)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		sum += w * f(a+float64(i)*h)
	}
	return sum * h / 3
}

// TestSecondFileEngagesSixMillimetres: in a straight canal narrower than both files, a 25/.06
// taken to D and then a 25/.04 taken to D+2 engages from its tip to where the two cones cross,
// 6.0 mm from its tip (centred tapers: (0.25 + 0.04u) = (0.25 + 0.06(u - 2)) at u = 6; common
// practice of the trade, geometry of ISO 3630-1 diameters). Engaged area and removed volume
// equal the integrals of the two cones within 1 %.
func TestSecondFileEngagesSixMillimetres(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":20}`, 0.2, 0.2)
	D := 12.0
	steps := fmt.Sprintf(`{"size":25,"taper":0.06,"depth":%g},{"size":25,"taper":0.04,"depth":%g}`, D, D+2)
	// The geometric answer needs a contact threshold near zero.
	res := runFor(t, c, steps, RunOptions{ContactThreshold: 1e-7})
	m := res.Steps[1].Metrics
	if math.Abs(m.EngagedLengthMM-6.0) > StationSpacing+1e-9 {
		t.Errorf("second file engaged over %.3f mm, want 6.0 +/- %.2f", m.EngagedLengthMM, StationSpacing)
	}
	r2 := func(u float64) float64 { return (0.25 + 0.04*u) / 2 }
	r1 := func(u float64) float64 { return (0.25 + 0.06*(u-2)) / 2 }
	rho := c.MeanRadius(c.Line.Station(D + 1)) // the canal's own radius as meshed
	area := integrate(func(u float64) float64 { return 2 * math.Pi * r2(u) }, 0, 6, 600)
	vol := integrate(func(u float64) float64 { return math.Pi * (r2(u)*r2(u) - rho*rho) }, 0, 2, 200) +
		integrate(func(u float64) float64 { return math.Pi * (r2(u)*r2(u) - r1(u)*r1(u)) }, 2, 6, 400)
	within(t, "engaged area mm2", m.EngagedAreaMM2, area, 0.01)
	within(t, "removed volume mm3", m.RemovedVolumeMM3, vol, 0.01)

	// With the default threshold of 0.005 mm the zone ends where the cut is that deep:
	// 0.06 - 0.01u = 0.005 at u = 5.5 (the same geometry).
	res = runFor(t, c, steps, RunOptions{})
	if got := res.Steps[1].Metrics.EngagedLengthMM; math.Abs(got-5.5) > StationSpacing+1e-9 {
		t.Errorf("with the default threshold the second file engaged over %.3f mm, want 5.5", got)
	}
}

// TestCurvedOneSidedEngagement: on a curved canal whose wall is close on the inner side of the
// bend only, the engaged area and removed volume equal the integrals with the metric factor of
// a surface about a curved axis, dA = r (1 - k r cos theta) dtheta ds (differential geometry
// of tubes; DEVELOPERS.md, "The model in code"), within 2 %. Without the factor the area would be off by about 2kr/pi.
func TestCurvedOneSidedEngagement(t *testing.T) {
	R := 3.0
	base := canalFor(t, fmt.Sprintf(`{"kind":"straight","length":8},{"kind":"arc","radius":%g,"angle":60},{"kind":"straight","length":3}`, R), 1.2, 1.2)
	c := *base
	// Wall at 0.1 mm on the inner half over 1.5 mm of the arc, far everywhere else.
	s0, s1 := 8.6, 10.1
	c.Rho = make([]float32, len(base.Rho))
	for i := 0; i < c.Line.Len(); i++ {
		for j := 0; j < c.Angles; j++ {
			th := 2 * math.Pi * float64(j) / float64(c.Angles)
			v := float32(2.0)
			if s := c.Line.S[i]; s >= s0 && s <= s1 && math.Cos(th) > 0 {
				v = 0.1
			}
			c.Rho[i*c.Angles+j] = v
		}
	}
	D := 11.0
	res := runFor(t, &c, fmt.Sprintf(`{"size":40,"taper":0.06,"depth":%g}`, D), RunOptions{ContactThreshold: 1e-7})
	m := res.Steps[0].Metrics
	k := 1 / R
	r := func(s float64) float64 { return (0.40 + 0.06*(D-s)) / 2 }
	// Over theta in (-pi/2, pi/2): int cos = 2, so dA/ds = r (pi - 2 k r) and
	// dV/ds = pi (r^2 - rho^2)/2 - 2k (r^3 - rho^3)/3.
	rho := 0.1
	area := integrate(func(s float64) float64 { return r(s) * (math.Pi - 2*k*r(s)) }, s0, s1, 300)
	vol := integrate(func(s float64) float64 {
		return math.Pi*(r(s)*r(s)-rho*rho)/2 - 2*k*(math.Pow(r(s), 3)-rho*rho*rho)/3
	}, s0, s1, 300)
	within(t, "one-sided engaged area mm2", m.EngagedAreaMM2, area, 0.02)
	within(t, "one-sided removed volume mm3", m.RemovedVolumeMM3, vol, 0.02)
	naive := integrate(func(s float64) float64 { return r(s) * math.Pi }, s0, s1, 300)
	if math.Abs(naive-area)/area < 0.04 {
		t.Fatalf("test too weak: the metric factor changes the area by only %.1f%%", 100*math.Abs(naive-area)/area)
	}
}

// TestStrainAtMaxCurvature: a round wire of d = 0.5 mm on R = 5 mm has an outer-fibre strain of
// d/(2R) = 5.0 % (beam theory, Gere & Timoshenko); the file is placed so that its diameter at
// s* is 0.5 mm. Within 2 %.
func TestStrainAtMaxCurvature(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":45},{"kind":"straight","length":3}`, 1.2, 0.4)
	sStar := c.Measures.MaxCurvatureS
	// 30/.08: d = 0.30 + 0.08u = 0.5 at u = 2.5.
	D := sStar + 2.5
	res := runFor(t, c, fmt.Sprintf(`{"size":30,"taper":0.08,"depth":%g}`, D), RunOptions{})
	m := res.Steps[0].Metrics
	if m.DiameterAtMaxCurvatureMM == nil || math.Abs(*m.DiameterAtMaxCurvatureMM-0.5) > 0.001 {
		t.Fatalf("diameter at s* = %v, want 0.5", m.DiameterAtMaxCurvatureMM)
	}
	within(t, "strain at s* (%)", *m.StrainAtMaxCurvaturePct, 5.0, 0.02)
}

// TestShankDoesNotCut: past the cutting length (16 mm from the tip for ISO files, ISO 3630-1,
// or the instrument's stated cutting length) the body has no flutes: in a straight canal
// narrower than the whole file it is in contact but cuts nothing. The engaged zone ends at the
// cutting length, the engaged area and removed volume are the integrals of the fluted cone alone
// (within 1 %), the shank's contact is reported apart and the wall it touches stays as it was.
func TestShankDoesNotCut(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":24}`, 0.2, 0.2)
	rho := c.MeanRadius(c.Line.Station(10))
	for _, tc := range []struct {
		step    string
		cutting float64
	}{
		{`{"size":25,"taper":0.02,"depth":20}`, 16},
		{`{"size":25,"taper":0.02,"depth":20,"cutting_length":12}`, 12},
	} {
		res := runFor(t, c, tc.step, RunOptions{ContactThreshold: 1e-7})
		st := res.Steps[0]
		m := st.Metrics
		if got := m.EngagedFromTipMM[1]; math.Abs(got-tc.cutting) > StationSpacing+1e-9 {
			t.Errorf("%s: engaged up to %.3f mm from the tip, want the cutting length %.0f", tc.step, got, tc.cutting)
		}
		if want := 20 - tc.cutting; math.Abs(m.ShankContactMM-want) > 2*StationSpacing+1e-9 {
			t.Errorf("%s: shank contact over %.3f mm, want %.2f", tc.step, m.ShankContactMM, want)
		}
		r := func(u float64) float64 { return (0.25 + 0.02*u) / 2 }
		area := integrate(func(u float64) float64 { return 2 * math.Pi * r(u) }, 0, tc.cutting, 800)
		vol := integrate(func(u float64) float64 { return math.Pi * (r(u)*r(u) - rho*rho) }, 0, tc.cutting, 800)
		within(t, "engaged area of the flutes mm2", m.EngagedAreaMM2, area, 0.01)
		within(t, "volume removed by the flutes mm3", m.RemovedVolumeMM3, vol, 0.01)
		shankEnd := c.Line.Station(20-tc.cutting) - 1
		for i := 0; i < shankEnd*c.Angles; i++ {
			if st.Prepared[i] != st.Before[i] || st.Cut[i] != 0 {
				t.Fatalf("%s: the shank cut the wall at station %d", tc.step, i/c.Angles)
			}
		}
	}
}

// TestUntouchedWallShare: in a straight round canal (0.2 mm across, 20 mm to working length) a
// file wider than the canal everywhere it reaches cuts the whole wall above its tip: taken to
// 10 mm it leaves half the wall untouched, and a second one taken to working length leaves none
// (the wall of a cylinder is proportional to its length; analytic geometry).
func TestUntouchedWallShare(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":20}`, 0.2, 0.2)
	res := runFor(t, c, `{"size":25,"taper":0.02,"depth":10},{"size":30,"taper":0.02,"depth":"WL"}`, RunOptions{})
	first, second := res.Steps[0].Metrics.UntouchedWallPct, res.Steps[1].Metrics.UntouchedWallPct
	if math.Abs(first-50) > 1 || second > 1 {
		t.Errorf("untouched wall %.2f %% after the first file (want 50) and %.2f %% after the second (want 0)", first, second)
	}
}
