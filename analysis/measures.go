package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// Curvature measures of a canal as the trade states them.
type Measures struct {
	Length        float64 // mm, orifice to apical end along the centerline
	MaxCurvatureS float64 // s*, mm from the orifice
	MaxCurvatureR float64 // 1/k at s*, mm; +Inf for a straight canal
	SchneiderDeg  float64
	DepartureS    float64 // where the canal leaves its coronal axis (k > k_max/3), mm
	ArcRadius     float64 // circle fitted where k > k_max/2, mm; +Inf when straight
	ArcAngleDeg   float64
}

// straightCurvature is the curvature below which a canal counts as straight (radius over 1 m).
const straightCurvature = 1e-3

// minCurveDeg is the smallest turn that counts as a curve.
const minCurveDeg = 2.0

// Measure computes s*, the Schneider angle and the fitted arc of a centerline.
func Measure(c *Centerline) Measures {
	m := Measures{Length: c.Length(), MaxCurvatureR: math.Inf(1), ArcRadius: math.Inf(1)}
	star := c.peakStation()
	m.MaxCurvatureS = c.S[star]
	kmax := c.K[star]
	if kmax > straightCurvature {
		m.MaxCurvatureR = 1 / kmax
	}
	m.DepartureS, m.SchneiderDeg = schneider(c)
	if kmax > straightCurvature {
		lo, hi := c.peakStretch(0.5)
		m.ArcRadius, _ = fitArc(c.Points[lo : hi+1])
		// The arc's angle is the turn of the tangent over the stretch: exact for a planar arc
		// and near zero for a wiggle, where a fitted circle's sweep could be anything.
		// Tangents are read one fit window beyond the stretch, where a blurred curvature has
		// faded, so the whole turn is counted.
		a, b := max(0, lo-c.window), min(len(c.T)-1, hi+c.window)
		m.ArcAngleDeg = mgl64.RadToDeg(math.Acos(math.Max(-1, math.Min(1, c.T[a].Dot(c.T[b])))))
	}
	// A bend that turns the canal by less than a degree or two is a wiggle of the scan, not a
	// curve: the canal counts as straight (Schneider: straight up to 5 degrees).
	if m.ArcAngleDeg < minCurveDeg {
		m.MaxCurvatureR, m.ArcRadius, m.ArcAngleDeg = math.Inf(1), math.Inf(1), 0
	}
	return m
}

// schneider follows Schneider's construction (Oral Surg 1971;32:271): a line along the coronal
// straight part, a line from the apical end to the point where the canal leaves that axis,
// and the angle between them. The departure point is the first station from the orifice where
// the curvature exceeds a third of its peak.
func schneider(c *Centerline) (departure, deg float64) {
	n := len(c.Points)
	kmax := 0.0
	for _, k := range c.K {
		kmax = math.Max(kmax, k)
	}
	// Walk back from the peak of the main curve while the curvature stays above a third of
	// it: noise elsewhere along a scanned canal cannot move the departure point.
	dep := 0
	if kmax > straightCurvature {
		dep = c.peakStation()
		for dep > 0 && c.K[dep-1] > kmax/3 {
			dep--
		}
	}
	axis := c.T[0]
	if chord := c.Points[dep].Sub(c.Points[0]); chord.Len() > 1.0 {
		axis = chord.Normalize()
	}
	apical := c.Points[n-1].Sub(c.Points[dep])
	if apical.Len() < 1e-9 {
		return c.S[dep], 0
	}
	cos := axis.Dot(apical.Normalize())
	return c.S[dep], mgl64.RadToDeg(math.Acos(math.Max(-1, math.Min(1, cos))))
}

// fitArc fits a circle to points of a nearly planar curve: best plane by the smallest
// principal axis, then an algebraic (Kasa) circle fit in that plane. It returns the radius and
// the angle swept from the first to the last point about the centre, in degrees.
func fitArc(pts []mgl64.Vec3) (radius, angleDeg float64) {
	if len(pts) < 3 {
		return math.Inf(1), 0
	}
	var mean mgl64.Vec3
	for _, p := range pts {
		mean = mean.Add(p)
	}
	mean = mean.Mul(1 / float64(len(pts)))
	var cov mgl64.Mat3
	for _, p := range pts {
		d := p.Sub(mean)
		for r := 0; r < 3; r++ {
			for q := 0; q < 3; q++ {
				cov[q*3+r] += d[r] * d[q]
			}
		}
	}
	e1, e2 := planeAxes(cov)
	// Kasa fit: x^2 + y^2 + D x + E y + F = 0 by least squares.
	var sxx, sxy, syy, sx, sy, sxz, syz, sz, cnt float64
	for _, p := range pts {
		d := p.Sub(mean)
		x, y := d.Dot(e1), d.Dot(e2)
		z := x*x + y*y
		sxx += x * x
		sxy += x * y
		syy += y * y
		sx += x
		sy += y
		sxz += x * z
		syz += y * z
		sz += z
		cnt++
	}
	a := mgl64.Mat3{sxx, sxy, sx, sxy, syy, sy, sx, sy, cnt}
	if math.Abs(a.Det()) < 1e-18 {
		return math.Inf(1), 0
	}
	sol := a.Inv().Mul3x1(mgl64.Vec3{-sxz, -syz, -sz})
	cx, cy := -sol[0]/2, -sol[1]/2
	r2 := cx*cx + cy*cy - sol[2]
	if r2 <= 0 {
		return math.Inf(1), 0
	}
	var swept, prev float64
	for i, p := range pts {
		d := p.Sub(mean)
		ang := math.Atan2(d.Dot(e2)-cy, d.Dot(e1)-cx)
		if i > 0 {
			step := ang - prev
			for step > math.Pi {
				step -= 2 * math.Pi
			}
			for step < -math.Pi {
				step += 2 * math.Pi
			}
			swept += step
		}
		prev = ang
	}
	return math.Sqrt(r2), math.Abs(mgl64.RadToDeg(swept))
}

// planeAxes returns two orthonormal axes spanning the plane of the two largest principal
// directions of a symmetric 3x3 covariance, by power iteration with deflation.
func planeAxes(cov mgl64.Mat3) (e1, e2 mgl64.Vec3) {
	power := func(m mgl64.Mat3, start mgl64.Vec3) mgl64.Vec3 {
		v := start
		for it := 0; it < 100; it++ {
			w := m.Mul3x1(v)
			if w.Len() < 1e-30 {
				return start
			}
			v = w.Normalize()
		}
		return v
	}
	e1 = power(cov, mgl64.Vec3{0.577, 0.577, 0.577})
	l1 := e1.Dot(cov.Mul3x1(e1))
	defl := cov.Sub(outer(e1, e1).Mul(l1))
	e2 = power(defl, anyPerpendicular(e1))
	e2 = e2.Sub(e1.Mul(e2.Dot(e1))).Normalize()
	return e1, e2
}

func outer(a, b mgl64.Vec3) mgl64.Mat3 {
	var m mgl64.Mat3
	for r := 0; r < 3; r++ {
		for q := 0; q < 3; q++ {
			m[q*3+r] = a[r] * b[q]
		}
	}
	return m
}
