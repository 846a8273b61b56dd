package render

import (
	"sync"
)

// pool keeps worker goroutines alive between frames, so a frame starts no goroutines
// and allocates nothing. It holds no reference to the Renderer, which lets a cleanup
// stop it when the Renderer is dropped.
type pool struct {
	jobs    chan poolJob
	wg      sync.WaitGroup
	started int
	closed  bool
}

type poolJob struct {
	fn     func(worker int)
	worker int
}

func newPool() *pool {
	return &pool{jobs: make(chan poolJob)}
}

// run calls fn(0..n-1) concurrently, fn(0) on the calling goroutine, and waits for all.
func (p *pool) run(n int, fn func(worker int)) {
	if n <= 1 || p.closed {
		fn(0)
		return
	}
	for p.started < n-1 {
		p.started++
		go p.loop()
	}
	p.wg.Add(n - 1)
	for w := 1; w < n; w++ {
		p.jobs <- poolJob{fn: fn, worker: w}
	}
	fn(0)
	p.wg.Wait()
}

func (p *pool) loop() {
	for j := range p.jobs {
		j.fn(j.worker)
		p.wg.Done()
	}
}

func (p *pool) close() {
	if !p.closed {
		p.closed = true
		close(p.jobs)
	}
}
