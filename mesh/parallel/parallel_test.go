package parallel

import (
	"fmt"
	"runtime"
	"sync/atomic"
	"testing"
)

// TestForRunsEachItemOnce: every index once, whatever the number of workers, and each worker
// index within the count Workers states (so per-worker scratch space is never shared).
func TestForRunsEachItemOnce(t *testing.T) {
	for _, n := range []int{0, 1, 7, 1000, 12345} {
		for _, workers := range []int{0, 1, 2, 3, 64} {
			count := make([]atomic.Int32, n)
			k := Workers(workers, n)
			var bad atomic.Bool
			For(workers, n, func(w, i int) {
				if w < 0 || w >= k {
					bad.Store(true)
				}
				count[i].Add(1)
			})
			for i := range count {
				if c := count[i].Load(); c != 1 {
					t.Fatalf("n %d, workers %d: item %d ran %d times", n, workers, i, c)
				}
			}
			if bad.Load() {
				t.Errorf("n %d, workers %d: a worker index outside 0..%d", n, workers, k-1)
			}
		}
	}
	if got := Workers(0, 1<<20); got != runtime.GOMAXPROCS(0) {
		t.Errorf("Workers(0, many) = %d, want GOMAXPROCS %d", got, runtime.GOMAXPROCS(0))
	}
	if Workers(5, 2) != 2 || Workers(3, 0) != 1 {
		t.Error("Workers exceeds the items or drops to 0")
	}
}

// TestForUsesTheWorkersAskedFor: asked for one worker, For never runs two items at once.
func TestForUsesTheWorkersAskedFor(t *testing.T) {
	var running, most atomic.Int32
	For(1, 200, func(_, _ int) {
		r := running.Add(1)
		if r > most.Load() {
			most.Store(r)
		}
		runtime.Gosched()
		running.Add(-1)
	})
	if most.Load() != 1 {
		t.Errorf("%d items ran at once with one worker", most.Load())
	}
}

func ExampleFor() {
	squares := make([]int, 5)
	// Two goroutines; each result lands at its own index, so the order of work does not matter.
	For(2, len(squares), func(_, i int) { squares[i] = i * i })
	fmt.Println(squares)
	// Output: [0 1 4 9 16]
}
