package render

import (
	"sync/atomic"
	"testing"
	"time"
)

// Every worker number runs once per run, and run returns only once all have finished: with
// the workers awake (runs back to back), asleep (a pause longer than workerSpin), and after
// close (everything on the caller).
func TestPoolRunsEachWorkerOnceAndWaits(t *testing.T) {
	p := newPool()
	check := func(n int, when string) {
		t.Helper()
		var calls [8]atomic.Int32
		var finished atomic.Int32
		p.run(n, func(w int) {
			calls[w].Add(1)
			time.Sleep(time.Duration(w) * 100 * time.Microsecond) // the last to finish is a worker
			finished.Add(1)
		})
		if got := finished.Load(); got != int32(n) {
			t.Fatalf("%s: run returned with %d of %d workers finished", when, got, n)
		}
		for w := range calls {
			want := int32(0)
			if w < n {
				want = 1
			}
			if got := calls[w].Load(); got != want {
				t.Fatalf("%s: worker %d ran %d times, want %d", when, w, got, want)
			}
		}
	}
	for i := 0; i < 50; i++ {
		check(1+i%4, "back to back")
	}
	for i := 0; i < 3; i++ {
		time.Sleep(5 * workerSpin)
		check(3, "after a pause")
	}
	p.close()
	check(1, "closed")
	var ran [3]bool
	p.run(3, func(w int) { ran[w] = true })
	if ran != [3]bool{true, false, false} {
		t.Fatalf("closed pool ran workers %v, want only the caller", ran)
	}
}
