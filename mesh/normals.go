package mesh

import "github.com/go-gl/mathgl/mgl64"

// FaceNormal returns the unit normal of triangle t by the right-hand rule over its corner
// order (outward for a correctly oriented closed mesh); zero for a zero-area triangle.
func FaceNormal(m *Mesh, t int) mgl64.Vec3 {
	a, b, c := m.Corners(t)
	n := b.Sub(a).Cross(c.Sub(a))
	if l := n.Len(); l > 0 {
		return n.Mul(1 / l)
	}
	return mgl64.Vec3{}
}

// VertexNormals returns one unit normal per vertex: the area-weighted mean of the normals of
// the triangles around it (the unnormalised cross product already carries twice the area).
// A vertex used by no triangle of non-zero area gets the zero vector.
func VertexNormals(m *Mesh) []mgl64.Vec3 {
	out := make([]mgl64.Vec3, len(m.Vertices))
	nv := int32(len(m.Vertices))
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		a, b, c := m.Corners(t)
		n := b.Sub(a).Cross(c.Sub(a))
		for _, v := range tri {
			out[v] = out[v].Add(n)
		}
	}
	for i, n := range out {
		if l := n.Len(); l > 0 {
			out[i] = n.Mul(1 / l)
		}
	}
	return out
}
