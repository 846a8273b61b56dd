// Package mesh holds triangle meshes in millimetres: STL reading and writing, welding,
// normals, validation, area and volume, a BVH for ray casts and closest points,
// voxelising, surface extraction and tube sweeps. It knows nothing about canals.
package mesh

import "github.com/go-gl/mathgl/mgl64"

// Mesh is an indexed triangle mesh. Triangles list vertex indices counter-clockwise
// seen from outside, so normals point out of a closed mesh.
type Mesh struct {
	Vertices  []mgl64.Vec3
	Triangles [][3]int32
}

// Bounds returns the axis-aligned box of the vertices; for an empty mesh both corners are zero.
func (m *Mesh) Bounds() (lo, hi mgl64.Vec3) {
	if len(m.Vertices) == 0 {
		return
	}
	lo, hi = m.Vertices[0], m.Vertices[0]
	for _, v := range m.Vertices[1:] {
		for k := 0; k < 3; k++ {
			if v[k] < lo[k] {
				lo[k] = v[k]
			}
			if v[k] > hi[k] {
				hi[k] = v[k]
			}
		}
	}
	return
}

// Corners returns the three corners of triangle t.
func (m *Mesh) Corners(t int) (a, b, c mgl64.Vec3) {
	tri := m.Triangles[t]
	return m.Vertices[tri[0]], m.Vertices[tri[1]], m.Vertices[tri[2]]
}
