package mesh

import (
	"math/bits"
	"math/rand/v2"
	"testing"
)

// edgeCountsByDefinition counts the edges straight from their definition (an undirected edge
// used by one triangle borders a hole, by more than two is non-manifold, by two that run it
// the same way joins triangles facing opposite ways), with a map: the reference for both ways
// edgeCounts buckets the half-edges.
func edgeCountsByDefinition(m *Mesh) (boundary, nonManifold, inconsistent int) {
	type use struct{ n, fwd int }
	uses := map[[2]int32]use{}
	nv := int32(len(m.Vertices))
	for _, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		for k := range 3 {
			a, b := tri[k], tri[(k+1)%3]
			if a == b {
				continue
			}
			key, fwd := [2]int32{a, b}, 1
			if b < a {
				key, fwd = [2]int32{b, a}, 0
			}
			u := uses[key]
			uses[key] = use{u.n + 1, u.fwd + fwd}
		}
	}
	for _, u := range uses {
		switch {
		case u.n == 1:
			boundary++
		case u.n > 2:
			nonManifold++
		case u.fwd != 1:
			inconsistent++
		}
	}
	return
}

// Both ways of counting edges (buckets of every vertex for triangles in build order, ranges of
// vertices for scattered ones) must give the definition's counts, whatever the order: on a
// closed tube, with holes, flipped triangles, fans of up to 40 triangles on one edge, repeated
// corners and out-of-range indices. The ranges are tried on 1 to 3 cores, with keys of 32 and
// 64 bits and ranges of 1 to 4096 vertices (many ranges, and ranges of many pages).
func TestEdgeCountsMatchDefinitionInAnyOrder(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 13))
	for trial := range 24 {
		m := shapeCanalLike(12+trial%5*7, 10+trial*3)
		nv := int32(len(m.Vertices))
		if trial%2 == 1 {
			m.Triangles = m.Triangles[rng.IntN(5):] // a hole or none
			for range rng.IntN(20) {
				i := rng.IntN(len(m.Triangles))
				tr := m.Triangles[i]
				m.Triangles[i] = [3]int32{tr[0], tr[2], tr[1]}
			}
		}
		if trial%3 == 2 {
			a, b := m.Triangles[0][0], m.Triangles[0][1]
			for range 1 + rng.IntN(40) {
				m.Triangles = append(m.Triangles, [3]int32{a, b, rng.Int32N(nv)})
			}
			m.Triangles = append(m.Triangles, [3]int32{a, a, b}, [3]int32{a, nv, b}, [3]int32{-1, a, b})
		}
		if trial%4 >= 2 {
			rng.Shuffle(len(m.Triangles), func(i, j int) { m.Triangles[i], m.Triangles[j] = m.Triangles[j], m.Triangles[i] })
		}
		wb, wn, wi := edgeCountsByDefinition(m)
		if b, n, i := edgeCounts(m, 0); b != wb || n != wn || i != wi {
			t.Errorf("trial %d (local %v): edgeCounts %d %d %d, by definition %d %d %d", trial, edgesLocal(m), b, n, i, wb, wn, wi)
		}
		_, hiBits, _ := rangeLayout(nv)
		for _, workers := range []int{1, 2, 3} {
			if b, n, i := edgeCountsInRanges(m, workers); b != wb || n != wn || i != wi {
				t.Errorf("trial %d: by ranges on %d cores %d %d %d, by definition %d %d %d", trial, workers, b, n, i, wb, wn, wi)
			}
			for _, shift := range []uint{0, 3, 12, 14, 20} {
				counts := []edgeTally{countInRanges[uint64](m, shift, hiBits, workers)}
				if shift+hiBits <= 32 {
					counts = append(counts, countInRanges[uint32](m, shift, hiBits, workers))
				}
				for narrow, c := range counts {
					if c != (edgeTally{wb, wn, wi}) {
						t.Errorf("trial %d: by ranges of %d vertices (32-bit keys %d) on %d cores %v, by definition %d %d %d", trial, 1<<shift, narrow, workers, c, wb, wn, wi)
					}
				}
			}
		}
	}
}

// The ranges' layout keeps every key within its type and a range's place within the radix
// sort's two digits of up to 13 bits, for any number of vertices a mesh can index.
func TestRangeLayoutFitsKeys(t *testing.T) {
	for _, nv := range []int32{1, 2, 4095, 4096, 4097, 1 << 16, 524_288, 1_000_000, 1 << 20, 2_000_000, 24_000_000, 1<<31 - 1} {
		shift, hiBits, wide := rangeLayout(nv)
		if hiBits < uint(bits.Len32(uint32(nv-1)))+1 {
			t.Errorf("%d vertices: %d bits cannot hold the other vertex and direction", nv, hiBits)
		}
		width := uint(32)
		if wide {
			width = 64
		}
		if shift+hiBits > width {
			t.Errorf("%d vertices: keys of %d bits in %d", nv, shift+hiBits, width)
		}
		if shift > 26 {
			t.Errorf("%d vertices: ranges of 2^%d vertices", nv, shift)
		}
		if ranges := nv>>shift + 1; ranges > 1024 {
			t.Errorf("%d vertices: %d ranges", nv, ranges)
		}
	}
}

// allTriangles lists every triangle of m.
func allTriangles(m *Mesh) []int32 {
	all := make([]int32, len(m.Triangles))
	for t := range all {
		all[t] = int32(t)
	}
	return all
}

// shellsByDefinition counts the pieces of the triangles with indices in range, joined through
// shared vertices, by a breadth-first search from triangle to triangle through a map of each
// vertex's triangles.
func shellsByDefinition(m *Mesh) int {
	nv := int32(len(m.Vertices))
	of := map[int32][]int{}
	for t, tri := range m.Triangles {
		if triInRange(tri, nv) {
			for _, v := range tri {
				of[v] = append(of[v], t)
			}
		}
	}
	seen := make([]bool, len(m.Triangles))
	n := 0
	for t, tri := range m.Triangles {
		if seen[t] || !triInRange(tri, nv) {
			continue
		}
		n++
		seen[t] = true
		queue := []int{t}
		for len(queue) > 0 {
			u := queue[0]
			queue = queue[1:]
			for _, v := range m.Triangles[u] {
				for _, w := range of[v] {
					if !seen[w] {
						seen[w] = true
						queue = append(queue, w)
					}
				}
			}
		}
	}
	return n
}

// countShells and Shells must find the definition's pieces in any triangle order: several
// tubes (some sharing a vertex, which joins them), vertices no triangle uses, triangles of one
// repeated vertex, and out-of-range indices.
func TestShellsMatchDefinitionInAnyOrder(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 9))
	for trial := range 20 {
		var parts []*Mesh
		for range 1 + rng.IntN(4) {
			parts = append(parts, shapeCanalLike(6+rng.IntN(10), 3+rng.IntN(8)))
		}
		m := shapeMerge(parts...)
		nv := int32(len(m.Vertices))
		for range rng.IntN(6) {
			m.Vertices = append(m.Vertices, m.Vertices[0]) // used by no triangle
		}
		for range rng.IntN(4) {
			switch v := rng.Int32N(int32(len(m.Vertices))); rng.IntN(3) {
			case 0:
				m.Triangles = append(m.Triangles, [3]int32{v, v, v})
			case 1:
				m.Triangles = append(m.Triangles, [3]int32{v, rng.Int32N(nv), rng.Int32N(nv)})
			default:
				m.Triangles = append(m.Triangles, [3]int32{v, -1, int32(len(m.Vertices))})
			}
		}
		rng.Shuffle(len(m.Triangles), func(i, j int) { m.Triangles[i], m.Triangles[j] = m.Triangles[j], m.Triangles[i] })
		want := shellsByDefinition(m)
		if got := countShells(m, false); got != want {
			t.Errorf("trial %d: countShells %d, by definition %d", trial, got, want)
		}
		whole := m.Subset(allTriangles(m)) // every vertex used, every index in range
		if got, want := countShells(whole, true), shellsByDefinition(whole); got != want {
			t.Errorf("trial %d: countShells of every vertex used %d, by definition %d", trial, got, want)
		}
		if got := len(Shells(m)); got != want {
			t.Errorf("trial %d: Shells %d, by definition %d", trial, got, want)
		}
	}
}
