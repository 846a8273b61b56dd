// Package parallel is the program's one parallel loop. Every package that splits work over
// cores calls For with a number of workers its caller passed down (0: all cores), so a batch
// of canals can give each canal its share of the cores without changing GOMAXPROCS for the
// whole process. It lives under mesh, the package every other one imports.
package parallel

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// Workers is the number of goroutines For uses for n items when asked for workers: workers
// when above 0, else GOMAXPROCS; never more than n and at least 1.
func Workers(workers, n int) int {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	return max(1, min(workers, n))
}

// For runs fn(w, i) once for every i in [0, n) on Workers(workers, n) goroutines and returns
// when all are done. w, from 0 to Workers(workers, n)-1, names the goroutine running the item,
// so that each can keep scratch space of its own. Items are handed out in small runs as
// goroutines come free, so uneven items balance; whatever fn writes per index does not depend
// on the number of workers.
func For(workers, n int, fn func(w, i int)) {
	k := Workers(workers, n)
	if k == 1 {
		for i := 0; i < n; i++ {
			fn(0, i)
		}
		return
	}
	// Runs of about an eighth of an even share: few enough hand-outs to cost nothing, small
	// enough to balance.
	run := int64(max(1, n/(8*k)))
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := range k {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				lo := next.Add(run) - run
				if lo >= int64(n) {
					return
				}
				for i := lo; i < min(lo+run, int64(n)); i++ {
					fn(w, int(i))
				}
			}
		}()
	}
	wg.Wait()
}
