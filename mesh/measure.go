package mesh

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// Area returns the total surface area (mm2).
func Area(m *Mesh) float64 {
	area, _ := AreaVolume(m)
	return area
}

// Volume returns the enclosed volume (mm3) by the divergence theorem: the sum over triangles
// of the signed tetrahedra they span with a reference point. Positive when the normals face
// out; meaningful only for a closed mesh. The reference is the centre of the bounding box,
// which keeps the terms small for meshes far from the origin.
func Volume(m *Mesh) float64 {
	_, vol := AreaVolume(m)
	return vol
}

// AreaVolume is Area and Volume from one pass over the triangles: a huge mesh is read once,
// not twice.
func AreaVolume(m *Mesh) (area, vol float64) {
	s := SumTriangles(m)
	return s.Area, s.Volume
}

// TriangleSums are a mesh's sums over its triangles, from one pass over them: what
// AreaVolume gives and what Validate reports of each triangle's shape, so that a caller that
// needs both reads a huge mesh once (see ValidateWithSums).
type TriangleSums struct {
	// Area and Volume are AreaVolume's.
	Area, Volume float64
	// SignedVolume and Degenerate are Validate's (Report.SignedVolume, Report.Degenerate).
	SignedVolume float64
	Degenerate   int
}

// SumTriangles gives m's TriangleSums. Volume's reference point is the centre of the bounding
// box, SignedVolume's the first vertex (the sums differ in their last bits).
func SumTriangles(m *Mesh) TriangleSums {
	var s TriangleSums
	if len(m.Vertices) == 0 {
		s.Degenerate = len(m.Triangles) // every index is out of range
		return s
	}
	lo, hi := m.Bounds()
	ref := lo.Add(hi).Mul(0.5)
	r0 := m.Vertices[0]
	nv := int32(len(m.Vertices))
	signed := 0.0
	// Scalars rather than mgl64.Vec3 (arrays the compiler keeps in memory), with the very
	// operations of Sub, Cross, Dot and Len in the order they were written before: area
	// b.Sub(a).Cross(c.Sub(a)).Len() / 2, volume a.Dot(b.Cross(c)) / 6 of the corners less
	// ref, the signed volume's terms the same less the first vertex and divided by 6 at the
	// end; isDegenerate's zero test is on the area's cross product.
	for _, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			s.Degenerate++
			continue
		}
		a, b, c := &m.Vertices[tri[0]], &m.Vertices[tri[1]], &m.Vertices[tri[2]]
		ax, ay, az := a[0], a[1], a[2]
		bx, by, bz := b[0], b[1], b[2]
		cx, cy, cz := c[0], c[1], c[2]
		ux, uy, uz := bx-ax, by-ay, bz-az
		vx, vy, vz := cx-ax, cy-ay, cz-az
		nx, ny, nz := uy*vz-uz*vy, uz*vx-ux*vz, ux*vy-uy*vx
		s.Area += math.Sqrt(nx*nx+ny*ny+nz*nz) / 2
		if nx == 0 && ny == 0 && nz == 0 || tri[0] == tri[1] || tri[1] == tri[2] || tri[0] == tri[2] {
			s.Degenerate++
		}
		s.Volume += tripleProduct(ax-ref[0], ay-ref[1], az-ref[2], bx-ref[0], by-ref[1], bz-ref[2], cx-ref[0], cy-ref[1], cz-ref[2]) / 6
		signed += tripleProduct(ax-r0[0], ay-r0[1], az-r0[2], bx-r0[0], by-r0[1], bz-r0[2], cx-r0[0], cy-r0[1], cz-r0[2])
	}
	s.SignedVolume = signed / 6
	return s
}

// tripleProduct is a.Dot(b.Cross(c)) with mgl64's operations in their order.
func tripleProduct(ax, ay, az, bx, by, bz, cx, cy, cz float64) float64 {
	return ax*(by*cz-bz*cy) + ay*(bz*cx-bx*cz) + az*(bx*cy-by*cx)
}

// signedVolume is Validate's signed volume (see SumTriangles).
func signedVolume(m *Mesh) float64 {
	return SumTriangles(m).SignedVolume
}

// Centroid returns the centre of mass of the enclosed solid (uniform density) for a closed
// mesh. When the mesh encloses no volume (open or flat) it returns the area-weighted centre
// of the surface instead, and the mean of the vertices when even the area is zero.
func Centroid(m *Mesh) mgl64.Vec3 {
	v, first := volumeMoments(m)
	lo, hi := m.Bounds()
	ref := lo.Add(hi).Mul(0.5)
	if area := Area(m); v != 0 && math.Abs(v) > 1e-9*area*hi.Sub(lo).Len() {
		return ref.Add(first.Mul(1 / v))
	}
	var sum mgl64.Vec3
	total := 0.0
	nv := int32(len(m.Vertices))
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		a, b, c := m.Corners(t)
		ar := b.Sub(a).Cross(c.Sub(a)).Len() / 2
		sum = sum.Add(a.Add(b).Add(c).Mul(ar / 3))
		total += ar
	}
	if total > 0 {
		return sum.Mul(1 / total)
	}
	if len(m.Vertices) == 0 {
		return mgl64.Vec3{}
	}
	for _, p := range m.Vertices {
		sum = sum.Add(p)
	}
	return sum.Mul(1 / float64(len(m.Vertices)))
}

// volumeMoments returns the signed volume and its first moment about the bounding-box centre.
// A tetrahedron (ref, a, b, c) has volume a.(b x c)/6 and centroid (a+b+c)/4 relative to ref.
func volumeMoments(m *Mesh) (vol float64, first mgl64.Vec3) {
	lo, hi := m.Bounds()
	ref := lo.Add(hi).Mul(0.5)
	nv := int32(len(m.Vertices))
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		a, b, c := m.Corners(t)
		a, b, c = a.Sub(ref), b.Sub(ref), c.Sub(ref)
		v := a.Dot(b.Cross(c)) / 6
		vol += v
		first = first.Add(a.Add(b).Add(c).Mul(v / 4))
	}
	return
}
