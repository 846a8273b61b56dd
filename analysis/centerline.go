package analysis

import (
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
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
	window   int        // half-width of the curvature fit, in stations
	fits     []scaleFit // the fits at every admissible half-width, narrowest first
	scale    int        // the one taken
	// zone holds the first and last station of the stretch the measures use: about one and a
	// half end radii at each end take no part (an end cap bends the sections there).
	zone [2]int
	// measured is the stretch (mm of arc length) the extraction found in the image; beyond it
	// each end was carried straight along its tangent to the wall, so there the line says
	// nothing about which way the canal runs.
	measured [2]float64
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
	px, py, pz, tx, ty, tz, nx, ny, nz := c.frameAt(s)
	p, t, n1 = mgl64.Vec3{px, py, pz}, mgl64.Vec3{tx, ty, tz}, mgl64.Vec3{nx, ny, nz}
	n2 = t.Cross(n1)
	return
}

// frameAt is At's point, tangent and first normal as plain numbers, which stay in registers
// where Vec3 values go through memory (placeVertices calls it for every wall vertex). The
// arithmetic is the Vec3 methods', operation for operation, so it rounds as they would:
// mix(a, b) = a.Mul(1 - f).Add(b.Mul(f)), t = mix(T).Normalize(),
// n1 = (m - t.Mul(m.Dot(t))).Normalize() with m = mix(N1).
func (c *Centerline) frameAt(s float64) (px, py, pz, tx, ty, tz, nx, ny, nz float64) {
	arc := c.S
	s = max(0, min(s, c.Length()))
	i := min(int(s/c.DS), len(arc)-2)
	f := (s - arc[i]) / (arc[i+1] - arc[i])
	g := 1 - f
	a, b := &c.Points[i], &c.Points[i+1]
	px, py, pz = a[0]*g+b[0]*f, a[1]*g+b[1]*f, a[2]*g+b[2]*f
	a, b = &c.T[i], &c.T[i+1]
	tx, ty, tz = a[0]*g+b[0]*f, a[1]*g+b[1]*f, a[2]*g+b[2]*f
	l := 1.0 / math.Sqrt(tx*tx+ty*ty+tz*tz)
	tx, ty, tz = tx*l, ty*l, tz*l
	a, b = &c.N1[i], &c.N1[i+1]
	nx, ny, nz = a[0]*g+b[0]*f, a[1]*g+b[1]*f, a[2]*g+b[2]*f
	dot := nx*tx + ny*ty + nz*tz
	nx, ny, nz = nx-tx*dot, ny-ty*dot, nz-tz*dot
	l = 1.0 / math.Sqrt(nx*nx+ny*ny+nz*nz)
	nx, ny, nz = nx*l, ny*l, nz*l
	return
}

// curvatureWindow is the narrowest half-width, in mm, of the local fit that gives tangents and
// curvature: twice the surface's own detail (about a scan's voxel), and no less than 0.3 mm;
// the line's measured wander decides how much wider the fit must be (see NewCenterline).
func curvatureWindow(noiseScale float64) float64 {
	return math.Max(0.3, 2*noiseScale)
}

// curvatureScales are the half-widths (mm) the curvature fit may take, narrowest first.
var curvatureScales = []float64{0.3, 0.4, 0.5, 0.6, 0.75, 0.9, 1.1, 1.3, 1.6}

// noiseReference is the half-width (mm) of the wide fit whose residual is taken as the
// line's own wander (the noise a scan leaves in it).
const noiseReference = 2.0

// Terms of the band on the tightest bend's curvature (see curvatureBand).
const (
	bandFloor = 0.03 // what the line's own making may shift it by, as a share
	bandBlur  = 0.2  // how much a fit as wide as the bend may flatten it, per window over width
)

// scaleFit is what the fit of one half-width finds along the measured stretch.
type scaleFit struct {
	window float64 // half-width, mm
	// noise is the curvature the line's wander alone puts into the fit (1/mm, root mean
	// square), already taken out of the curvature below.
	noise float64
	// peak is the mean curvature over the stretch around the greatest where it is within 10 %
	// of the greatest; width is the length of the stretch within 20 % (mm), stations from..to.
	peak, width float64
	from, to    int
	// atEdge: the stretch reaches an end of where the fit is read whole, so the peak may be
	// the rise into an end rather than a bend.
	atEdge bool
}

// NewCenterline builds a centerline from points already spaced ds apart (the last step may be
// shorter): tangents and curvature from a local quadratic fit, frames transported both ways
// from the point of greatest curvature.
//
// The fit's half-width is chosen from the line itself. The line is fitted at every
// half-width of curvatureScales from window mm up, the share of its wander (its residual
// from a wide fit, differentiated as the fit differentiates) taken out of each curvature
// (|k|^2 - noise^2, so noise does not inflate it), and the tightest bend's curvature read at
// each. Too narrow a fit follows the wander and too wide a one flattens the bend; between
// them the reading holds still. The two neighbouring half-widths where it changes least are
// taken (the wider no wider than one and a half times the bend), the narrower for the
// curvature along the line, their mean for the tightest bend.
//
// Curvature is trusted only between trustFrom and trustTo (mm of arc length): beyond, where
// an end was carried straight to the wall, each end keeps the curvature found at its edge of
// the trusted stretch. The end zones (zoneStart mm from the orifice, zoneEnd mm from the
// apical end) are trusted no more and take no part in the measures.
func NewCenterline(pts []mgl64.Vec3, ds, window, trustFrom, trustTo, zoneStart, zoneEnd float64) *Centerline {
	return newCenterline(pts, ds, window, trustFrom, trustTo, zoneStart, zoneEnd, 0)
}

// newCenterline is NewCenterline fitting its half-widths on workers goroutines (0: all cores).
func newCenterline(pts []mgl64.Vec3, ds, window, trustFrom, trustTo, zoneStart, zoneEnd float64, workers int) *Centerline {
	c := &Centerline{Points: pts, S: arcLengths(pts), DS: ds, measured: [2]float64{trustFrom, trustTo}}
	c.setZone(zoneStart, zoneEnd)
	c.fits = c.scaleFits(window, workers)
	c.scale = steadiestScale(c.fits)
	w := c.fits[c.scale].window
	c.zone[0], c.zone[1] = whole(c.zone[0], c.zone[1], max(1, int(math.Round(w/ds))), len(pts))
	trustFrom = math.Max(trustFrom, c.S[c.zone[0]]-w)
	trustTo = math.Min(trustTo, c.S[c.zone[1]]+w)
	d2 := c.fit(w, c.fits[c.scale].noise, trustFrom, trustTo)
	c.frames(d2)
	return c
}

// steadiestScale is the first of the two neighbouring fits where the tightest bend's
// curvature changes least per step of log half-width, among the pairs whose wider fit is no
// wider than one and a half times the bend and whose narrower fit holds the line's wander
// under steadyNoise of the reading (any pair when none does; the narrowest fit when no pair
// qualifies at all).
func steadiestScale(fits []scaleFit) int {
	pick := func(quiet bool) int {
		best, bestSlope := -1, math.Inf(1)
		for i := 0; i+1 < len(fits); i++ {
			a, b := fits[i], fits[i+1]
			if b.window > 1.5*a.width || a.peak <= 0 || (quiet && a.noise > steadyNoise*a.peak) {
				continue
			}
			slope := math.Abs(a.peak-b.peak) / a.peak / math.Log(b.window/a.window)
			if slope < bestSlope {
				best, bestSlope = i, slope
			}
		}
		return best
	}
	if i := pick(true); i >= 0 {
		return i
	}
	return max(pick(false), 0)
}

// steadyNoise is the most of the reading the line's wander may make at a fit the steadiest
// pair starts from.
const steadyNoise = 0.1

// tightest is the tightest bend's curvature (1/mm) read at the chosen pair of fits.
func (c *Centerline) tightest() float64 {
	a := c.fits[c.scale]
	if c.scale+1 < len(c.fits) {
		return (a.peak + c.fits[c.scale+1].peak) / 2
	}
	return a.peak
}

// curvatureBand is how well the line pins down the tightest bend's curvature, [low, high]
// in 1/mm: the readings of the chosen pair of fits, widened by the wander's share at that
// half-width (one standard deviation), by bandFloor for what the making of the line may
// shift, and upward by bandBlur times how far the wider fit exceeds half the bend's width
// (a fit as wide as a short bend flattens it).
func (c *Centerline) curvatureBand() (lo, hi float64) {
	a := c.fits[c.scale]
	b := a
	if c.scale+1 < len(c.fits) {
		b = c.fits[c.scale+1]
	}
	return fitBand(a, b, c.DS)
}

// fitBand is curvatureBand for the pair of fits a and the wider b (a twice for one fit) on a
// line of stations ds apart.
func fitBand(a, b scaleFit, ds float64) (lo, hi float64) {
	blur := bandBlur * math.Max(0, b.window/(a.width+ds)-0.5)
	lo = math.Min(a.peak, b.peak)*(1-bandFloor) - a.noise
	hi = math.Max(a.peak, b.peak)*(1+bandFloor+blur) + a.noise
	return math.Max(lo, 0), hi
}

// scaleFits fits the line at every admissible half-width, each on its own (workers
// goroutines, 0: all cores).
func (c *Centerline) scaleFits(window float64, workers int) []scaleFit {
	n := len(c.Points)
	// The wander: the line less its wide quadratic fit.
	ref := smoothQuadratic(c.Points, max(1, int(math.Round(noiseReference/c.DS))))
	wander := make([]mgl64.Vec3, n)
	for i := range wander {
		wander[i] = c.Points[i].Sub(ref[i])
	}
	lo, hi := c.zone[0], c.zone[1]
	var widths []float64
	for _, w := range curvatureScales {
		if w >= window || w == curvatureScales[len(curvatureScales)-1] {
			widths = append(widths, w)
		}
	}
	out := make([]scaleFit, len(widths))
	parallel.For(workers, len(widths), func(_, f int) {
		w := widths[f]
		sq := make([]float64, 0, hi-lo+1)
		m := max(1, int(math.Round(w/c.DS)))
		d1, d2 := derivatives(c.Points, c.DS, m)
		t, k := curvatureOf(d1, d2)
		_, e2 := derivatives(wander, c.DS, m)
		sq = sq[:0]
		for i := lo; i <= hi; i++ {
			v := e2[i].Sub(t[i].Mul(e2[i].Dot(t[i])))
			sq = append(sq, v.LenSqr())
		}
		// A wander vector across the line has two Gaussian components: its squared length is
		// exponential, with median 2 sigma^2 ln 2.
		slices.Sort(sq)
		noise := math.Sqrt(sq[len(sq)/2] / math.Ln2)
		// The peak is read only where the whole window lies on the line: near an end the fit
		// shrinks to what is left, and a short fit there reads the end's wander.
		wlo, whi := whole(lo, hi, m, n)
		arg := wlo
		for i := lo; i <= hi; i++ {
			k[i] = math.Sqrt(math.Max(k[i]*k[i]-noise*noise, 0))
			if i >= wlo && i <= whi && k[i] > k[arg] {
				arg = i
			}
		}
		stretch := func(frac float64) (int, int) {
			a, b := arg, arg
			for a > wlo && k[a-1] >= frac*k[arg] {
				a--
			}
			for b < whi && k[b+1] >= frac*k[arg] {
				b++
			}
			return a, b
		}
		a, b := stretch(0.9)
		sum := 0.0
		for i := a; i <= b; i++ {
			sum += k[i]
		}
		a8, b8 := stretch(0.8)
		out[f] = scaleFit{window: w, noise: noise, peak: sum / float64(b-a+1), width: c.S[b8] - c.S[a8], from: a8, to: b8, atEdge: a8 == wlo || b8 == whi}
	})
	return out
}

// whole narrows the stations lo..hi of a line of n to those where a fit of half-width m
// stations lies whole on the line (all of lo..hi when none does).
func whole(lo, hi, m, n int) (int, int) {
	a, b := max(lo, m), min(hi, n-1-m)
	if a > b {
		return lo, hi
	}
	return a, b
}

// smoothQuadratic is each point's local quadratic fit over a half-width of m points (the
// window shrinking symmetrically at the ends).
func smoothQuadratic(pts []mgl64.Vec3, m int) []mgl64.Vec3 {
	n := len(pts)
	out := make([]mgl64.Vec3, n)
	for i := range pts {
		h := min(m, i, n-1-i)
		var s2, s4 float64
		for j := -h; j <= h; j++ {
			s2 += float64(j * j)
			s4 += float64(j * j * j * j)
		}
		cnt := float64(2*h + 1)
		den := cnt*s4 - s2*s2
		if den == 0 {
			out[i] = pts[i]
			continue
		}
		var a mgl64.Vec3
		for j := -h; j <= h; j++ {
			a = a.Add(pts[i+j].Mul((s4 - s2*float64(j*j)) / den))
		}
		out[i] = a
	}
	return out
}

// setZone keeps the stations more than a mm from the start and b mm from the end for the
// measures; a line too short for both keeps its middle station.
func (c *Centerline) setZone(a, b float64) {
	n := len(c.S)
	L := c.S[n-1]
	lo, hi := 0, n-1
	for lo < n-1 && c.S[lo] < a {
		lo++
	}
	for hi > 0 && c.S[hi] > L-b {
		hi--
	}
	if lo > hi {
		lo, hi = n/2, n/2
	}
	c.zone = [2]int{lo, hi}
}

// fit sets tangents and curvature from a local quadratic fit of half-width window mm, with
// the share noise (1/mm) of the line's wander taken out, and returns the second derivatives.
func (c *Centerline) fit(window, noise, trustFrom, trustTo float64) []mgl64.Vec3 {
	m := max(1, int(math.Round(window/c.DS)))
	c.window = m
	d1, d2 := derivatives(c.Points, c.DS, m)
	c.T, c.K = curvatureOf(d1, d2)
	for i, k := range c.K {
		c.K[i] = math.Sqrt(math.Max(k*k-noise*noise, 0))
	}
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

// peakStretch returns the contiguous stations around the highest curvature where k >= frac k_max,
// within the measured zone.
func (c *Centerline) peakStretch(frac float64) (lo, hi int) {
	z0, z1 := c.zone[0], c.zone[1]
	arg := z0
	for i := z0; i <= z1; i++ {
		if c.K[i] > c.K[arg] {
			arg = i
		}
	}
	lim := frac * c.K[arg]
	lo, hi = arg, arg
	for lo > z0 && c.K[lo-1] >= lim {
		lo--
	}
	for hi < z1 && c.K[hi+1] >= lim {
		hi++
	}
	return lo, hi
}
