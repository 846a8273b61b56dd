package render

import (
	"runtime"
	"sync/atomic"
	"time"
)

// pool keeps worker goroutines alive between frames, so a frame starts no goroutines
// and allocates nothing. It holds no reference to the Renderer, which lets a cleanup
// stop it when the Renderer is dropped.
//
// A frame runs seven phases back to back, each split between the caller and the workers. A
// worker that went to sleep between two phases can take a tenth of a millisecond or more to
// wake on a virtual machine (the sleeping processor has to be woken by its host), and a caller
// asleep on the workers the same: measured on a 2-core build machine, a sleeping worker joined
// a phase 0.12-0.2 ms late in the median, when most phases last about that long. So a worker
// looks for its next job for a short while before it sleeps, and the caller waits for the
// workers without sleeping: a frame keeps both cores awake from its first phase to its last.
type pool struct {
	jobs    chan poolJob
	pending atomic.Int32 // jobs handed out and not finished
	started int
	closed  bool
}

type poolJob struct {
	fn     func(worker int)
	worker int
}

// maxPoolJobs bounds the jobs of one run that wait in the channel without blocking the caller.
const maxPoolJobs = 256

// workerSpin is how long an idle worker looks for a job before it sleeps: longer than the gap
// between two phases of a frame, much shorter than the gap between frames of a turning view.
const workerSpin = 200 * time.Microsecond

func newPool() *pool {
	return &pool{jobs: make(chan poolJob, maxPoolJobs)}
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
	p.pending.Add(int32(n - 1))
	for w := 1; w < n; w++ {
		p.jobs <- poolJob{fn: fn, worker: w}
	}
	fn(0)
	for i := 1; p.pending.Load() != 0; i++ {
		if i%64 == 0 {
			runtime.Gosched() // let a goroutine waiting for this core run
		}
	}
}

func (p *pool) loop() {
	for {
		j, ok := p.next()
		if !ok {
			return
		}
		j.fn(j.worker)
		p.pending.Add(-1)
	}
}

// next returns the next job, looking for one for workerSpin before it sleeps; false once the
// pool is closed.
func (p *pool) next() (poolJob, bool) {
	var deadline time.Time
	spin := runtime.GOMAXPROCS(0) > 1 // on one core, looking would only slow the caller
	for i := 0; spin; i++ {
		select {
		case j, ok := <-p.jobs:
			return j, ok
		default:
		}
		if i%64 == 0 {
			now := time.Now()
			if i == 0 {
				deadline = now.Add(workerSpin)
			} else if now.After(deadline) {
				break
			}
			runtime.Gosched()
		}
	}
	j, ok := <-p.jobs
	return j, ok
}

func (p *pool) close() {
	if !p.closed {
		p.closed = true
		close(p.jobs)
	}
}
