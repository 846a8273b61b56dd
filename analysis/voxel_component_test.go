package analysis

import (
	"math/rand/v2"
	"testing"

	"tapersweep/mesh"
)

// The canal's piece against a plain flood fill over the 26 neighbours of every voxel (the
// definition of 26-connectivity): random grids from sparse to dense, inside voxels on the
// grid's border too, seeds anywhere.
func TestComponentMatchesFloodFill(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := range 60 {
		g := &mesh.Grid{Voxel: 1, NX: 2 + rng.IntN(12), NY: 2 + rng.IntN(12), NZ: 2 + rng.IntN(12)}
		g.Inside = make([]bool, g.NX*g.NY*g.NZ)
		pIn := []float64{0.1, 0.25, 0.4, 0.7}[trial%4]
		for i := range g.Inside {
			g.Inside[i] = rng.Float64() < pIn
		}
		vg := graphOf(g)
		if len(vg.cells) == 0 {
			continue
		}
		seed := int32(rng.IntN(len(vg.cells)))
		want := make([]bool, len(vg.cells))
		want[seed] = true
		queue, count := []int32{seed}, 1
		for len(queue) > 0 {
			p := queue[0]
			queue = queue[1:]
			vg.neighbours(p, func(m int32, _ float64) {
				if !want[m] {
					want[m] = true
					count++
					queue = append(queue, m)
				}
			})
		}
		got, n := vg.component(seed)
		if n != count {
			t.Fatalf("trial %d: %d voxels joined to the seed, flood fill %d", trial, n, count)
		}
		for i := range want {
			if got[i] != want[i] {
				t.Fatalf("trial %d: voxel %d joined %v, flood fill %v", trial, i, got[i], want[i])
			}
		}
	}
}
