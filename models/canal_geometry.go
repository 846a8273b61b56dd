package models

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// canalPiece is one segment placed in space, with the frame it starts with.
type canalPiece struct {
	s0, length float64
	start      mgl64.Vec3 // point at s0
	tangent    mgl64.Vec3 // unit tangent at s0
	bend       mgl64.Vec3 // arc: unit vector from start toward the centre of curvature
	axis       mgl64.Vec3 // arc: unit axis the tangent turns about (tangent x bend)
	radius     float64    // arc radius; 0 for a straight piece
	longAxis   mgl64.Vec3 // oval long axis at s0, parallel-transported from the orifice
}

type canalPath struct {
	pieces []canalPiece
	length float64
}

// canalRotate turns v about the unit axis k by angle a (radians, right-handed; Rodrigues).
func canalRotate(v, k mgl64.Vec3, a float64) mgl64.Vec3 {
	sin, cos := math.Sincos(a)
	return v.Mul(cos).Add(k.Cross(v).Mul(sin)).Add(k.Mul(k.Dot(v) * (1 - cos)))
}

// buildCanalPath places the segments. It carries a bending reference along the centerline:
// it starts at +x, each arc bends toward the reference turned by its plane_turn about the
// tangent, and along the arc the reference turns with the tangent (the arc's principal
// normal, which on a plane curve is its parallel transport), so the next arc's plane_turn
// is measured from where the previous arc was bending at its end. The oval's long axis
// starts along the first arc's binormal (tangent x bend; +/-y without a plane_turn) and
// is parallel-transported the same way.
func buildCanalPath(c *CanalSpec) canalPath {
	p := mgl64.Vec3{}
	t := mgl64.Vec3{0, 0, -1}
	ref := mgl64.Vec3{1, 0, 0}
	long := mgl64.Vec3{0, 1, 0}
	for _, seg := range c.Segments {
		if seg.Kind == "arc" && seg.Radius > 0 {
			bend := canalRotate(ref, t, seg.PlaneTurn*math.Pi/180)
			long = t.Cross(bend).Normalize()
			break
		}
	}
	path := canalPath{}
	for _, seg := range c.Segments {
		pc := canalPiece{s0: path.length, length: seg.length(), start: p, tangent: t, longAxis: long}
		if seg.Kind == "arc" {
			pc.radius = seg.Radius
			pc.bend = canalRotate(ref, t, seg.PlaneTurn*math.Pi/180).Normalize()
			pc.axis = t.Cross(pc.bend).Normalize()
			a := seg.Angle * math.Pi / 180
			p, t = pc.pointAt(a*pc.radius), canalRotate(t, pc.axis, a).Normalize()
			ref = canalRotate(pc.bend, pc.axis, a).Normalize()
			long = canalRotate(long, pc.axis, a).Normalize()
		} else {
			p = p.Add(t.Mul(pc.length))
		}
		path.pieces = append(path.pieces, pc)
		path.length += pc.length
	}
	return path
}

// pointAt returns the point at arc length u into the piece (exact circle for arcs).
func (pc *canalPiece) pointAt(u float64) mgl64.Vec3 {
	if pc.radius == 0 {
		return pc.start.Add(pc.tangent.Mul(u))
	}
	phi := u / pc.radius
	sin, cos := math.Sincos(phi)
	// start + R sin(phi) t + R (1 - cos(phi)) bend
	return pc.start.Add(pc.tangent.Mul(pc.radius * sin)).Add(pc.bend.Mul(pc.radius * (1 - cos)))
}

// frameAt returns point, unit tangent and the transported long axis at arc length u.
func (pc *canalPiece) frameAt(u float64) (p, t, long mgl64.Vec3) {
	if pc.radius == 0 {
		return pc.start.Add(pc.tangent.Mul(u)), pc.tangent, pc.longAxis
	}
	phi := u / pc.radius
	return pc.pointAt(u), canalRotate(pc.tangent, pc.axis, phi), canalRotate(pc.longAxis, pc.axis, phi)
}

// geometry returns the placed path; a spec built in code (not parsed) gets a fresh one.
func (c *CanalSpec) geometry() *canalPath {
	if c.path.pieces != nil {
		return &c.path
	}
	p := buildCanalPath(c)
	return &p
}

// pieceAt finds the piece holding s (half-open, the last one closed) after clamping s.
func (g *canalPath) pieceAt(s float64) (*canalPiece, float64) {
	s = min(max(s, 0), g.length)
	lo, hi := 0, len(g.pieces)-1
	for lo < hi { // last piece whose s0 <= s
		mid := (lo + hi + 1) / 2
		if g.pieces[mid].s0 <= s {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	pc := &g.pieces[lo]
	return pc, min(s-pc.s0, pc.length)
}

// Length returns the exact centerline length in mm (the sum of the segment lengths).
func (c *CanalSpec) Length() float64 {
	total := 0.0
	for _, s := range c.Segments {
		total += s.length()
	}
	return total
}

// WorkingLength returns the working length: the given one, else the centerline length.
func (c *CanalSpec) WorkingLength() float64 {
	if c.GivenWorkingLength > 0 {
		return c.GivenWorkingLength
	}
	return c.Length()
}

// Curvature returns the exact curvature at arc length s: 1/R on an arc, 0 on a straight.
// At a junction the segment that starts there counts.
func (c *CanalSpec) Curvature(s float64) float64 {
	g := c.geometry()
	if len(g.pieces) == 0 {
		return 0
	}
	pc, _ := g.pieceAt(s)
	if pc.radius == 0 {
		return 0
	}
	return 1 / pc.radius
}

// Diameter returns the nominal (area-equivalent) diameter at s, linear from orifice_d at
// s = 0 to apical_d at the end of the centerline; s is clamped to the canal.
func (c *CanalSpec) Diameter(s float64) float64 {
	l := c.Length()
	if !(l > 0) {
		return c.OrificeD
	}
	f := min(max(s/l, 0), 1)
	return c.OrificeD + (c.ApicalD-c.OrificeD)*f
}

// At returns the exact point, unit tangent and oval long axis (a unit vector across the
// tangent) at arc length s, clamped to the canal.
func (c *CanalSpec) At(s float64) (point, tangent, longAxis mgl64.Vec3) {
	g := c.geometry()
	if len(g.pieces) == 0 {
		return mgl64.Vec3{}, mgl64.Vec3{0, 0, -1}, mgl64.Vec3{0, 1, 0}
	}
	pc, u := g.pieceAt(s)
	return pc.frameAt(u)
}

// maxCenterlineSamples bounds Centerline and Mesh: a finer ds is widened to fit.
const maxCenterlineSamples = 1_000_000

// canalStations returns n+1 arc lengths 0..L evenly spaced no wider than ds.
func canalStations(length, ds float64) []float64 {
	if !(ds > 0) {
		ds = 0.05
	}
	n := 1
	if length > 0 {
		n = int(math.Min(math.Ceil(length/ds), maxCenterlineSamples))
		n = max(n, 1)
	}
	s := make([]float64, n+1)
	for i := range s {
		s[i] = length * float64(i) / float64(n)
	}
	s[n] = length
	return s
}

// Centerline samples the exact centerline from the orifice (s = 0) to the end at even
// steps no longer than ds (the last sample is exactly at the end). Points lie exactly on
// the straight lines and circles of the spec.
func (c *CanalSpec) Centerline(ds float64) (pts, tangents []mgl64.Vec3, s []float64) {
	g := c.geometry()
	if len(g.pieces) == 0 {
		return nil, nil, nil
	}
	s = canalStations(g.length, ds)
	pts = make([]mgl64.Vec3, len(s))
	tangents = make([]mgl64.Vec3, len(s))
	for i, si := range s {
		pc, u := g.pieceAt(si)
		pts[i], tangents[i], _ = pc.frameAt(u)
	}
	return pts, tangents, s
}
