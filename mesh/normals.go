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

// OrientConsistently turns triangles over so that every two triangles sharing an edge run it
// in opposite directions (one orientation per shell), then turns a whole shell over when it
// encloses a negative volume, so normals face out. It returns how many triangles were turned.
//
// A surface with mixed winding encloses almost no signed volume; everything sized from the
// volume (the voxel of the centerline search is 2V/A / 8) then comes out tiny, and the search
// runs over up to 46 times as many voxels. Edges shared by more than two triangles link
// nothing; a shell that cannot be oriented (a one-sided strip) keeps what the walk gives.
func OrientConsistently(m *Mesh) int {
	nt := len(m.Triangles)
	if nt == 0 {
		return 0
	}
	start, entries, tris := halfEdges(m, true)
	// nb[3t+k]: the triangle across edge k of t, << 1 | 1 when both run that edge the same way;
	// -1 when the edge is a border or shared by more than two.
	nb := make([]int32, 3*nt)
	for i := range nb {
		nb[i] = -1
	}
	for v := range len(start) - 1 {
		e, tr := entries[start[v]:start[v+1]], tris[start[v]:start[v+1]]
		// Insertion sort by other vertex, carrying the triangles (buckets are small).
		for i := 1; i < len(e); i++ {
			for j := i; j > 0 && e[j-1] > e[j]; j-- {
				e[j-1], e[j] = e[j], e[j-1]
				tr[j-1], tr[j] = tr[j], tr[j-1]
			}
		}
		for i := 0; i < len(e); {
			j := i + 1
			for j < len(e) && e[j]>>1 == e[i]>>1 {
				j++
			}
			if j-i == 2 {
				same := int32(0)
				if e[i]&1 == e[i+1]&1 {
					same = 1
				}
				ta, tb := tr[i]>>2, tr[i+1]>>2
				nb[3*ta+tr[i]&3] = tb<<1 | same
				nb[3*tb+tr[i+1]&3] = ta<<1 | same
			}
			i = j
		}
	}
	lo, hi := m.Bounds()
	ref := lo.Add(hi).Mul(0.5)
	flip := make([]bool, nt)
	seen := make([]bool, nt)
	nv := int32(len(m.Vertices))
	var comp []int32
	for s := range nt {
		if seen[s] || !triInRange(m.Triangles[s], nv) {
			continue
		}
		// Walk the shell from its first triangle, which keeps its winding.
		seen[s] = true
		comp = append(comp[:0], int32(s))
		for q := 0; q < len(comp); q++ {
			t := comp[q]
			for k := range int32(3) {
				x := nb[3*t+k]
				if x < 0 {
					continue
				}
				if u := x >> 1; !seen[u] {
					seen[u] = true
					flip[u] = flip[t] != (x&1 == 1)
					comp = append(comp, u)
				}
			}
		}
		vol := 0.0
		for _, t := range comp {
			a, b, c := m.Corners(int(t))
			v := a.Sub(ref).Dot(b.Sub(ref).Cross(c.Sub(ref)))
			if flip[t] {
				v = -v
			}
			vol += v
		}
		if vol < 0 {
			for _, t := range comp {
				flip[t] = !flip[t]
			}
		}
	}
	turned := 0
	for t, f := range flip {
		if f {
			m.Triangles[t][1], m.Triangles[t][2] = m.Triangles[t][2], m.Triangles[t][1]
			turned++
		}
	}
	return turned
}
