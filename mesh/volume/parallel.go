package volume

import (
	"context"
	"runtime"
	"sync"
)

// fillSlices runs fill(k) for k = 0..n-1 on the available cores, stops at the first error
// (or when ctx ends) and tells progress how many are done.
func fillSlices(ctx context.Context, n int, fill func(k int) error, progress func(done int)) error {
	workers := max(1, min(runtime.GOMAXPROCS(0), n))
	var mu sync.Mutex
	var firstErr error
	done := 0
	next := make(chan int)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				err := ctx.Err()
				if err == nil {
					err = fill(k)
				}
				mu.Lock()
				if err != nil && firstErr == nil {
					firstErr = err
				}
				done++
				if progress != nil {
					progress(done)
				}
				mu.Unlock()
			}
		}()
	}
	for k := range n {
		mu.Lock()
		stop := firstErr != nil
		mu.Unlock()
		if stop {
			break
		}
		next <- k
	}
	close(next)
	wg.Wait()
	return firstErr
}
