package mesh

import (
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

// Both ways of counting edges (buckets of every vertex for triangles in build order, a cache
// line per vertex for scattered ones) must give the definition's counts, whatever the order:
// on a closed tube, with holes, flipped triangles, fans of up to 40 triangles on one edge
// (beyond a line's 16 slots), repeated corners and out-of-range indices.
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
		if b, n, i := edgeCounts(m); b != wb || n != wn || i != wi {
			t.Errorf("trial %d (local %v): edgeCounts %d %d %d, by definition %d %d %d", trial, edgesLocal(m), b, n, i, wb, wn, wi)
		}
		if b, n, i := edgeCountsInLines(m); b != wb || n != wn || i != wi {
			t.Errorf("trial %d: by lines %d %d %d, by definition %d %d %d", trial, b, n, i, wb, wn, wi)
		}
	}
}
