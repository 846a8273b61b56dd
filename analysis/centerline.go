package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// Station spacing along every centerline, mm.
const StationSpacing = 0.05

// Centerline is a canal's axis sampled every DS mm from the orifice (s = 0) to the apical end,
// with unit tangents, curvature and a frame carried by parallel transport. N1 points to the
// centre of curvature at the point of greatest curvature, so theta = 0 (along N1) is the inner
// side of the main curve; theta turns right-handed about the tangent.
type Centerline struct {
	Points []mgl64.Vec3
	S      []float64
	T      []mgl64.Vec3
	N1, N2 []mgl64.Vec3
	K      []float64 // curvature, 1/mm
	// KN1, KN2 are the curvature vector dT/ds in the frame: the wall at angle theta lies on the
	// inner side of the local bend where KN1 cos(theta) + KN2 sin(theta) > 0.
	KN1, KN2 []float64
	DS       float64
	window   int // half-width of the curvature fit, in stations
}

// Length is the arc length from the orifice to the apical end.
func (c *Centerline) Length() float64 { return c.S[len(c.S)-1] }

// Len is the number of stations.
func (c *Centerline) Len() int { return len(c.Points) }

// Station returns the index of the station nearest to arc length s (clamped).
func (c *Centerline) Station(s float64) int {
	i := int(math.Round(s / c.DS))
	return max(0, min(i, len(c.S)-1))
}

// At interpolates position and frame at arc length s (clamped to the line).
func (c *Centerline) At(s float64) (p, t, n1, n2 mgl64.Vec3) {
	s = math.Max(0, math.Min(s, c.Length()))
	i := min(int(s/c.DS), len(c.S)-2)
	f := (s - c.S[i]) / (c.S[i+1] - c.S[i])
	mix := func(a, b mgl64.Vec3) mgl64.Vec3 { return a.Mul(1 - f).Add(b.Mul(f)) }
	p = mix(c.Points[i], c.Points[i+1])
	t = mix(c.T[i], c.T[i+1]).Normalize()
	n1 = mix(c.N1[i], c.N1[i+1])
	n1 = n1.Sub(t.Mul(n1.Dot(t))).Normalize()
	n2 = t.Cross(n1)
	return
}

// curvatureWindow is the half-width, in mm, of the local fit that gives tangents and curvature.
// It is wide enough to calm voxel noise of a scan and narrow enough to keep the peak of a
// 20 degree curve on a 3 mm radius (about 1 mm of arc).
func curvatureWindow(noiseScale float64) float64 {
	return math.Max(0.3, 5*noiseScale)
}

// NewCenterline builds a centerline from points already spaced ds apart (the last step may be
// shorter): tangents and curvature from a local quadratic fit of half-width window mm, frames
// transported both ways from the point of greatest curvature. Curvature is trusted only between
// trustFrom and trustTo (mm of arc length): beyond, where an end was carried straight to the
// wall, each end keeps the curvature found at its edge of the trusted stretch.
func NewCenterline(pts []mgl64.Vec3, ds, window, trustFrom, trustTo float64) *Centerline {
	c := &Centerline{Points: pts, S: arcLengths(pts), DS: ds}
	// A first wide fit finds the main curve; the final fit is as wide as a sixth of that
	// curved stretch allows (so its peak holds) and no narrower than the noise asks for. A wide
	// fit calms the facets of a mesh and the steps of a voxelised scan.
	c.fit(math.Max(window, 1.0), trustFrom, trustTo)
	w := window
	if lo, hi := c.peakStretch(0.5); c.K[(lo+hi)/2] > straightCurvature {
		w = math.Max(window, math.Min((c.S[hi]-c.S[lo])/6, 1.0))
		// A "curve" that hardly turns the canal is noise: fit as wide as for a long curve.
		a, b := max(0, lo-c.window), min(len(c.T)-1, hi+c.window)
		if turn := math.Acos(math.Max(-1, math.Min(1, c.T[a].Dot(c.T[b])))); turn < mgl64.DegToRad(minCurveDeg) {
			w = math.Max(window, 1.0)
		}
	}
	d2 := c.fit(w, trustFrom, trustTo)
	c.frames(d2)
	return c
}

// fit sets tangents and curvature from a local quadratic fit of half-width window mm and
// returns the second derivatives.
func (c *Centerline) fit(window, trustFrom, trustTo float64) []mgl64.Vec3 {
	m := max(1, int(math.Round(window/c.DS)))
	c.window = m
	d1, d2 := derivatives(c.Points, c.DS, m)
	c.T, c.K = curvatureOf(d1, d2)
	lo := c.Station(trustFrom + window)
	hi := c.Station(trustTo - window)
	if lo < hi {
		for i := 0; i < lo; i++ {
			c.K[i], d2[i] = c.K[lo], d2[lo]
		}
		for i := hi + 1; i < len(c.K); i++ {
			c.K[i], d2[i] = c.K[hi], d2[hi]
		}
	}
	return d2
}

// frames sets N1, N2 by parallel transport from the station of greatest curvature, where N1
// points to the centre of curvature.
func (c *Centerline) frames(d2 []mgl64.Vec3) {
	n := len(c.Points)
	c.N1 = make([]mgl64.Vec3, n)
	c.N2 = make([]mgl64.Vec3, n)
	peak := c.peakStation()
	t := c.T[peak]
	var n1 mgl64.Vec3
	if c.K[peak] > 1e-6 {
		n1 = d2[peak].Sub(t.Mul(d2[peak].Dot(t)))
	}
	if n1.Len() < 1e-9 {
		n1 = anyPerpendicular(t)
	}
	c.N1[peak] = n1.Normalize()
	for i := peak + 1; i < n; i++ {
		c.N1[i] = transport(c.N1[i-1], c.T[i-1], c.T[i])
	}
	for i := peak - 1; i >= 0; i-- {
		c.N1[i] = transport(c.N1[i+1], c.T[i+1], c.T[i])
	}
	c.KN1 = make([]float64, n)
	c.KN2 = make([]float64, n)
	for i := range c.N1 {
		c.N2[i] = c.T[i].Cross(c.N1[i])
		kv := d2[i].Sub(c.T[i].Mul(d2[i].Dot(c.T[i])))
		if l := kv.Len(); l > 0 {
			kv = kv.Mul(c.K[i] / l)
		}
		c.KN1[i], c.KN2[i] = kv.Dot(c.N1[i]), kv.Dot(c.N2[i])
	}
}

// peakStation is s*: the centre of the stretch around the curvature peak where k >= 0.95 k_max.
func (c *Centerline) peakStation() int {
	lo, hi := c.peakStretch(0.95)
	return (lo + hi) / 2
}

// peakStretch returns the contiguous stations around the highest curvature where k >= frac k_max.
func (c *Centerline) peakStretch(frac float64) (lo, hi int) {
	arg := 0
	for i, k := range c.K {
		if k > c.K[arg] {
			arg = i
		}
	}
	lim := frac * c.K[arg]
	lo, hi = arg, arg
	for lo > 0 && c.K[lo-1] >= lim {
		lo--
	}
	for hi < len(c.K)-1 && c.K[hi+1] >= lim {
		hi++
	}
	return lo, hi
}
