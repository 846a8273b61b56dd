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
	lo, hi := m.Bounds()
	ref := lo.Add(hi).Mul(0.5)
	nv := int32(len(m.Vertices))
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		a, b, c := m.Corners(t)
		area += b.Sub(a).Cross(c.Sub(a)).Len() / 2
		a, b, c = a.Sub(ref), b.Sub(ref), c.Sub(ref)
		vol += a.Dot(b.Cross(c)) / 6
	}
	return area, vol
}

// signedVolume is Volume without the first moment or the bounding box (the reference point is
// the first vertex): what Validate reports.
func signedVolume(m *Mesh) float64 {
	if len(m.Vertices) == 0 {
		return 0
	}
	ref := m.Vertices[0]
	nv := int32(len(m.Vertices))
	vol := 0.0
	for _, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		a, b, c := m.Vertices[tri[0]].Sub(ref), m.Vertices[tri[1]].Sub(ref), m.Vertices[tri[2]].Sub(ref)
		vol += a.Dot(b.Cross(c))
	}
	return vol / 6
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
