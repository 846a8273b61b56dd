package analysis

import (
	"math/rand/v2"
	"testing"

	"tapersweep/mesh"
)

// The distance transform against brute force (analytic: the squared distance between voxel
// centres is an integer): random grids, dense and sparse, with lines and whole planes that hold
// no outside voxel, grids a few percent inside (a canal's), on one and on several goroutines.
func TestSquaredDistanceMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	for trial := range 16 {
		g := &mesh.Grid{Voxel: 1, NX: 3 + rng.IntN(9), NY: 3 + rng.IntN(9), NZ: 3 + rng.IntN(9)}
		g.Inside = make([]bool, g.NX*g.NY*g.NZ)
		pOut := []float64{0.02, 0.2, 0.6, 0.95}[trial%4]
		for i := range g.Inside {
			g.Inside[i] = rng.Float64() > pOut
		}
		if trial == 0 {
			for i := range g.Inside {
				g.Inside[i] = true // no outside voxel at all
			}
		}
		for _, workers := range []int{1, 3} {
			d := squaredDistance(g, workers)
			for k := range g.NZ {
				for j := range g.NY {
					for i := range g.NX {
						want := float32(1e20)
						if !g.Inside[g.Index(i, j, k)] {
							want = 0
						} else {
							for kk := range g.NZ {
								for jj := range g.NY {
									for ii := range g.NX {
										if !g.Inside[g.Index(ii, jj, kk)] {
											di, dj, dk := i-ii, j-jj, k-kk
											want = min(want, float32(di*di+dj*dj+dk*dk))
										}
									}
								}
							}
						}
						if got := d[g.Index(i, j, k)]; got != want {
							t.Fatalf("trial %d, voxel (%d,%d,%d): %v, brute force %v", trial, i, j, k, got, want)
						}
					}
				}
			}
		}
	}
}
