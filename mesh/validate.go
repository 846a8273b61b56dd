package mesh

import (
	"fmt"
	"slices"

	"github.com/go-gl/mathgl/mgl64"
)

// Report describes how well a mesh bounds a solid.
type Report struct {
	Triangles, Vertices int
	// BoundaryEdges are used by one triangle only (the rims of holes or open ends).
	BoundaryEdges int
	// NonManifoldEdges are shared by more than two triangles.
	NonManifoldEdges int
	// Degenerate triangles repeat a vertex or have zero area.
	Degenerate int
	// Shells counts pieces connected through shared vertices.
	Shells int
	// InconsistentOrientation counts edges whose two triangles run it the same way,
	// i.e. one of them faces the wrong side.
	InconsistentOrientation int
	Closed, Manifold        bool
	// SignedVolume is the enclosed volume (mm3) by the divergence theorem, negative when the
	// triangles face in; meaningful only for a closed surface.
	SignedVolume float64
}

// Validate checks edges, orientation, degenerate triangles and connectivity.
// Triangles whose indices are out of range count as degenerate and are otherwise ignored.
func Validate(m *Mesh) Report {
	return validate(m, func() TriangleSums { return SumTriangles(m) }, 0, false)
}

// ValidateWithSums is Validate for a mesh whose sums are known (s is SumTriangles(m)): the
// triangles' shapes are not read again.
func ValidateWithSums(m *Mesh, s TriangleSums) Report {
	return validate(m, func() TriangleSums { return s }, 0, false)
}

// validate counts edges and shells on two cores (the edges of triangles in scattered order on
// up to workers cores, 0 for all); sums (called beside the edges, after the shells) gives the
// report's SignedVolume and Degenerate, as SumTriangles(m) would. everyVertexUsed is
// countShells'.
func validate(m *Mesh, sums func() TriangleSums, workers int, everyVertexUsed bool) Report {
	r := Report{Triangles: len(m.Triangles), Vertices: len(m.Vertices)}
	done := make(chan struct{})
	go func() {
		r.Shells = countShells(m, everyVertexUsed)
		s := sums()
		r.SignedVolume, r.Degenerate = s.SignedVolume, s.Degenerate
		close(done)
	}()
	r.BoundaryEdges, r.NonManifoldEdges, r.InconsistentOrientation = edgeCounts(m, workers)
	<-done
	r.Closed = r.BoundaryEdges == 0 && len(m.Triangles) > 0
	r.Manifold = r.NonManifoldEdges == 0
	return r
}

// Warnings returns plain-language problems, each with a way to fix it.
func (r Report) Warnings() []string {
	var w []string
	if r.Triangles == 0 {
		return append(w, "the surface has no triangles; load a file that contains a surface")
	}
	if r.Shells > 1 {
		w = append(w, fmt.Sprintf("the file holds %d separate surfaces; all were kept. "+
			"If only one of them is the canal, keep it with --shell N (1 = the largest, 2 = the next, ...)", r.Shells))
	}
	if r.BoundaryEdges > 0 {
		w = append(w, fmt.Sprintf("the surface is not closed: %d edges border holes or open ends. "+
			"Close the holes (or cap the ends) before export; measurements that need an inside may be wrong", r.BoundaryEdges))
	}
	if r.NonManifoldEdges > 0 {
		w = append(w, fmt.Sprintf("%d edges are shared by more than two triangles. "+
			"Repair the surface so each edge joins exactly two triangles, or re-export it from the segmentation", r.NonManifoldEdges))
	}
	if r.InconsistentOrientation > 0 {
		w = append(w, fmt.Sprintf("%d edges join triangles that face opposite ways. "+
			"Re-export with consistent normals (all facing out), or repair the surface", r.InconsistentOrientation))
	}
	if r.Degenerate > 0 {
		w = append(w, fmt.Sprintf("%d triangles have zero area or a repeated corner. "+
			"They carry no surface; remove them (loading a file does this for you)", r.Degenerate))
	}
	return w
}

// isDegenerate reports a repeated or out-of-range index, or exactly zero area.
func isDegenerate(m *Mesh, t int) bool {
	tri := m.Triangles[t]
	n := int32(len(m.Vertices))
	for _, v := range tri {
		if v < 0 || v >= n {
			return true
		}
	}
	if tri[0] == tri[1] || tri[1] == tri[2] || tri[0] == tri[2] {
		return true
	}
	a, b, c := &m.Vertices[tri[0]], &m.Vertices[tri[1]], &m.Vertices[tri[2]]
	ux, uy, uz := b[0]-a[0], b[1]-a[1], b[2]-a[2]
	vx, vy, vz := c[0]-a[0], c[1]-a[1], c[2]-a[2]
	return uy*vz-uz*vy == 0 && uz*vx-ux*vz == 0 && ux*vy-uy*vx == 0
}

func triInRange(tri [3]int32, n int32) bool {
	return tri[0] >= 0 && tri[0] < n && tri[1] >= 0 && tri[1] < n && tri[2] >= 0 && tri[2] < n
}

// halfEdges buckets every half-edge under its smaller vertex (a counting sort, no hash map):
// entries[start[v]:start[v+1]] hold, for the edges whose smaller vertex is v, the other vertex
// << 1 | a direction bit (1 when the half-edge runs high to low): 32 bits hold any int32
// vertex that way, and half the bytes of 64 make the random writes of a mesh whose vertices
// are numbered out of triangle order cheaper. With withTris, tris holds
// each entry's triangle << 2 | its edge number (0..2).
func halfEdges(m *Mesh, withTris bool) (start []int32, entries []uint32, tris []int32) {
	nv := int32(len(m.Vertices))
	start = make([]int32, nv+1)
	for _, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		for k := 0; k < 3; k++ {
			a, b := tri[k], tri[(k+1)%3]
			if a == b {
				continue
			}
			start[min(a, b)+1]++
		}
	}
	for i := int32(0); i < nv; i++ {
		start[i+1] += start[i]
	}
	entries = make([]uint32, start[nv])
	if withTris {
		tris = make([]int32, start[nv])
	}
	fill := slices.Clone(start[:nv])
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		for k := 0; k < 3; k++ {
			a, b := tri[k], tri[(k+1)%3]
			if a == b {
				continue
			}
			lo, hi, dir := a, b, uint32(0)
			if b < a {
				lo, hi, dir = b, a, 1
			}
			entries[fill[lo]] = uint32(hi)<<1 | dir
			if withTris {
				tris[fill[lo]] = int32(t)<<2 | int32(k)
			}
			fill[lo]++
		}
	}
	return start, entries, tris
}

// edgeCounts counts how many triangles use each undirected edge and in which directions:
// from halfEdges' buckets for triangles in build order, whose vertices' half-edges come
// nearly in order, else by ranges of vertices on up to workers cores (0: all).
func edgeCounts(m *Mesh, workers int) (boundary, nonManifold, inconsistent int) {
	if !edgesLocal(m) {
		return edgeCountsInRanges(m, workers)
	}
	start, entries, _ := halfEdges(m, false)
	var c edgeTally
	for v := range int32(len(start) - 1) {
		c.sorted(entries[start[v]:start[v+1]])
	}
	return c.boundary, c.nonManifold, c.inconsistent
}

// edgeTally classifies the undirected edges of buckets of half-edges (other vertex << 1 |
// direction bit) that share their smaller vertex.
type edgeTally struct{ boundary, nonManifold, inconsistent int }

// sorted sorts the bucket and classifies each run of one edge: cheap when the half-edges
// come nearly in order, as from triangles in build order.
func (c *edgeTally) sorted(bucket []uint32) {
	sortKeys(bucket)
	tallySortedKeys(c, bucket)
}

// b2i is 1 for true, 0 for false (compiled to a flag move, no branch).
func b2i(b bool) int {
	var i int
	if b {
		i = 1
	}
	return i
}

// edgesLocal samples the triangle list: true when consecutive triangles mostly have nearby
// smallest vertices (a file written in the order its surface was built), whose vertices'
// half-edges then come mostly in order.
func edgesLocal(m *Mesh) bool {
	const step = 61 // a sample of pairs spread over the list
	far, n := 0, 0
	for t := step; t < len(m.Triangles); t += step {
		a, b := m.Triangles[t-1], m.Triangles[t]
		d := min(a[0], a[1], a[2]) - min(b[0], b[1], b[2])
		if d < -4096 || d > 4096 {
			far++
		}
		n++
	}
	return far*4 <= n
}

// vertexUnion joins the vertices of every triangle; find returns a vertex's shell root, the
// shell's smallest vertex.
type vertexUnion []int32

// newVertexUnion joins the vertices of every triangle with an index in range; used, when not
// nil, is set for every vertex such a triangle uses.
func newVertexUnion(m *Mesh, used []bool) vertexUnion {
	u := make(vertexUnion, len(m.Vertices))
	for i := range u {
		u[i] = int32(i)
	}
	nv := int32(len(m.Vertices))
	for _, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		// Three finds a triangle, not four: the root of the first two is known.
		r := u.link(u.find(tri[0]), u.find(tri[1]))
		u.link(r, u.find(tri[2]))
		if used != nil {
			used[tri[0]], used[tri[1]], used[tri[2]] = true, true, true
		}
	}
	return u
}

func (u vertexUnion) find(x int32) int32 {
	for u[x] != x {
		u[x] = u[u[x]] // path halving
		x = u[x]
	}
	return x
}

// link joins two roots and returns the joint root: the smaller index, so roots never depend
// on anything but the input.
func (u vertexUnion) link(ra, rb int32) int32 {
	if ra < rb {
		u[rb] = ra
		return ra
	}
	u[ra] = rb
	return rb
}

// countShells counts the shell roots among the vertices the triangles use: one pass over the
// vertices in order, where a pass over the triangles would find each one's root again, at
// random in a file whose triangles are scattered. everyVertexUsed says that every vertex is a
// corner of a triangle with its indices in range (as in every mesh Load returns): then the
// vertices need not be marked, a random write per corner in such a file.
func countShells(m *Mesh, everyVertexUsed bool) int {
	var used []bool
	if !everyVertexUsed {
		used = make([]bool, len(m.Vertices))
	}
	u := newVertexUnion(m, used)
	n := 0
	for v, r := range u {
		n += b2i(r == int32(v) && (everyVertexUsed || used[v]))
	}
	return n
}

// Shells returns the triangle indices of each connected shell (pieces joined through shared
// vertices), largest first; ties go to the shell whose first triangle comes first. Each list is
// in ascending order. Triangles with out-of-range indices belong to no shell.
func Shells(m *Mesh) [][]int32 {
	u := newVertexUnion(m, nil)
	nv := int32(len(m.Vertices))
	shellOf := map[int32]int{} // root -> shell number in order of first triangle
	var shells [][]int32
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		r := u.find(tri[0])
		s, ok := shellOf[r]
		if !ok {
			s = len(shells)
			shellOf[r] = s
			shells = append(shells, nil)
		}
		shells[s] = append(shells[s], int32(t))
	}
	// Stable: equal sizes keep first-triangle order.
	slices.SortStableFunc(shells, func(a, b []int32) int { return len(b) - len(a) })
	return shells
}

// Subset returns a new mesh made of the given triangles (in the given order) and only the
// vertices they use, which keep their relative order. Out-of-range indices are skipped.
func (m *Mesh) Subset(tris []int32) *Mesh {
	nv := int32(len(m.Vertices))
	newIndex := make([]int32, nv)
	for i := range newIndex {
		newIndex[i] = -1
	}
	out := &Mesh{Triangles: make([][3]int32, 0, len(tris))}
	for _, t := range tris {
		if t < 0 || int(t) >= len(m.Triangles) || !triInRange(m.Triangles[t], nv) {
			continue
		}
		for _, v := range m.Triangles[t] {
			newIndex[v] = 0
		}
	}
	n := int32(0)
	for v := range newIndex {
		if newIndex[v] == 0 {
			newIndex[v] = n
			n++
		}
	}
	out.Vertices = make([]mgl64.Vec3, 0, n)
	for v, ni := range newIndex {
		if ni >= 0 {
			out.Vertices = append(out.Vertices, m.Vertices[v])
		}
	}
	for _, t := range tris {
		if t < 0 || int(t) >= len(m.Triangles) || !triInRange(m.Triangles[t], nv) {
			continue
		}
		tri := m.Triangles[t]
		out.Triangles = append(out.Triangles, [3]int32{newIndex[tri[0]], newIndex[tri[1]], newIndex[tri[2]]})
	}
	return out
}

// LargestShell returns the shell with the most triangles as a mesh of its own
// (an empty mesh if m has none).
func LargestShell(m *Mesh) *Mesh {
	shells := Shells(m)
	if len(shells) == 0 {
		return &Mesh{}
	}
	return m.Subset(shells[0])
}
