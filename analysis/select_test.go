package analysis

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// nthSmallest must give what sorting gives at every place, with many repeated values.
func TestNthSmallestMatchesSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{1, 2, 3, 5, 17, 100, 1001} {
		for _, distinct := range []int{1, 3, 1000000} {
			xs := make([]float64, n)
			for i := range xs {
				xs[i] = float64(rng.IntN(distinct)) * 0.37
			}
			sorted := slices.Clone(xs)
			slices.Sort(sorted)
			for k := 0; k < n; k += max(1, n/13) {
				if got := nthSmallest(slices.Clone(xs), k); got != sorted[k] {
					t.Fatalf("n %d, %d values, place %d: %v, sorting gives %v", n, distinct, k, got, sorted[k])
				}
			}
		}
	}
}
