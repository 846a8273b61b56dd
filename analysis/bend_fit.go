package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// How the tightest bend is found as a stretch of the line (see bendStretch).
const (
	bendLevel    = 0.5  // the stretch keeps at least this share of the peak's curvature
	bendLength   = 1.5  // and is at least this many half-widths of the fit that found it long
	bendTwistDeg = 30.0 // the plane of the bend turns by no more than this along it
)

// bendFit is the circle fitted to the points of the tightest bend itself.
type bendFit struct {
	lo, hi int // the stations of the bend
	circle circleFit
}

// tightestBend fits a circle to the centerline's own points over the stretch of the
// tightest bend around s*, station star (bendStretch). A local fit of the curvature reads a bend shorter than its
// window as flatter than it is, and over a long bend it reads the top of the line's wander;
// a circle through the bend's own points does neither, once the bend's extent is known.
// ok is false when the stretch is too short to fit.
func (c *Centerline) tightestBend(star int) (bendFit, bool) {
	lo, hi := c.bendStretch(star)
	if hi-lo+1 < 5 {
		return bendFit{}, false
	}
	f := bendFit{lo: lo, hi: hi, circle: fitCircle(c.Points[lo : hi+1])}
	return f, !math.IsInf(f.circle.radius, 1)
}

// bendStretch is the tightest bend as a stretch of stations holding s* (station star): at
// each fit half-width, from the widest, the curvature peak reached by climbing from s*, and the
// stations around it where the curvature keeps bendLevel of that peak and the bend's plane
// (the binormal, which an arc keeps and the next bend of an S-curve or a bend out of plane
// turns) stays within bendTwistDeg of the peak's. The first such stretch that holds s* and is
// at least bendLength half-widths long is the bend: a fit that wide has not spread the bend
// beyond its ends. A wide fit flattens a short tight bend more than a long gentle one, so its
// highest peak may be another bend: climbing from s* keeps to the one the narrower fits found.
// The narrowest fit's stretch is taken when none qualifies.
func (c *Centerline) bendStretch(star int) (lo, hi int) {
	minCos := math.Cos(mgl64.DegToRad(bendTwistDeg))
	for i := len(c.fits) - 1; i >= 0; i-- {
		w := c.fits[i].window
		m := max(1, int(math.Round(w/c.DS)))
		// The fit at the few stations the search visits, each once.
		n := len(c.Points)
		k := make([]float64, n)
		bin := make([]mgl64.Vec3, n)
		seen := make([]bool, n)
		at := func(j int) {
			if seen[j] {
				return
			}
			seen[j] = true
			d1, d2 := derivativesAt(c.Points, c.DS, m, j)
			if l := d1.Len(); l > 0 {
				b := d1.Cross(d2)
				k[j] = b.Len() / (l * l * l)
				if bl := b.Len(); bl > 0 {
					bin[j] = b.Mul(1 / bl)
				}
			}
		}
		curv := func(j int) float64 { at(j); return k[j] }
		zlo, zhi := whole(c.zone[0], c.zone[1], m, n)
		arg := max(zlo, min(star, zhi))
		for {
			switch {
			case arg > zlo && curv(arg-1) > curv(arg):
				arg--
				continue
			case arg < zhi && curv(arg+1) > curv(arg):
				arg++
				continue
			}
			break
		}
		at(arg)
		b0 := bin[arg]
		in := func(j int) bool { return curv(j) >= bendLevel*k[arg] && bin[j].Dot(b0) >= minCos }
		lo, hi = arg, arg
		for lo > zlo && in(lo-1) {
			lo--
		}
		for hi < zhi && in(hi+1) {
			hi++
		}
		if lo <= star && star <= hi && c.S[hi]-c.S[lo] >= bendLength*w {
			return lo, hi
		}
	}
	return lo, hi
}

// bendSpread is how far (as a share) the circle fitted to the bend may miss its curvature
// when the bend is long against the scan's resolution: over the scan-like family the methods
// were developed on (models.ScanFamily, seeds 1 and 7, 240 canals) nine fits in ten lay within
// it of the exact arc.
const bendSpread = 0.06

// lineError is how far (as a share of the departure tolerance, half a voxel: see
// schneiderTolerance) the centerline through a scan may stray from the canal's own line in a
// way that a smooth line hides: the wander of the sections' centres, correlated over the whole
// bend, so the circle fit's residual does not show it.
const lineError = 0.15

// bendBand is the band on the tightest bend's curvature once a circle has been fitted to the
// bend (kFit, 1/mm): the fit's own spread, and every reading of the local fits' band
// [lo, hi], so that the band says where either method could be wrong. The fit's spread
// grows on a bend short against the resolution (tol mm, see lineError): a circle through a
// stretch of length L holds the bend by its sagitta L^2 k / 8, so a line error d moves the
// curvature by 8 d / L^2 (analytic geometry); the two parts add in quadrature.
func bendBand(kFit, length, tol, lo, hi float64) (klo, khi float64) {
	spread := bendSpread
	if length > 0 {
		spread = math.Hypot(bendSpread, 8*lineError*tol/(length*length)/kFit)
	}
	return math.Min(lo, kFit*(1-spread)), math.Max(hi, kFit*(1+spread))
}
