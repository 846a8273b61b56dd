package analysis

import (
	"math"
	"math/rand/v2"
	"testing"

	"tapersweep/mesh"
)

// textbookSearch is Dijkstra's algorithm as first published (Numer. Math. 1959;1:269), with
// no queue at all: each step settles the unsettled node of least distance (of least number
// among equal ones, the order the searches' predecessors are defined by) and lowers its
// neighbours' distances where strictly shorter.
func textbookSearch(vg *voxelGraph, sources []int32, halfCost []float64, bound float64, target int32) []searchNode {
	st := make([]searchNode, len(vg.cells))
	for i := range st {
		st[i] = searchNode{dist: math.Inf(1), prev: -1}
	}
	for _, s := range sources {
		st[s].dist = 0
	}
	for {
		p := int32(-1)
		for i := range st {
			if !st[i].done && st[i].dist < math.Inf(1) && (p < 0 || st[i].dist < st[p].dist) {
				p = int32(i)
			}
		}
		if p < 0 {
			break
		}
		st[p].done = true
		if p == target {
			break
		}
		vg.neighbours(p, func(m int32, step float64) {
			w := step
			if halfCost != nil {
				w *= halfCost[p] + halfCost[m]
			}
			if nd := st[p].dist + w; nd < st[m].dist && nd <= bound {
				st[m].dist, st[m].prev = nd, p
			}
		})
	}
	return st
}

// The voxel searches (bucket queue, its overflow for costs of wide range, the radix heap
// where buckets cannot be used) against the textbook algorithm: the same distances and the
// same predecessor for every settled node, bit for bit, on random grids (inside voxels on the
// border or not, sparse to dense), unit edges and weighted ones (costs of narrow and very wide
// range, costs from a set of two so that sums tie, an infinite cost), with and without a
// bound or a target.
func TestSearchMatchesTextbook(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := range 120 {
		g := &mesh.Grid{Voxel: []float64{1, 0.3, 0.0417}[trial%3], NX: 3 + rng.IntN(14), NY: 3 + rng.IntN(14), NZ: 3 + rng.IntN(10)}
		g.Inside = make([]bool, g.NX*g.NY*g.NZ)
		pIn := []float64{0.3, 0.5, 0.8}[trial%3]
		padded := trial%2 == 0
		for k := range g.NZ {
			for j := range g.NY {
				for i := range g.NX {
					border := i == 0 || j == 0 || k == 0 || i == g.NX-1 || j == g.NY-1 || k == g.NZ-1
					g.Inside[g.Index(i, j, k)] = !(padded && border) && rng.Float64() < pIn
				}
			}
		}
		vg := graphOf(g)
		n := len(vg.cells)
		if n < 2 {
			continue
		}
		var half []float64
		kind := trial % 5
		if kind > 0 {
			half = make([]float64, n)
			for i := range half {
				switch kind {
				case 1: // a canal's range: the cost of the path through the middle
					half[i] = 0.5 + 4*rng.Float64()
				case 2: // over six orders: the bucket ring overflows
					half[i] = math.Pow(10, 6*rng.Float64())
				case 3: // two values: many sums tie
					half[i] = float64(1 + rng.IntN(2))
				case 4: // an infinite cost: the radix heap
					half[i] = 1 + rng.Float64()
					if i == n/2 {
						half[i] = math.Inf(1)
					}
				}
			}
		}
		sources := []int32{int32(rng.IntN(n))}
		if trial%7 == 3 {
			sources = append(sources, int32(rng.IntN(n)), sources[0])
		}
		bound, target := math.Inf(1), int32(-1)
		switch trial % 4 {
		case 1:
			bound = 3 * g.Voxel * []float64{1, 2, 1000, 1, 2}[kind]
		case 2:
			target = int32(rng.IntN(n))
		}
		got := vg.search(sources, half, bound, target)
		want := textbookSearch(vg, sources, half, bound, target)
		for i := range want {
			if !want[i].done {
				continue // past the target: left open
			}
			if math.Float64bits(got[i].dist) != math.Float64bits(want[i].dist) || got[i].prev != want[i].prev {
				t.Fatalf("trial %d (costs %d, %d nodes): node %d at %v from %d, textbook %v from %d",
					trial, kind, n, i, got[i].dist, got[i].prev, want[i].dist, want[i].prev)
			}
		}
		if target >= 0 && !got[target].done && want[target].done {
			t.Fatalf("trial %d: target not settled", trial)
		}
	}
}
