package segment

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The linear-time window maxima match a direct scan of each window.
func TestWindowMax(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 2, 5, 17, 40} {
		for _, w := range []int{1, 2, 3, 7} {
			x := make([]float32, n)
			for i := range x {
				x[i] = rng.Float32()
			}
			out := make([]float32, n+2*w)
			windowMax(x, w, out, make([]float32, 2*(n+2*w)))
			for q := range n {
				lo, hi := float32(math.Inf(-1)), float32(math.Inf(-1))
				for d := max(0, q-w); d < q; d++ {
					lo = max(lo, x[d])
				}
				for d := q + 1; d <= min(n-1, q+w); d++ {
					hi = max(hi, x[d])
				}
				if out[q+w-1] != lo || out[q+2*w] != hi {
					t.Fatalf("n %d w %d q %d: %v %v, want %v %v", n, w, q, out[q+w-1], out[q+2*w], lo, hi)
				}
			}
		}
	}
}
