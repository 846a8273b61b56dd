package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// arcLengths returns the cumulative length along pts, starting at 0.
func arcLengths(pts []mgl64.Vec3) []float64 {
	s := make([]float64, len(pts))
	for i := 1; i < len(pts); i++ {
		s[i] = s[i-1] + pts[i].Sub(pts[i-1]).Len()
	}
	return s
}

// resample places points every ds along the polyline from its start; the last point is the
// polyline's end, so the final step may be shorter than ds.
func resample(pts []mgl64.Vec3, ds float64) []mgl64.Vec3 {
	if len(pts) < 2 {
		return append([]mgl64.Vec3(nil), pts...)
	}
	s := arcLengths(pts)
	total := s[len(s)-1]
	n := int(math.Floor(total/ds + 1e-9))
	out := make([]mgl64.Vec3, 0, n+2)
	seg := 0
	for i := 0; i <= n; i++ {
		target := float64(i) * ds
		for seg < len(pts)-2 && s[seg+1] < target {
			seg++
		}
		out = append(out, lerpAt(pts, s, seg, target))
	}
	if total-float64(n)*ds > ds*1e-6 {
		out = append(out, pts[len(pts)-1])
	}
	return out
}

func lerpAt(pts []mgl64.Vec3, s []float64, seg int, target float64) mgl64.Vec3 {
	l := s[seg+1] - s[seg]
	if l <= 0 {
		return pts[seg]
	}
	t := (target - s[seg]) / l
	return pts[seg].Add(pts[seg+1].Sub(pts[seg]).Mul(t))
}

// smoothGaussian smooths a polyline sampled evenly along its length with a Gaussian of the
// given width (in samples). Ends are held: near an end the kernel is cut symmetrically so the
// line neither shrinks nor drifts there.
func smoothGaussian(pts []mgl64.Vec3, sigma float64) []mgl64.Vec3 {
	if sigma <= 0 || len(pts) < 3 {
		return append([]mgl64.Vec3(nil), pts...)
	}
	half := int(math.Ceil(3 * sigma))
	w := make([]float64, half+1)
	for j := range w {
		w[j] = math.Exp(-0.5 * float64(j*j) / (sigma * sigma))
	}
	n := len(pts)
	out := make([]mgl64.Vec3, n)
	for i := range pts {
		m := min(half, i, n-1-i)
		var acc mgl64.Vec3
		var sum float64
		for j := -m; j <= m; j++ {
			wj := w[abs(j)]
			acc = acc.Add(pts[i+j].Mul(wj))
			sum += wj
		}
		out[i] = acc.Mul(1 / sum)
	}
	return out
}

func abs(j int) int {
	if j < 0 {
		return -j
	}
	return j
}

// derivatives fits a quadratic to each coordinate over a window of half-width m samples
// (Savitzky-Golay) and returns the first and second derivatives with respect to arc length,
// for samples spaced ds. Near the ends the window shrinks to stay symmetric.
func derivatives(pts []mgl64.Vec3, ds float64, m int) (d1, d2 []mgl64.Vec3) {
	n := len(pts)
	d1 = make([]mgl64.Vec3, n)
	d2 = make([]mgl64.Vec3, n)
	// The weights depend on the window's half-width alone: made once for each.
	weights := make([]sgWeights, m+1)
	for i := range pts {
		h := min(m, i, n-1-i)
		if h < 1 {
			continue
		}
		if weights[h].first == nil {
			weights[h] = newSGWeights(h)
		}
		d1[i], d2[i] = weights[h].at(pts, ds, i)
	}
	// Ends: carry the nearest fitted value outward.
	for i := 0; i < n; i++ {
		if d1[i].Len() > 0 {
			for j := 0; j < i; j++ {
				d1[j], d2[j] = d1[i], d2[i]
			}
			break
		}
	}
	for i := n - 1; i >= 0; i-- {
		if d1[i].Len() > 0 {
			for j := i + 1; j < n; j++ {
				d1[j], d2[j] = d1[i], d2[i]
			}
			break
		}
	}
	return d1, d2
}

// derivativesAt is the fit of derivatives at one point i (zero where the window has no
// point on either side).
func derivativesAt(pts []mgl64.Vec3, ds float64, m, i int) (d1, d2 mgl64.Vec3) {
	h := min(m, i, len(pts)-1-i)
	if h < 1 {
		return d1, d2
	}
	return newSGWeights(h).at(pts, ds, i)
}

// sgWeights are the weights of the quadratic fit over a window of half-width h, for offsets
// j = -h..h: j/s2 for the first derivative, (j^2 - mean2)/den2 for the second.
type sgWeights struct {
	first, second []float64
}

func newSGWeights(h int) sgWeights {
	var s2, s4 float64
	for j := -h; j <= h; j++ {
		s2 += float64(j * j)
		s4 += float64(j * j * j * j)
	}
	cnt := float64(2*h + 1)
	mean2 := s2 / cnt
	den2 := s4 - cnt*mean2*mean2
	w := sgWeights{first: make([]float64, 2*h+1), second: make([]float64, 2*h+1)}
	for j := -h; j <= h; j++ {
		w.first[j+h] = float64(j) / s2
		w.second[j+h] = (float64(j*j) - mean2) / den2
	}
	return w
}

// at is the fit at point i, whose window of half-width h lies within pts. The sums are the
// Vec3 arithmetic (a = a.Add(p.Mul(w))) written out per coordinate, the same numbers.
func (w sgWeights) at(pts []mgl64.Vec3, ds float64, i int) (d1, d2 mgl64.Vec3) {
	h := len(w.first) / 2
	var a0, a1, a2, b0, b1, b2 float64
	for j, p := range pts[i-h : i+h+1] {
		x, y := w.first[j], w.second[j]
		a0, a1, a2 = a0+p[0]*x, a1+p[1]*x, a2+p[2]*x
		b0, b1, b2 = b0+p[0]*y, b1+p[1]*y, b2+p[2]*y
	}
	sa, sb := 1/ds, 2/(ds*ds)
	return mgl64.Vec3{a0 * sa, a1 * sa, a2 * sa}, mgl64.Vec3{b0 * sb, b1 * sb, b2 * sb}
}

// curvatureOf returns unit tangents and curvature from first and second derivatives.
func curvatureOf(d1, d2 []mgl64.Vec3) (t []mgl64.Vec3, k []float64) {
	t = make([]mgl64.Vec3, len(d1))
	k = make([]float64, len(d1))
	for i := range d1 {
		l := d1[i].Len()
		if l == 0 {
			t[i] = mgl64.Vec3{0, 0, -1}
			continue
		}
		t[i] = d1[i].Mul(1 / l)
		k[i] = d1[i].Cross(d2[i]).Len() / (l * l * l)
	}
	return t, k
}

// anyPerpendicular returns a unit vector perpendicular to unit vector t.
func anyPerpendicular(t mgl64.Vec3) mgl64.Vec3 {
	ref := mgl64.Vec3{1, 0, 0}
	if math.Abs(t[0]) > 0.9 {
		ref = mgl64.Vec3{0, 1, 0}
	}
	return ref.Sub(t.Mul(ref.Dot(t))).Normalize()
}

// transport carries the unit normal n from tangent a to tangent b by the rotation that takes
// a to b (parallel transport along one step).
func transport(n, a, b mgl64.Vec3) mgl64.Vec3 {
	axis := a.Cross(b)
	sin := axis.Len()
	cos := a.Dot(b)
	if sin < 1e-12 {
		return n
	}
	axis = axis.Mul(1 / sin)
	// Rodrigues' rotation formula.
	r := n.Mul(cos).Add(axis.Cross(n).Mul(sin)).Add(axis.Mul(axis.Dot(n) * (1 - cos)))
	r = r.Sub(b.Mul(r.Dot(b)))
	return r.Normalize()
}
