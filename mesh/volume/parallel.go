package volume

import (
	"context"
	"sync"

	"tapersweep/mesh/parallel"
)

// fillSlices runs fill(k) for k = 0..n-1 on the available cores (parallel.For), stops at the
// first error (or when ctx ends) and tells progress how many are done.
func fillSlices(ctx context.Context, n int, fill func(k int) error, progress func(done int)) error {
	var mu sync.Mutex
	var firstErr error
	done := 0
	parallel.For(0, n, func(_, k int) {
		mu.Lock()
		stop := firstErr != nil
		mu.Unlock()
		if stop {
			return
		}
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
	})
	return firstErr
}
