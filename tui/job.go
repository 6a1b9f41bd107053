package tui

import "context"

// job is the bookkeeping of one kind of background work (the checks, the
// fit, the picture, a backtest, a risk run): the id of its latest run, the
// design generation that run is for, and how to cancel it. Every message
// of a run carries its id, so an answer from a run that was replaced or
// stopped is recognised and dropped.
type job struct {
	run    uint64 // id of the latest run
	gen    uint64 // generation the latest run is for
	cancel context.CancelFunc
}

// start cancels the running work and begins a new run for generation gen
// under parent; it returns the run's context and id.
func (j *job) start(parent context.Context, gen uint64) (context.Context, uint64) {
	j.stop()
	ctx, cancel := context.WithCancel(parent)
	j.cancel = cancel
	j.run++
	j.gen = gen
	return ctx, j.run
}

// stop cancels the running work, if any; its answers still count until
// the run is dropped or replaced.
func (j *job) stop() {
	if j.cancel != nil {
		j.cancel()
		j.cancel = nil
	}
}

// drop stops the work and makes every answer of it stale.
func (j *job) drop() {
	j.stop()
	j.run++
}

// current reports whether run is the latest run.
func (j *job) current(run uint64) bool { return run == j.run }

// running reports whether work was started and neither finished nor
// stopped.
func (j *job) running() bool { return j.cancel != nil }

// finished records that the latest run ended by itself, releasing its
// context.
func (j *job) finished() { j.stop() }
