// Package pooltest records the progress a long job reports and checks it
// against the promises of pool.Step, for the tests of every package whose
// jobs report progress.
package pooltest

import (
	"fmt"
	"sync"

	"scorewright/internal/pool"
)

// Recorder keeps every Step a job reports. Its Progress may be called from
// any goroutine.
type Recorder struct {
	mu    sync.Mutex
	steps []pool.Step
}

// Progress is the callback to hand to the job.
func (r *Recorder) Progress(s pool.Step) {
	r.mu.Lock()
	r.steps = append(r.steps, s)
	r.mu.Unlock()
}

// Steps are the reports so far, in order.
func (r *Recorder) Steps() []pool.Step {
	r.mu.Lock()
	defer r.mu.Unlock()
	return append([]pool.Step(nil), r.steps...)
}

// Check says what is wrong with the reports of a job that ran to its end
// and did all its work (nil when nothing): Monotone, and the final report
// has Done = Total.
func (r *Recorder) Check(unit pool.Unit) error {
	if err := r.Monotone(unit); err != nil {
		return err
	}
	steps := r.Steps()
	if last := steps[len(steps)-1]; !(last.Total > 0) || last.Done != last.Total {
		return fmt.Errorf("the last step is %g of %g, want its total", last.Done, last.Total)
	}
	return nil
}

// Monotone says what is wrong with the reports of a job that ran to its
// end, done or not (a certificate out of time): there must be at least
// one; all in unit; Done never falls, stays within a known Total and Total
// never changes once known; only the final report is Last.
func (r *Recorder) Monotone(unit pool.Unit) error {
	steps := r.Steps()
	if len(steps) == 0 {
		return fmt.Errorf("no progress reported")
	}
	for i, s := range steps {
		switch {
		case s.Unit != unit:
			return fmt.Errorf("step %d of %d: unit %q, want %q", i, len(steps), s.Unit, unit)
		case s.Total > 0 && s.Done > s.Total, s.Done < 0:
			return fmt.Errorf("step %d of %d: done %g of %g", i, len(steps), s.Done, s.Total)
		case s.Last != (i == len(steps)-1):
			return fmt.Errorf("step %d of %d: Last is %v", i, len(steps), s.Last)
		}
		if i == 0 {
			continue
		}
		p := steps[i-1]
		switch {
		case s.Done < p.Done:
			return fmt.Errorf("step %d of %d: done fell from %g to %g", i, len(steps), p.Done, s.Done)
		case p.Total > 0 && s.Total != p.Total:
			return fmt.Errorf("step %d of %d: total changed from %g to %g", i, len(steps), p.Total, s.Total)
		case s.Items < p.Items || s.Skipped < p.Skipped:
			return fmt.Errorf("step %d of %d: items or skipped fell: %+v after %+v", i, len(steps), s, p)
		}
	}
	return nil
}
