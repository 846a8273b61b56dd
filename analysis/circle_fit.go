package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// circleFit is a circle fitted to the points of a nearly planar stretch of line.
type circleFit struct {
	radius float64 // mm; +Inf when the points lie on a line as far as the fit can tell
	// rms is the root mean square distance of the points from the circle, mm.
	rms float64
}

// fitCircle fits a circle to points of a nearly planar curve by least squares on their
// distances from it (the geometric fit): the best plane by the smallest principal axis, an
// algebraic (Kasa) fit in that plane to start, then Gauss-Newton steps on the distances. The
// algebraic fit alone pulls a short, noisy arc toward a smaller circle (Chernov N, Circular
// and linear regression, CRC Press 2010, ch. 5); the geometric fit does not, to first order
// in the noise.
func fitCircle(pts []mgl64.Vec3) circleFit {
	none := circleFit{radius: math.Inf(1)}
	if len(pts) < 3 {
		return none
	}
	xs, ys := inPlane(pts)
	cx, cy, r, ok := kasa(xs, ys)
	if !ok {
		return none
	}
	// The stretch's own size: a circle a thousand times wider is a straight line to the fit.
	span := math.Hypot(xs[0]-xs[len(xs)-1], ys[0]-ys[len(ys)-1])
	for it := 0; it < 50; it++ {
		var a mgl64.Mat3
		var g mgl64.Vec3
		for i := range xs {
			dx, dy := xs[i]-cx, ys[i]-cy
			d := math.Hypot(dx, dy)
			if d == 0 {
				continue
			}
			j := mgl64.Vec3{-dx / d, -dy / d, -1}
			res := d - r
			a = a.Add(outer(j, j))
			g = g.Add(j.Mul(res))
		}
		if math.Abs(a.Det()) < 1e-30 {
			break
		}
		step := a.Inv().Mul3x1(g)
		cx, cy, r = cx-step[0], cy-step[1], r-step[2]
		if r <= 0 || r > 1000*math.Max(span, 1e-3) {
			return none
		}
		if step.Len() < 1e-12*r {
			break
		}
	}
	sum := 0.0
	for i := range xs {
		d := math.Hypot(xs[i]-cx, ys[i]-cy) - r
		sum += d * d
	}
	return circleFit{radius: r, rms: math.Sqrt(sum / float64(len(xs)))}
}

// kasa is the algebraic circle fit x^2 + y^2 + D x + E y + F = 0 by least squares.
func kasa(xs, ys []float64) (cx, cy, r float64, ok bool) {
	var sxx, sxy, syy, sx, sy, sxz, syz, sz, cnt float64
	for i := range xs {
		x, y := xs[i], ys[i]
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
		return 0, 0, 0, false
	}
	sol := a.Inv().Mul3x1(mgl64.Vec3{-sxz, -syz, -sz})
	cx, cy = -sol[0]/2, -sol[1]/2
	r2 := cx*cx + cy*cy - sol[2]
	if r2 <= 0 {
		return 0, 0, 0, false
	}
	return cx, cy, math.Sqrt(r2), true
}

// inPlane gives the coordinates of points in their best plane (the two largest principal
// axes about their mean).
func inPlane(pts []mgl64.Vec3) (xs, ys []float64) {
	var mean mgl64.Vec3
	for _, p := range pts {
		mean = mean.Add(p)
	}
	mean = mean.Mul(1 / float64(len(pts)))
	var cov mgl64.Mat3
	for _, p := range pts {
		cov = cov.Add(outer(p.Sub(mean), p.Sub(mean)))
	}
	e1, e2 := planeAxes(cov)
	xs = make([]float64, len(pts))
	ys = make([]float64, len(pts))
	for i, p := range pts {
		d := p.Sub(mean)
		xs[i], ys[i] = d.Dot(e1), d.Dot(e2)
	}
	return xs, ys
}
