package models

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// ScanOptions say how a parametric canal is imaged as a scan would image it.
type ScanOptions struct {
	Voxel float64 // voxel edge, mm
	// Noise moves every surface vertex along its normal by a random amount in [-Noise, Noise] mm.
	Noise float64
	// PartialVolume images each voxel as the share of it inside the canal and takes the
	// surface where the image crosses one half; false gives a binary (segmented) image and a
	// stair-stepped surface.
	PartialVolume bool
	// BlurVoxels is the standard deviation, in voxels, of a Gaussian point spread applied to
	// a partial-volume image before its surface is taken.
	BlurVoxels float64
	// CutDeg tilts the plane that opens the orifice (as an access cavity leaves it) this far
	// from square to the canal, about an axis across the canal at CutTowardDeg around it.
	// The plane passes through the spec's s = 0, so the exact centerline still starts there.
	CutDeg, CutTowardDeg float64
	// Turn places the canal in the scanner's grid (a rotation about the origin); the zero
	// quaternion keeps the spec's own axes. Offset shifts the grid by a share of a voxel on
	// each axis; without a turn and with a zero offset a row of voxel centres lies on y = 0,
	// the plane of symmetry of a canal whose bends stay in the xz plane.
	Turn   mgl64.Quat
	Offset mgl64.Vec3
	Seed   int64
}

// ScanLike makes a canal surface that looks like a segmented CBCT or micro-CT export: the
// exact canal is imaged at `voxel` mm (a binary image, grid axes along the spec's, a row of
// voxel centres on its plane of symmetry), its surface extracted (stair steps and all), and
// every vertex moved along its normal by a deterministic random amount in [-noise, +noise]
// mm drawn from seed. The result stays closed. It fails when the apical diameter is under 4
// voxels (the tip would break up) or the noise could fold the surface.
func ScanLike(c *CanalSpec, voxel, noise float64, seed int64) (*mesh.Mesh, error) {
	if c == nil {
		return nil, fmt.Errorf("scan-like canal: no spec")
	}
	if !(voxel > 0) {
		return nil, fmt.Errorf("scan-like canal %q: voxel %g mm: want a positive size", c.Name, voxel)
	}
	if minD := min(c.ApicalD, c.OrificeD); minD < 4*voxel {
		return nil, fmt.Errorf("scan-like canal %q: apical diameter %.3g mm is under 4 voxels of %g mm; use a voxel of at most %.3g mm",
			c.Name, minD, voxel, minD/4)
	}
	if noise < 0 || noise > voxel/4 {
		return nil, fmt.Errorf("scan-like canal %q: noise %g mm: want 0 to a quarter voxel (%g mm)", c.Name, noise, voxel/4)
	}
	return Scan(c, ScanOptions{Voxel: voxel, Noise: noise, Seed: seed})
}

// Scan images a parametric canal as a scanner and a segmentation would: the canal's exact
// solid (its tube, its flat apical end, the orifice opened by a plane) sampled on a voxel
// grid, the surface taken from the image by marching cubes (Lorensen and Cline 1987), and
// vertex noise added. The exact centerline of the spec, turned by opt.Turn, is the truth
// the surface came from (see ScanTruth).
func Scan(c *CanalSpec, opt ScanOptions) (*mesh.Mesh, error) {
	if err := checkImaging("scan", c, opt.Voxel); err != nil {
		return nil, err
	}
	h := opt.Voxel
	if opt.Noise < 0 || opt.Noise > h/2 || opt.BlurVoxels < 0 || opt.BlurVoxels > 3 || !(opt.CutDeg >= 0 && opt.CutDeg < 60) {
		return nil, fmt.Errorf("scan of canal %q: noise %g mm (0 to half a voxel), blur %g voxels (0-3), cut %g deg (0-60) out of range",
			c.Name, opt.Noise, opt.BlurVoxels, opt.CutDeg)
	}
	f := newCanalSolid(c, opt)
	turn := unitTurn(opt.Turn)
	back := turn.Conjugate()
	// The box of the turned canal with room for the blur.
	n, origin, err := gridAround(f, turn, h, opt.margin(), opt.Offset)
	if err != nil {
		return nil, err
	}
	field := f.image(n, origin, h, back, opt.PartialVolume)
	if opt.PartialVolume && opt.BlurVoxels > 0 {
		gaussianBlur3(field, n, opt.BlurVoxels)
	}
	var m *mesh.Mesh
	if opt.PartialVolume {
		m = mesh.ExtractIsoSurface(field, n[0], n[1], n[2], origin, h, 0.5)
	} else {
		g := &mesh.Grid{Origin: origin, Voxel: h, NX: n[0], NY: n[1], NZ: n[2], Inside: make([]bool, len(field))}
		for i, v := range field {
			g.Inside[i] = v > 0.5
		}
		m = mesh.ExtractSurface(g)
	}
	if len(m.Triangles) == 0 {
		return nil, fmt.Errorf("scan of canal %q: nothing of the canal shows at %g mm voxels", c.Name, h)
	}
	if opt.Noise > 0 {
		normals := mesh.VertexNormals(m)
		rng := rand.New(rand.NewPCG(uint64(opt.Seed), 0x5ca11ce))
		for i := range m.Vertices {
			m.Vertices[i] = m.Vertices[i].Add(normals[i].Mul(opt.Noise * (2*rng.Float64() - 1)))
		}
	}
	return m, nil
}

// ScanTruth is the exact centerline of a scanned spec in the scan's coordinates, sampled
// every ds from the orifice (s = 0).
func ScanTruth(c *CanalSpec, opt ScanOptions, ds float64) []mgl64.Vec3 {
	turn := unitTurn(opt.Turn)
	pts, _, _ := c.Centerline(ds)
	for i, p := range pts {
		pts[i] = turn.Rotate(p)
	}
	return pts
}

// margin is the room a scan's grid leaves around the canal: three voxels and three spreads.
func (opt ScanOptions) margin() float64 { return (3 + 3*opt.BlurVoxels) * opt.Voxel }

// checkImaging refuses a missing or invalid spec or voxel for an imaging of kind ("scan",
// "CT").
func checkImaging(kind string, c *CanalSpec, h float64) error {
	if c == nil {
		return fmt.Errorf("%s of a canal: no spec", kind)
	}
	if err := c.Validate(); err != nil {
		return fmt.Errorf("%s of canal %q: %v", kind, c.Name, err)
	}
	if !(h > 0) || math.IsInf(h, 0) {
		return fmt.Errorf("%s of canal %q: voxel %g mm: want a positive size", kind, c.Name, h)
	}
	return nil
}

// unitTurn is q normalised; the zero quaternion keeps the spec's own axes.
func unitTurn(q mgl64.Quat) mgl64.Quat {
	if q.Len() == 0 {
		return mgl64.QuatIdent()
	}
	return q.Normalize()
}

// gridAround is the voxel grid of edge h over the turned solid with margin mm on every side,
// shifted by offset voxels: its size and the corner of its first voxel. Whole voxels from a
// multiple of h, so that with no offset a row of centres lies on 0.
func gridAround(f *canalSolid, turn mgl64.Quat, h, margin float64, offset mgl64.Vec3) (n [3]int, origin mgl64.Vec3, err error) {
	lo, hi := f.bounds(turn)
	for a := range 3 {
		first := math.Floor((lo[a]-margin)/h) - 0.5 + offset[a]
		n[a] = int(math.Ceil((hi[a]+margin)/h-first)) + 1
		origin[a] = first * h
	}
	if total := float64(n[0]) * float64(n[1]) * float64(n[2]); total > mesh.MaxGridVoxels {
		return n, origin, fmt.Errorf("image of canal %q: %.0f voxels of %g mm, more than %d", f.spec.Name, total, h, mesh.MaxGridVoxels)
	}
	return n, origin, nil
}

// canalSolid is the exact solid of a spec as a signed distance (negative inside), close to
// the true distance near the wall: the tube about the centerline with its elliptic section,
// the flat apical end, and a coronal run past s = 0 opened by the cut plane.
type canalSolid struct {
	spec    *CanalSpec
	path    canalPath
	length  float64
	oval    float64
	extra   float64    // straight run before s = 0 that the cut plane opens
	cutN    mgl64.Vec3 // outward normal of the cut plane through the point at s = 0
	end     mgl64.Vec3 // the apical end and its tangent
	endT    mgl64.Vec3
	maxSemi float64
	ends    float64 // the end planes bound only points this close (in s) to their end
	// chamber: no cut plane; the coronal run widens into a pulp chamber above (CT).
	chamber bool
}

func newCanalSolid(c *CanalSpec, opt ScanOptions) *canalSolid {
	f := &canalSolid{spec: c, path: buildCanalPath(c), length: c.Length(), oval: max(c.Oval, 1)}
	f.maxSemi = max(c.OrificeD, c.ApicalD) / 2 * math.Sqrt(f.oval)
	f.end, f.endT, _ = c.At(f.length)
	// The canal starts at the origin running down -z; the plane tilts about an axis across it.
	tilt := mgl64.DegToRad(opt.CutDeg)
	toward := mgl64.DegToRad(opt.CutTowardDeg)
	across := mgl64.Vec3{math.Cos(toward), math.Sin(toward), 0}
	f.cutN = canalRotate(mgl64.Vec3{0, 0, 1}, across, tilt)
	// The run must reach past the plane on every side of the canal (whose section widens
	// along the run), with voxels to spare.
	f.extra = 1.3*f.maxSemi*math.Tan(tilt) + 2*opt.Voxel + 0.2
	f.ends = 2*f.maxSemi + 1
	return f
}

// radius is the nominal section radius at s, the linear law carried past s = 0; with a
// chamber, the run past s = 0 widens into it over chamberRise.
func (f *canalSolid) radius(s float64) float64 {
	c := f.spec
	r := (c.OrificeD + (c.ApicalD-c.OrificeD)*s/f.length) / 2
	if f.chamber && s < 0 {
		r += (max(chamberRadius, r) - r) * min(-s/chamberRise, 1)
	}
	return r
}

// The pulp chamber above the orifice of a CT phantom (as volumetest/phantom.py draws one).
const (
	chamberRadius = 1.4 // mm
	chamberRise   = 0.8 // mm
)

// bounds is the box of the turned solid.
func (f *canalSolid) bounds(turn mgl64.Quat) (lo, hi mgl64.Vec3) {
	lo = mgl64.Vec3{math.Inf(1), math.Inf(1), math.Inf(1)}
	hi = lo.Mul(-1)
	grow := func(p mgl64.Vec3, r float64) {
		p = turn.Rotate(p)
		for a := range 3 {
			lo[a] = math.Min(lo[a], p[a]-r)
			hi[a] = math.Max(hi[a], p[a]+r)
		}
	}
	for s := -f.extra; s <= f.length+0.05; s += 0.05 {
		p, _, _ := f.at(s)
		grow(p, f.maxSemi*1.01+f.extra*0.01)
	}
	return lo, hi
}

// at is the centerline point, tangent and long axis at s, the first straight run carried
// back before s = 0.
func (f *canalSolid) at(s float64) (p, t, long mgl64.Vec3) {
	if s < 0 {
		p, t, long = f.path.pieces[0].frameAt(0)
		return p.Add(t.Mul(s)), t, long
	}
	pc, u := f.path.pieceAt(s)
	return pc.frameAt(u)
}

// nearest is the arc length of the centerline point nearest to p (the coronal run included).
func (f *canalSolid) nearest(p mgl64.Vec3) float64 {
	best, bestD := 0.0, math.Inf(1)
	try := func(s float64, q mgl64.Vec3) {
		if d := p.Sub(q).LenSqr(); d < bestD {
			best, bestD = s, d
		}
	}
	first := &f.path.pieces[0]
	{ // the coronal run, s in [-extra, 0]
		u := min(max(p.Sub(first.start).Dot(first.tangent), -f.extra), 0)
		try(u, first.start.Add(first.tangent.Mul(u)))
	}
	for k := range f.path.pieces {
		pc := &f.path.pieces[k]
		var u float64
		if pc.radius == 0 {
			u = min(max(p.Sub(pc.start).Dot(pc.tangent), 0), pc.length)
		} else {
			// In the arc's plane about its centre: angle from the start toward the tangent.
			centre := pc.start.Add(pc.bend.Mul(pc.radius))
			d := p.Sub(centre)
			phi := math.Atan2(d.Dot(pc.tangent), -d.Dot(pc.bend))
			span := pc.length / pc.radius
			if phi < 0 && phi < -(math.Pi-span/2) {
				phi += 2 * math.Pi // nearer the far end across the gap
			}
			u = min(max(phi, 0), span) * pc.radius
		}
		try(pc.s0+u, pc.pointAt(u))
	}
	return best
}

// distance is the signed distance from p (spec coordinates) to the wall, to first order in
// the ellipse.
func (f *canalSolid) distance(p mgl64.Vec3) float64 {
	d, _ := f.distanceAt(p)
	return d
}

// distanceAt is distance and the arc length of the centerline point nearest to p.
func (f *canalSolid) distanceAt(p mgl64.Vec3) (float64, float64) {
	s := f.nearest(p)
	c, t, long := f.at(s)
	q := p.Sub(c)
	q = q.Sub(t.Mul(q.Dot(t)))
	r := f.radius(s)
	a, b := r*math.Sqrt(f.oval), r/math.Sqrt(f.oval)
	x, y := q.Dot(long), q.Dot(t.Cross(long))
	g := math.Hypot(x/a, y/b)
	var d float64
	if g < 1e-12 {
		d = -b
	} else {
		// (g - 1)/|grad g|: exact for a circle, first order for an ellipse.
		d = (g - 1) * g / math.Hypot(x/(a*a), y/(b*b))
	}
	if s > f.length-f.ends {
		d = math.Max(d, p.Sub(f.end).Dot(f.endT))
	}
	if s < f.ends && !f.chamber {
		d = math.Max(d, p.Dot(f.cutN)) // the cut plane passes through the origin (s = 0)
	}
	return d, s
}

// image samples the solid on the grid: 1 inside and 0 outside for a binary image; with
// partial volume the share of each voxel inside (the distance ramped over one voxel).
func (f *canalSolid) image(n [3]int, origin mgl64.Vec3, h float64, back mgl64.Quat, partial bool) []float32 {
	value := func(d float64) float32 {
		if !partial {
			if d < 0 {
				return 1
			}
			return 0
		}
		return float32(min(max(0.5-d/h, 0), 1))
	}
	return f.sample(n, origin, h, back, func(d, _ float64, _ mgl64.Vec3) float32 { return value(d) }, func(d, _ float64, _ mgl64.Vec3) bool { return math.Abs(d) > sampleReach(h) })
}

// sample fills the grid with value(signed distance, its arc length, the point in spec
// coordinates) at every voxel centre. Blocks of 4^3 voxels whose centre far(d, s, p) says lies
// more than sampleReach from wherever value changes are filled at once from their centre.
func (f *canalSolid) sample(n [3]int, origin mgl64.Vec3, h float64, back mgl64.Quat,
	value func(d, s float64, p mgl64.Vec3) float32, far func(d, s float64, p mgl64.Vec3) bool) []float32 {
	field := make([]float32, n[0]*n[1]*n[2])
	const blk = 4
	centre := func(i, j, k float64) mgl64.Vec3 {
		return back.Rotate(origin.Add(mgl64.Vec3{i + 0.5, j + 0.5, k + 0.5}.Mul(h)))
	}
	at := func(p mgl64.Vec3) float32 {
		d, s := f.distanceAt(p)
		return value(d, s, p)
	}
	for k0 := 0; k0 < n[2]; k0 += blk {
		for j0 := 0; j0 < n[1]; j0 += blk {
			for i0 := 0; i0 < n[0]; i0 += blk {
				p := centre(float64(i0)+blk/2-0.5, float64(j0)+blk/2-0.5, float64(k0)+blk/2-0.5)
				d, s := f.distanceAt(p)
				fill, uniform := value(d, s, p), far(d, s, p)
				for k := k0; k < min(k0+blk, n[2]); k++ {
					for j := j0; j < min(j0+blk, n[1]); j++ {
						for i := i0; i < min(i0+blk, n[0]); i++ {
							v := fill
							if !uniform {
								v = at(centre(float64(i), float64(j), float64(k)))
							}
							field[i+n[0]*(j+n[1]*k)] = v
						}
					}
				}
			}
		}
	}
	return field
}

// sampleReach is how far from a block's centre its voxels lie, with room: the distance is
// close to 1-Lipschitz near the wall.
func sampleReach(h float64) float64 { return 1.6*4*h*math.Sqrt(3)/2 + 2*h }

// gaussianBlur3 smooths the field with a Gaussian of sigma voxels, one axis at a time.
func gaussianBlur3(field []float32, n [3]int, sigma float64) {
	half := int(math.Ceil(3 * sigma))
	w := make([]float64, 2*half+1)
	sum := 0.0
	for k := range w {
		x := float64(k - half)
		w[k] = math.Exp(-0.5 * x * x / (sigma * sigma))
		sum += w[k]
	}
	for k := range w {
		w[k] /= sum
	}
	stride := [3]int{1, n[0], n[0] * n[1]}
	line := make([]float64, max(n[0], n[1], n[2]))
	for a := range 3 {
		b, c := (a+1)%3, (a+2)%3
		for jb := 0; jb < n[b]; jb++ {
			for jc := 0; jc < n[c]; jc++ {
				base := jb*stride[b] + jc*stride[c]
				for q := 0; q < n[a]; q++ {
					line[q] = float64(field[base+q*stride[a]])
				}
				for q := 0; q < n[a]; q++ {
					acc := 0.0
					for k := -half; k <= half; k++ {
						if p := q + k; p >= 0 && p < n[a] {
							acc += w[k+half] * line[p]
						}
					}
					field[base+q*stride[a]] = float32(acc)
				}
			}
		}
	}
}
