// Package pool fans a long computation out over cores: Run hands out the
// indices of a job in chunks to a fixed number of goroutines and stops
// when the context is cancelled, and a Meter reports how far the work has
// gone through the one progress signature the engine's checks share,
// Progress. The grid checks (verify) and the table re-check
// (contract/budget) both use it, so cancellation and progress behave the
// same everywhere.
package pool

import (
	"context"
	"runtime"
	"sync"
	"sync/atomic"
	"time"
)

// Progress is told how much of a long call is done, in the call's own
// units of work, and how much there is in all. A Meter calls it from one
// goroutine at a time, so it needs no locking of its own.
type Progress func(done, total int64)

// Workers is w, or GOMAXPROCS when w is not positive.
func Workers(w int) int {
	if w <= 0 {
		w = runtime.GOMAXPROCS(0)
	}
	return w
}

// Run calls body(worker, lo, hi) for consecutive ranges [lo, hi) that
// cover [0, count) once, on Workers(w) goroutines (worker is the
// goroutine's number, for per-worker scratch space), handing out chunk
// indices at a time. It stops handing out work when ctx is cancelled and
// then returns ctx.Err(); otherwise nil once every range is done.
func Run(ctx context.Context, w, count, chunk int, body func(worker, lo, hi int)) error {
	w = Workers(w)
	if chunk < 1 {
		chunk = 1
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	done := ctx.Done()
	var stopped atomic.Bool
	for id := range w {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				select {
				case <-done:
					stopped.Store(true)
					return
				default:
				}
				lo := int(next.Add(int64(chunk))) - chunk
				if lo >= count {
					return
				}
				body(id, lo, min(lo+chunk, count))
			}
		}()
	}
	wg.Wait()
	if stopped.Load() || ctx.Err() != nil {
		return ctx.Err()
	}
	return nil
}

// Meter counts work done across the phases of a long call, from any
// number of goroutines, and reports it to a Progress about ten times a
// second from a goroutine of its own. Create it with NewMeter and end it
// with Finish.
type Meter struct {
	done  atomic.Int64
	total int64
	fn    Progress
	stop  chan struct{}
	wg    sync.WaitGroup
}

// reportEvery is how often a Meter reports: often enough for a live
// progress line, rarely enough to cost nothing.
const reportEvery = 100 * time.Millisecond

// NewMeter starts a meter of total units reporting to fn; a nil fn makes
// a meter that only counts.
func NewMeter(fn Progress, total int64) *Meter {
	m := &Meter{total: total, fn: fn, stop: make(chan struct{})}
	if fn == nil {
		return m
	}
	m.wg.Add(1)
	go func() {
		defer m.wg.Done()
		t := time.NewTicker(reportEvery)
		defer t.Stop()
		for {
			select {
			case <-m.stop:
				return
			case <-t.C:
				m.fn(min(m.done.Load(), m.total), m.total)
			}
		}
	}()
	return m
}

// Add counts n more units done.
func (m *Meter) Add(n int64) { m.done.Add(n) }

// Finish stops the meter's reports; a call that completed reports
// done = total once more, so the caller's last word is "all done".
func (m *Meter) Finish(completed bool) {
	close(m.stop)
	m.wg.Wait()
	if m.fn != nil && completed {
		m.fn(m.total, m.total)
	}
}
