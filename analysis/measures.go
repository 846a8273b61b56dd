package analysis

import (
	"fmt"
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// Curvature measures of a canal as the trade states them.
type Measures struct {
	Length        float64 // mm, orifice to apical end along the centerline
	MaxCurvatureS float64 // s*, mm from the orifice
	MaxCurvatureR float64 // 1/k at s*, mm; +Inf for a straight canal
	SchneiderDeg  float64
	DepartureS    float64 // where the canal leaves its coronal axis (Schneider's construction), mm
	// SchneiderTolMM is how far the canal must stray from its coronal axis to count as
	// leaving it: tied to the scan's resolution (see schneiderTolerance).
	SchneiderTolMM float64
	ArcRadius      float64 // circle fitted where k > k_max/2, mm; +Inf when straight
	ArcAngleDeg    float64
	// Bands, [low, high]: how well the line pins down the tightest bend's radius (high is
	// +Inf when the line cannot tell the bend from straight), its place (mm from the
	// orifice), and the Schneider angle.
	RadiusRange, SRange, SchneiderRange [2]float64
	// AsTight is a second bend, apart from the tightest, whose curvature reaches the low end
	// of the tightest bend's band (mm from the orifice, [from, to]; zero when there is none):
	// the scan cannot tell which of the two is the tighter.
	AsTight [2]float64
}

// straightCurvature is the curvature below which a canal counts as straight (radius over 1 m).
const straightCurvature = 1e-3

// minCurveDeg is the smallest turn that counts as a curve.
const minCurveDeg = 2.0

// endZone is the share of an end's radius (its long semi-axis) at each end that takes no
// part in the measures: where the end cap meets the wall the sections bend and the line with
// them, and a wide oval orifice would otherwise hold the "tightest bend".
const endZone = 1.5

// Measure computes s*, the Schneider angle (departure tolerance tol mm) and the fitted arc of
// a centerline, away from its end zones.
func Measure(c *Centerline, tol float64) Measures {
	m := Measures{Length: c.Length(), MaxCurvatureR: math.Inf(1), ArcRadius: math.Inf(1), SchneiderTolMM: tol}
	star := c.peakStation()
	m.MaxCurvatureS = c.S[star]
	kmax := c.K[star]
	kStar := kmax
	klo, khi := kmax, kmax
	var bend bendFit
	fitted := false
	if c.fits != nil {
		kStar = c.tightest()
		klo, khi = c.curvatureBand()
		if b, ok := c.tightestBend(star); ok {
			bend, fitted = b, true
			kStar = 1 / b.circle.radius
			klo, khi = bendBand(kStar, c.S[b.hi]-c.S[b.lo], tol, klo, khi)
		}
	}
	if kStar > straightCurvature {
		m.MaxCurvatureR = 1 / kStar
	}
	var own *bendFit
	if fitted {
		own = &bend
	}
	ownLo, ownHi := c.ownStretch(star, klo, own)
	var rival *[2]int
	if c.fits != nil {
		if st, h, ok := c.rivalBend(ownLo, ownHi); ok {
			// Either bend may be the tightest: the band holds the rival's reading too.
			rival, khi = &st, math.Max(khi, h)
		}
	}
	m.RadiusRange = [2]float64{1 / khi, math.Inf(1)}
	if klo > straightCurvature {
		m.RadiusRange[1] = 1 / klo
	}
	m.SRange, m.AsTight = c.placeBand(star, klo, ownLo, ownHi, rival)
	if fitted {
		// The middle of the bend the circle was fitted to is the other reading of its place:
		// on a long arc of one radius the curvature's wander may put s* far from it. Each end
		// of the stretch is known to about a tenth of its length.
		mid, half := (c.S[bend.lo]+c.S[bend.hi])/2, 0.1*(c.S[bend.hi]-c.S[bend.lo])
		m.SRange = [2]float64{math.Min(m.SRange[0], mid-half), math.Max(m.SRange[1], mid+half)}
	}
	sc := schneiderConstruct(c, tol)
	m.DepartureS, m.SchneiderDeg = sc.departure, sc.deg
	m.SchneiderRange = schneiderBand(c, tol, sc)
	if kmax > straightCurvature {
		lo, hi := c.peakStretch(0.5)
		if fitted {
			lo, hi = bend.lo, bend.hi
		}
		m.ArcRadius = fitCircle(c.Points[lo : hi+1]).radius
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
		m.RadiusRange[1] = math.Inf(1)
	}
	return m
}

// When a band counts as wide enough to say so (see Warnings).
const (
	wideRadius    = 1.35 // high over low
	widePlaceMM   = 3.0
	wideSchneider = 8.0 // degrees
	nearEndMM     = 1.0
)

// Warnings say in plain words where the scan does not pin a measure down, and when the
// tightest bend lies next to an end, where a scan is least sure of the line.
func (m Measures) Warnings() []string {
	var out []string
	r := m.RadiusRange
	wideR, wideS, wideA := m.WideBands()
	switch {
	case !wideR:
	case math.IsInf(r[1], 1):
		out = append(out, fmt.Sprintf("the scan cannot tell the tightest bend (r %.1f mm) from a straight canal: its radius could be anything above %.1f mm", m.MaxCurvatureR, r[0]))
	default:
		out = append(out, fmt.Sprintf("the scan does not pin the tightest bend down better than r %.1f-%.1f mm", r[0], r[1]))
	}
	if t := m.AsTight; t[1] > 0 {
		out = append(out, fmt.Sprintf("a second bend, %.1f-%.1f mm from the apical end, is as tight as the tightest (%.1f mm from the apical end) within what the scan can tell: either may be the tightest",
			m.Length-t[1], m.Length-t[0], m.Length-m.MaxCurvatureS))
	} else if wideS {
		out = append(out, fmt.Sprintf("the scan does not pin the place of the tightest bend down better than %.1f-%.1f mm from the apical end",
			m.Length-m.SRange[1], m.Length-m.SRange[0]))
	}
	if a := m.SchneiderRange; wideA {
		out = append(out, fmt.Sprintf("the scan does not pin the Schneider angle down better than %.0f-%.0f degrees", a[0], a[1]))
	}
	if !math.IsInf(m.MaxCurvatureR, 1) {
		if m.MaxCurvatureS < nearEndMM {
			out = append(out, fmt.Sprintf("the tightest bend lies %.1f mm from the orifice, where the end of the scan may bend the centerline: check the end there", m.MaxCurvatureS))
		} else if from := m.Length - m.MaxCurvatureS; from < nearEndMM {
			out = append(out, fmt.Sprintf("the tightest bend lies %.1f mm from the apical end, where the end of the scan may bend the centerline: check the end there", from))
		}
	}
	return out
}

// WideBands says which bands are wide enough to warn about: the tightest bend's radius
// (including one the scan cannot tell from straight), its place, the Schneider angle. Every
// output that marks a figure as uncertain asks here, so the marks and the warnings agree.
func (m Measures) WideBands() (radius, place, schneider bool) {
	if !math.IsInf(m.MaxCurvatureR, 1) {
		r := m.RadiusRange
		radius = math.IsInf(r[1], 1) || r[1] > wideRadius*r[0]
		place = m.SRange[1]-m.SRange[0] > widePlaceMM || m.AsTight[1] > 0
	}
	schneider = m.SchneiderRange[1]-m.SchneiderRange[0] > wideSchneider
	return radius, place, schneider
}

// reaching is the stretch of the measured zone around station star where the curvature
// reaches klo.
func (c *Centerline) reaching(star int, klo float64) (lo, hi int) {
	lo, hi = star, star
	for lo > c.zone[0] && c.K[lo-1] >= klo {
		lo--
	}
	for hi < c.zone[1] && c.K[hi+1] >= klo {
		hi++
	}
	return lo, hi
}

// ownStretch is the tightest bend's own stations: those around station star where the
// curvature reaches klo, the low end of its band, and those of the fitted circle (bend, or nil).
func (c *Centerline) ownStretch(star int, klo float64, bend *bendFit) (lo, hi int) {
	lo, hi = c.reaching(star, klo)
	if bend != nil {
		lo, hi = min(lo, bend.lo), max(hi, bend.hi)
	}
	return lo, hi
}

// placeBand is the stretch of the measured zone that holds station star and every station
// where the curvature reaches klo, the low end of the tightest bend's band: the line cannot
// say the tightest bend lies anywhere else. Its ends are given in mm from the orifice. asTight
// is the strongest stretch outside the tightest bend's own stations (ownLo..ownHi, see
// ownStretch) where the curvature reaches klo over at least minAsTight stations (a second bend
// that may be the tightest), zero when there is none; a rival bend a narrower fit found
// (stations, see rivalBend; or nil) joins it where they overlap and takes its place where not,
// since a narrower fit reads a short bend truer.
func (c *Centerline) placeBand(star int, klo float64, ownLo, ownHi int, rival *[2]int) (band, asTight [2]float64) {
	lo, hi := c.reaching(star, klo)
	band = [2]float64{c.S[lo], c.S[hi]}
	best := 0.0
	var at [2]int
	for i := c.zone[0]; i <= c.zone[1]; {
		if c.K[i] < klo || (i >= ownLo && i <= ownHi) {
			i++
			continue
		}
		j, peak := i, 0.0
		for j <= c.zone[1] && c.K[j] >= klo && (j < ownLo || j > ownHi) {
			peak = math.Max(peak, c.K[j])
			j++
		}
		if j-i >= minAsTight && peak > best {
			best, at = peak, [2]int{i, j - 1}
		}
		i = j
	}
	found := best > 0
	if r := rival; r != nil {
		if found && at[1] >= r[0] && at[0] <= r[1] {
			at = [2]int{min(at[0], r[0]), max(at[1], r[1])}
		} else {
			at = *r
		}
		found = true
	}
	if found {
		asTight = [2]float64{c.S[at[0]], c.S[at[1]]}
		band = [2]float64{math.Min(band[0], asTight[0]), math.Max(band[1], asTight[1])}
	}
	return band, asTight
}

// minAsTight is the fewest stations (0.2 mm) over which a second bend must reach the band to
// count: a wiggle of a station or two is the scan's, not a bend.
const minAsTight = 4

// schneiderBand is how well the construction pins the angle down: the construction again
// with half and twice the tolerance, widened by the angles the tolerance subtends seen from
// the departure point to the apical end (where the apical end lies) and over the length of
// the coronal axis (which way the axis runs). Where the apical end was carried straight to
// the wall beyond the stretch the image measured, the canal may instead keep the curvature
// it had at that stretch's edge: the band also holds the angle to the end so reached.
func schneiderBand(c *Centerline, tol float64, sc construction) [2]float64 {
	lo, hi := sc.deg, sc.deg
	for _, f := range []float64{0.5, 2} {
		_, d, _ := schneider(c, f*tol)
		lo, hi = math.Min(lo, d), math.Max(hi, d)
	}
	dep, left := sc.departure, sc.left
	start, axis, end := sc.start, sc.axis, sc.end
	if !sc.axisFound { // the zone is too short for an axis: coronalLine as it then answers
		start, _, axis, end = coronalLine(c, tol)
	}
	slack := 0.0
	// Where the line leaves its axis, the apical end is known to within tol as seen from the
	// departure point; a line that never leaves it is straight to within tol over its length.
	from := c.Points[c.Station(dep)]
	if !left {
		from = c.Points[start]
	}
	if reach := c.Points[len(c.Points)-1].Sub(from).Len(); reach > 0 {
		slack += mgl64.RadToDeg(math.Atan(tol / reach))
	}
	if end > start {
		slack += mgl64.RadToDeg(math.Atan(tol / (c.S[end] - c.S[start])))
	}
	if left {
		// The departure is carried back along a line that wanders by a fraction of a voxel,
		// so it is known to about the scan's resolution (2 tol) along the line: the angle from
		// there, to either place of the apical end (211-021: departure 0.16 mm early at a
		// 0.135 mm voxel, the angle 1.5 degrees short and out of the band without this).
		straight, bent := c.apicalEnds()
		for _, shift := range []float64{0, -2 * tol, 2 * tol} {
			p := from
			if shift != 0 {
				p, _, _, _ = c.At(math.Max(c.S[start], dep+shift))
			}
			for _, e := range []mgl64.Vec3{straight, bent} {
				if d := angleBetween(axis, e.Sub(p)); d >= 0 {
					lo, hi = math.Min(lo, d), math.Max(hi, d)
				}
			}
		}
	}
	return [2]float64{math.Max(0, lo-slack), math.Min(180, hi+slack)}
}

// apicalEnds are the two places the apical end may lie: straight is the line's end, carried
// straight along its tangent to the wall beyond the stretch the image measured; bent is where
// the end would lie had the canal kept, over that carried stretch, the curvature the line has
// at the measured stretch's edge (a circle continued from there over the same arc length). A
// bend may end anywhere in the carried stretch; the two are the same where nothing was
// carried or the edge is straight.
func (c *Centerline) apicalEnds() (straight, bent mgl64.Vec3) {
	n := len(c.Points)
	straight = c.Points[n-1]
	carried := c.S[n-1] - c.measured[1]
	if carried <= c.DS || c.measured[1] <= 0 {
		return straight, straight
	}
	edge := c.Station(c.measured[1])
	carried = c.S[n-1] - c.S[edge]
	t := c.T[edge]
	kv := c.N1[edge].Mul(c.KN1[edge]).Add(c.N2[edge].Mul(c.KN2[edge]))
	k := kv.Len()
	if phi := k * carried; phi > 1e-6 {
		return straight, c.Points[edge].Add(t.Mul(math.Sin(phi) / k)).Add(kv.Mul((1 - math.Cos(phi)) / (k * k)))
	}
	return straight, c.Points[edge].Add(t.Mul(carried))
}

// angleBetween is the angle in degrees between the directions a and b, or -1 when either is
// too short to have one.
func angleBetween(a, b mgl64.Vec3) float64 {
	if a.Len() < 1e-12 || b.Len() < 1e-12 {
		return -1
	}
	cos := a.Normalize().Dot(b.Normalize())
	return mgl64.RadToDeg(math.Acos(math.Max(-1, math.Min(1, cos))))
}

// schneiderTolerance is how far (mm) a scanned canal must stray from its coronal axis to count
// as leaving it in Schneider's construction: half the scan's resolution (its voxel, or the
// median edge of its surface, whichever is larger) and no less than 0.02 mm. A centerline
// found in a scan wanders by a fraction of a voxel; a tolerance under that would find the
// departure in the wander.
func schneiderTolerance(voxel, surfaceDetail float64) float64 {
	return math.Max(0.02, 0.5*math.Max(voxel, surfaceDetail))
}

// schneider follows Schneider's construction (Oral Surg Oral Med Oral Pathol 1971;32:271): a
// line along the coronal axis of the canal, the point where the canal first leaves that
// line, a line from there to the apical end, and the angle between the two lines. Here the
// axis is the line fitted to the longest stretch after the orifice zone that stays within
// half the tolerance of its own fitted line; the canal leaves the axis where its distance
// from it first exceeds tol, and since a curve that starts tangent to the axis departs as the
// square of the arc length, the departure point is carried back to where that square law
// starts (a fit of sqrt(distance) against s over the stations from tol to 3 tol). It returns
// the departure (mm from the orifice), the angle in degrees, and whether the line leaves its
// axis at all: one that never does is straight to within tol (Schneider: 0 degrees), and the
// departure is then the end of the measured line.
func schneider(c *Centerline, tol float64) (departure, deg float64, left bool) {
	sc := schneiderConstruct(c, tol)
	return sc.departure, sc.deg, sc.left
}

// construction is one run of Schneider's construction with the coronal axis it used
// (start and end stations, direction; axisFound false when the zone is too short for one).
type construction struct {
	departure, deg float64
	left           bool
	start, end     int
	axis           mgl64.Vec3
	axisFound      bool
}

func schneiderConstruct(c *Centerline, tol float64) construction {
	lo, hi := c.zone[0], c.zone[1]
	n := len(c.Points)
	// The apical end is taken midway between the two places the line allows (apicalEnds).
	straight, bent := c.apicalEnds()
	apex := straight.Add(bent).Mul(0.5)
	if hi-lo < 4 {
		return construction{departure: c.S[lo]}
	}
	lo, origin, axis, end := coronalLine(c, tol)
	sc := construction{start: lo, end: end, axis: axis, axisFound: true}
	dep, left := departureOf(c, origin, axis, lo, end, hi, tol)
	if !left {
		sc.departure = c.S[hi]
		return sc
	}
	// The departure point on the line, between stations.
	i := min(int(dep), n-2)
	f := dep - float64(i)
	p := c.Points[i].Mul(1 - f).Add(c.Points[i+1].Mul(f))
	sc.departure = c.S[i] + f*(c.S[i+1]-c.S[i])
	sc.deg, sc.left = math.Max(0, angleBetween(axis, apex.Sub(p))), true
	return sc
}

// coronalSlide is how far (mm) past the orifice zone, and past the piece the extraction
// carried straight from the orifice to the wall, the coronal axis may start. The carried piece
// follows a guessed tangent: square to the orifice it continues the axis, but an oblique access
// cut tilts it by degrees, and fitted into the axis it tilts the axis so that the canal seems
// to leave it at once. The first stations re-centred next to a dropped end may also hook by a
// fraction of a voxel.
const coronalSlide = 1.0

// coronalLine is the coronal axis of Schneider's construction for tolerance tol: of the
// stretches that start in the orifice zone's edge up to coronalSlide past the carried piece
// and stay within tol/2 of their fitted line (coronalAxis), the longest (the earliest start
// among equals; a later start reaches a little further into a gentle coronal curve, so the
// reach alone would favour it). It returns the stretch's first and last stations and the line.
func coronalLine(c *Centerline, tol float64) (from int, origin, axis mgl64.Vec3, end int) {
	start, hi := c.zone[0], c.zone[1]
	last := math.Max(c.S[start], c.measured[0]) + coronalSlide
	from, end = start, -1
	best := -1.0
	for a := start; a == start || (a+4 < hi && c.S[a] <= last); a += 2 {
		o, d, e := coronalAxis(c.Points[a:hi+1], tol/2)
		if l := c.S[a+e] - c.S[a]; l > best {
			best, from, origin, axis, end = l, a, o, d, a+e
		}
	}
	return from, origin, axis, end
}

// coronalAxis fits a line to the longest first stretch of pts (at least 1 mm or a quarter of
// them) whose every point lies within tol of the fitted line. It returns the line (a point
// and the unit direction toward the rest of pts) and the index of the stretch's last point.
func coronalAxis(pts []mgl64.Vec3, tol float64) (origin, axis mgl64.Vec3, end int) {
	first := min(len(pts)-1, max(4, min(int(1.0/StationSpacing), len(pts)/4)))
	end = first
	// Sums for the least-squares line, grown one point at a time.
	var sum mgl64.Vec3
	var sxx mgl64.Mat3
	fit := func(k int) (mgl64.Vec3, mgl64.Vec3) {
		o := sum.Mul(1 / float64(k))
		cov := sxx.Sub(outer(o, o).Mul(float64(k)))
		d := principalAxis(cov)
		if d.Dot(pts[k-1].Sub(pts[0])) < 0 {
			d = d.Mul(-1)
		}
		return o, d
	}
	// Every point within tol of the line: q := p.Sub(o); q.Sub(d.Mul(q.Dot(d))).LenSqr(),
	// written out per coordinate (the same operations in the same order, the same numbers).
	straight := func(o, d mgl64.Vec3, k int) bool {
		tt := tol * tol
		for i := range pts[:k] {
			p := &pts[i]
			q0, q1, q2 := p[0]-o[0], p[1]-o[1], p[2]-o[2]
			t := q0*d[0] + q1*d[1] + q2*d[2]
			r0, r1, r2 := q0-d[0]*t, q1-d[1]*t, q2-d[2]*t
			if r0*r0+r1*r1+r2*r2 > tt {
				return false
			}
		}
		return true
	}
	for i, p := range pts {
		// sum.Add(p) and sxx.Add(outer(p, p)) written out, the same numbers.
		p0, p1, p2 := p[0], p[1], p[2]
		sum[0], sum[1], sum[2] = sum[0]+p0, sum[1]+p1, sum[2]+p2
		sxx[0], sxx[1], sxx[2] = sxx[0]+p0*p0, sxx[1]+p1*p0, sxx[2]+p2*p0
		sxx[3], sxx[4], sxx[5] = sxx[3]+p0*p1, sxx[4]+p1*p1, sxx[5]+p2*p1
		sxx[6], sxx[7], sxx[8] = sxx[6]+p0*p2, sxx[7]+p1*p2, sxx[8]+p2*p2
		if i < first {
			continue
		}
		if i == first || (i-first)%2 == 0 {
			o, d := fit(i + 1)
			if i > first && !straight(o, d, i+1) {
				break
			}
			origin, axis, end = o, d, i
		}
	}
	return origin, axis, end
}

// departureOf finds where the line leaves the axis (origin, unit axis) by more than tol after
// station from, and carries it back along the square law of a tangent curve. It returns a
// fractional station, and false (with hi) when the line never leaves.
func departureOf(c *Centerline, origin, axis mgl64.Vec3, lo, from, hi int, tol float64) (float64, bool) {
	dist := func(i int) float64 {
		d := c.Points[i].Sub(origin)
		return d.Sub(axis.Mul(d.Dot(axis))).Len()
	}
	first := -1
	for i := from; i <= hi; i++ {
		if dist(i) > tol {
			first = i
			break
		}
	}
	if first < 0 {
		return float64(hi), false
	}
	// sqrt(d) = (s - s0)/sqrt(2R) for a circle leaving the axis at s0: fit over tol..3 tol.
	var sx, sy, sxx, sxy, cnt float64
	for i := first; i <= hi; i++ {
		d := dist(i)
		if d > 3*tol {
			break
		}
		x, y := c.S[i], math.Sqrt(d)
		sx += x
		sy += y
		sxx += x * x
		sxy += x * y
		cnt++
	}
	s0 := c.S[first]
	if den := cnt*sxx - sx*sx; cnt >= 3 && den > 0 {
		slope := (cnt*sxy - sx*sy) / den
		if slope > 0 {
			s0 = (sx - sy/slope) / cnt
		}
	}
	s0 = math.Max(c.S[lo], math.Min(s0, c.S[first]))
	return float64(lo) + (s0-c.S[lo])/c.DS, true
}

// planeAxes returns two orthonormal axes spanning the plane of the two largest principal
// directions of a symmetric 3x3 covariance, by power iteration with deflation.
func planeAxes(cov mgl64.Mat3) (e1, e2 mgl64.Vec3) {
	e1 = principalAxis(cov)
	l1 := e1.Dot(cov.Mul3x1(e1))
	defl := cov.Sub(outer(e1, e1).Mul(l1))
	e2 = powerIterate(defl, anyPerpendicular(e1))
	e2 = e2.Sub(e1.Mul(e2.Dot(e1))).Normalize()
	return e1, e2
}

// principalAxis is the largest principal direction of a symmetric 3x3 covariance (planeAxes'
// first axis, for a line fit that needs no second).
func principalAxis(cov mgl64.Mat3) mgl64.Vec3 {
	return powerIterate(cov, mgl64.Vec3{0.577, 0.577, 0.577})
}

// powerIterate runs at most 100 steps of power iteration from start. A step that returns its
// own input exactly would return it for ever, so the loop stops there with the same answer.
// Each step is m.Mul3x1(v), Len and Normalize written out per coordinate (the same operations
// in the same order, the same numbers).
func powerIterate(m mgl64.Mat3, start mgl64.Vec3) mgl64.Vec3 {
	v0, v1, v2 := start[0], start[1], start[2]
	for it := 0; it < 100; it++ {
		w0 := m[0]*v0 + m[3]*v1 + m[6]*v2
		w1 := m[1]*v0 + m[4]*v1 + m[7]*v2
		w2 := m[2]*v0 + m[5]*v1 + m[8]*v2
		l := math.Sqrt(w0*w0 + w1*w1 + w2*w2)
		if l < 1e-30 {
			return start
		}
		inv := 1.0 / l
		n0, n1, n2 := w0*inv, w1*inv, w2*inv
		if n0 == v0 && n1 == v1 && n2 == v2 {
			break
		}
		v0, v1, v2 = n0, n1, n2
	}
	return mgl64.Vec3{v0, v1, v2}
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
