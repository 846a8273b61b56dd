package analysis

import (
	"fmt"
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// TestSchneiderCarriedEnds checks Schneider's construction (Oral Surg Oral Med Oral Pathol
// 1971;32:271) on a line whose ends were carried straight to the wall as the extraction does
// beyond the stretch it measured: the first 2.5 mm along a tangent tilted by 3 degrees (an
// oblique access cut), the last 1.5 mm along the tangent of the arc, which in truth turns
// for another 0.5 mm before its straight apical part. The exact angle is that of the
// construction on the exact line (analytic geometry); the measured angle must lie within 3
// degrees of it and the band must hold it.
func TestSchneiderCarriedEnds(t *testing.T) {
	for _, tc := range []struct {
		r, angle float64
		turn     float64 // the carried orifice piece's tilt, about the line's own axis
	}{{4, 40, 0}, {3, 30, 90}, {6, 45, 200}} {
		spec := specJSON(t, jsonSegments(tc.r, tc.angle), 1, 0.3, 0)
		exact, _, _ := spec.Centerline(StationSpacing)
		want := spec.SchneiderAngle()
		L := spec.Length()
		n := len(exact)
		pts := append([]mgl64.Vec3{}, exact...)
		// Orifice: carried back from 2.5 mm along a tangent tilted by 3 degrees.
		head := int(math.Round(2.5 / StationSpacing))
		tilt := mgl64.QuatRotate(mgl64.DegToRad(3), mgl64.Vec3{math.Cos(mgl64.DegToRad(tc.turn)), math.Sin(mgl64.DegToRad(tc.turn)), 0})
		back := tilt.Rotate(exact[head].Sub(exact[head+1]).Normalize())
		for i := 0; i < head; i++ {
			pts[i] = exact[head].Add(back.Mul(float64(head-i) * StationSpacing))
		}
		// Apical end: carried from 1.5 mm before it along the tangent there.
		edge := n - 1 - int(math.Round(1.5/StationSpacing))
		fwd := exact[edge].Sub(exact[edge-1]).Normalize()
		for i := edge + 1; i < n; i++ {
			pts[i] = exact[edge].Add(fwd.Mul(float64(i-edge) * StationSpacing))
		}
		c := NewCenterline(pts, StationSpacing, 0.3, 2.5, L-1.5, 1, 0.5)
		m := Measure(c, 0.02)
		b := m.SchneiderRange
		if math.Abs(m.SchneiderDeg-want) > 3 || want < b[0] || want > b[1] {
			t.Errorf("r %g mm, %g deg: Schneider %.2f in [%.2f, %.2f], exact %.2f", tc.r, tc.angle, m.SchneiderDeg, b[0], b[1], want)
		}
		t.Logf("r %g mm, %g deg: Schneider %.2f in [%.2f, %.2f], exact %.2f, departure %.2f mm", tc.r, tc.angle, m.SchneiderDeg, b[0], b[1], want, m.DepartureS)
	}
}

// jsonSegments is a canal of 6 mm straight, one arc, and a straight apical part of 1 mm.
func jsonSegments(r, angle float64) string {
	return fmt.Sprintf(`{"kind":"straight","length":6},{"kind":"arc","radius":%g,"angle":%g},{"kind":"straight","length":1}`, r, angle)
}
