package analysis

import (
	"math"
	"testing"
)

// TestGambillWorkedExample: m1 = 1.0, m2 = 0.8 (0.2 mm taken off one side), d1 = 1.2, d2 = 1.1
// (0.1 mm off the other): transportation (m1-m2)-(d1-d2) = 0.1 mm toward the first side, centring
// ratio 0.1/0.2 = 0.5 (Gambill, Alder, del Rio, J Endod 1996;22:369; from memory).
func TestGambillWorkedExample(t *testing.T) {
	tr, r := Gambill(1.0, 0.8, 1.2, 1.1)
	if math.Abs(tr-0.1) > 1e-12 || r == nil || math.Abs(*r-0.5) > 1e-12 {
		t.Errorf("transportation %.4f, ratio %v; want 0.1 and 0.5", tr, r)
	}
	if tr, r := Gambill(1, 0.9, 1, 0.9); tr != 0 || *r != 1 {
		t.Errorf("even removal: transportation %v, ratio %v; want 0 and 1", tr, *r)
	}
	if _, r := Gambill(1, 1, 1, 1); r != nil {
		t.Error("nothing removed: the ratio should not exist")
	}
}

// shiftedCircle fills a radius map with the distance from the centerline to a circle of radius
// R centred off the centerline by (d1, d2) in the frame: the reach of a round file off axis,
// the far side of the offset circle (analytic geometry).
func shiftedCircle(c *Canal, R, d1, d2 float64) []float32 {
	m := make([]float32, c.Line.Len()*c.Angles)
	for i := 0; i < c.Line.Len(); i++ {
		for j := 0; j < c.Angles; j++ {
			th := 2 * math.Pi * float64(j) / float64(c.Angles)
			p := d1*math.Cos(th) + d2*math.Sin(th)
			q2 := d1*d1 + d2*d2 - p*p
			m[i*c.Angles+j] = float32(p + math.Sqrt(R*R-q2))
		}
	}
	return m
}

// TestTransportDirection: a round canal of radius 0.2 mm prepared by a round file of radius 0.3
// mm whose axis sits 0.05 mm off the canal's, toward a given side. By Gambill's definition
// (Gambill, Alder, del Rio 1996) the transportation along the line of the shift is the wall
// removed on that side less the other, (0.35 - 0.2) - (0.25 - 0.2) = 0.1 mm, twice the 0.05 mm
// shift of the centre (analytic geometry); its sign says the side (+ toward the inner side of
// the main curve in the plane, + toward 90 degrees across it), toward_deg says it as an angle in
// [0, 360), and the centring ratio along the shift is 0.05/0.15 = 0.333, whatever the ratio in
// the other plane (which reads 1.000 here: that plane lost wall evenly).
func TestTransportDirection(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":40},{"kind":"straight","length":4}`, 0.4, 0.4)
	from := shiftedCircle(c, 0.2, 0, 0)
	const shift = 0.05
	for _, tc := range []struct {
		deg              float64
		inPlane, across  float64
		ratioOtherPlane  string
		wantTowardDegree float64
	}{
		{0, 0.1, 0, "across", 0},
		{180, -0.1, 0, "across", 180},
		{90, 0, 0.1, "in plane", 90},
		{270, 0, -0.1, "in plane", 270},
		{-0.02, 0.1, 0, "across", 0}, // rounds to 360.0: stated as 0
	} {
		th := tc.deg * math.Pi / 180
		to := shiftedCircle(c, 0.3, shift*math.Cos(th), shift*math.Sin(th))
		tr := transportBetween(c, from, to)
		for _, key := range []string{"1", "3", "5"} {
			in, ac := tr.TransportationInPlaneMM[key], tr.TransportationAcrossMM[key]
			if math.Abs(in-tc.inPlane) > 0.002 || math.Abs(ac-tc.across) > 0.002 {
				t.Errorf("shift toward %g deg at %s mm: in plane %.4f, across %.4f; want %.3f, %.3f", tc.deg, key, in, ac, tc.inPlane, tc.across)
			}
			if got := tr.TransportationMM[key]; math.Abs(got-2*tr.CentreShiftMM[key]) > 0.002 || math.Abs(tr.CentreShiftMM[key]-shift) > 0.001 {
				t.Errorf("shift toward %g deg at %s mm: transportation %.4f, centre shift %.4f; want 0.1 and 0.05", tc.deg, key, got, tr.CentreShiftMM[key])
			}
			along, other := tr.CenteringRatio[key], tr.CenteringRatioAcross[key]
			if tc.ratioOtherPlane == "in plane" {
				other = tr.CenteringRatioInPlane[key]
			}
			if other == nil || math.Abs(*other-1) > 0.01 {
				t.Errorf("shift toward %g deg: the %s ratio %v should read 1 (even removal in that plane)", tc.deg, tc.ratioOtherPlane, other)
			}
			if along == nil || math.Abs(*along-1.0/3) > 0.01 {
				t.Errorf("shift toward %g deg at %s mm: centring ratio along the shift %v, want 0.333", tc.deg, key, along)
			}
		}
		if got := tr.Largest.TowardDeg; got != tc.wantTowardDegree {
			t.Errorf("shift toward %g deg: toward_deg %g, want %g", tc.deg, got, tc.wantTowardDegree)
		}
	}
}
