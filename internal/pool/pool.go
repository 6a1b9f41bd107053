// Package pool fans a long computation out over cores: Run hands out the
// indices of a job in chunks to a fixed number of goroutines and stops
// when the context is cancelled, and a Meter reports how far the work has
// gone. Every long job of the engine (grid checks and audits, point
// checks, table re-checks and proposals, certificates, backtests,
// distortion curves, research studies) reports through the one progress
// signature defined here, Progress, so cancellation and progress behave
// the same everywhere and a caller needs one way to show them.
package pool

import (
	"context"
	"runtime"
	"sync"
	"sync/atomic"
	"time"
)

// Progress is told how far a long job has gone, one Step at a time. A job
// calls it from one goroutine at a time (a Meter from its own, then once
// from the caller's), so it needs no locking of its own; it should return
// quickly, since the job may wait for it.
type Progress func(Step)

// Step is one progress report of a long job.
//
// Why one struct and not a bare func(done, total int64): the jobs show
// different things to the person waiting on them. A grid check shows a
// percentage; a certificate the share of the simplex proved, the boxes
// examined and the time spent; a backtest the bytes of input read, the
// rows and the rows skipped; a research study the stage under way. One
// value with a fraction (Done of Total, in Unit) that any progress bar can
// draw, plus the few details some jobs have, carries all of them, so that
// no caller needs a job's own callback type and nothing shown is lost.
// A job leaves the fields it has no use for at zero.
//
// Why Done and Total are float64: a certificate's measure is a share of
// the simplex by volume, a real number that no integer scale holds to the
// four significant digits shown for tiny shares; float64 also holds every
// count and byte offset below 2^53 exactly.
type Step struct {
	// Done of Total is how far the job has gone, in Unit. Done never
	// exceeds Total when Total is known, and never decreases within a
	// job, with one exception: a payout certificate that gives up one
	// argument for the next (verify/certify) shows the share the new one
	// has proved, which starts again from 0.
	// Total is 0 while the size is not known in advance (a backtest
	// reading a pipe); the last Step of such a job gives Total = Done.
	Done, Total float64
	// Unit says what Done and Total count.
	Unit Unit
	// Stage names the part of the job under way, for a job that runs in
	// named stages (research studies); "" otherwise.
	Stage string
	// Items counts the things a job has handled when they are not its
	// unit of progress: the boxes a certificate examined, the rows a
	// backtest read. Skipped counts those passed over as bad (backtest
	// rows that failed validation).
	Items, Skipped int64
	// Elapsed is the time since the job started, for jobs that show it
	// (certificates, which run against a deadline); 0 otherwise.
	Elapsed time.Duration
	// Last is set on a job's final Step: the job has ended and returns a
	// result (a certificate that ran out of time has ended too; Done says
	// how far it got). A cancelled job sends no final Step.
	Last bool
}

// Unit names what a Step's Done and Total count.
type Unit string

// The units of the engine's jobs.
const (
	// UnitWork is a job's own measure of its computation (grid points,
	// gradient evaluations, beliefs re-checked, weighted by their cost):
	// meaningful only as a fraction of Total.
	UnitWork Unit = "work"
	// UnitShare is a share of the simplex (or interval) by volume; Total
	// is 1.
	UnitShare Unit = "share"
	// UnitBytes is bytes of input read.
	UnitBytes Unit = "bytes"
	// UnitStages is stages of a job that runs in named stages.
	UnitStages Unit = "stages"
)

// Fraction is Done over Total, between 0 and 1; 0 while Total is not
// known.
func (s Step) Fraction() float64 {
	if !(s.Total > 0) {
		return 0
	}
	return min(1, max(0, s.Done/s.Total))
}

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
// number of goroutines, and reports it to a Progress (in UnitWork) about
// ten times a second from a goroutine of its own. Create it with NewMeter and end it
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
				m.fn(Step{Done: float64(min(m.done.Load(), m.total)), Total: float64(m.total), Unit: UnitWork})
			}
		}
	}()
	return m
}

// Add counts n more units done.
func (m *Meter) Add(n int64) { m.done.Add(n) }

// Finish stops the meter's reports; a call that completed reports
// Done = Total once more, as its Last step, so the caller's last word is
// "all done".
func (m *Meter) Finish(completed bool) {
	close(m.stop)
	m.wg.Wait()
	if m.fn != nil && completed {
		m.fn(Step{Done: float64(m.total), Total: float64(m.total), Unit: UnitWork, Last: true})
	}
}
