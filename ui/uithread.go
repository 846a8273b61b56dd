package ui

import (
	"sync/atomic"
	"time"

	"fyne.io/fyne/v2"
)

// Hand-over from goroutines to the UI goroutine. In the window every hand-over goes through
// fyne.Do; tests swap in a queue that the test goroutine drains, so that widgets are only ever
// touched by one goroutine there too (fyne's test driver runs fyne.Do on the caller's goroutine).

// handOver runs work on the UI goroutine.
type handOver struct {
	queue chan func() // nil: fyne.Do
	jobs  atomic.Int64
}

// post runs f on the UI goroutine without waiting.
func (h *handOver) post(f func()) {
	if h.queue == nil {
		fyne.Do(f)
		return
	}
	h.queue <- f
}

// postAndWait runs f on the UI goroutine and returns when it has run.
func (h *handOver) postAndWait(f func()) {
	if h.queue == nil {
		fyne.DoAndWait(f)
		return
	}
	done := make(chan struct{})
	h.queue <- func() { f(); close(done) }
	<-done
}

// spawn runs work in a goroutine, counted until it returns.
func (h *handOver) spawn(work func()) {
	h.jobs.Add(1)
	go func() {
		defer h.jobs.Add(-1)
		work()
	}()
}

// queuedHandOver makes hand-overs wait in a queue for drain (tests).
func queuedHandOver() *handOver { return &handOver{queue: make(chan func(), 256)} }

// drain runs queued hand-overs until no goroutine is working and idle says the rest is quiet.
func (h *handOver) drain(idle func() bool) {
	for {
		select {
		case f := <-h.queue:
			f()
			continue
		default:
		}
		if h.jobs.Load() == 0 && idle() && len(h.queue) == 0 {
			return
		}
		time.Sleep(200 * time.Microsecond)
	}
}
