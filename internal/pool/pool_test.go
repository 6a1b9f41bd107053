package pool

import (
	"context"
	"sync/atomic"
	"testing"
)

// Every index is handed out exactly once, whatever the chunk and the
// number of workers.
func TestRunCoversOnce(t *testing.T) {
	for _, c := range []struct{ w, count, chunk int }{{1, 0, 4}, {1, 10, 3}, {3, 1000, 7}, {4, 5, 64}, {0, 257, 0}} {
		seen := make([]atomic.Int32, c.count)
		err := Run(context.Background(), c.w, c.count, c.chunk, func(w, lo, hi int) {
			if w < 0 || w >= Workers(c.w) {
				t.Errorf("worker %d out of range", w)
			}
			for i := lo; i < hi; i++ {
				seen[i].Add(1)
			}
		})
		if err != nil {
			t.Fatal(err)
		}
		for i := range seen {
			if n := seen[i].Load(); n != 1 {
				t.Fatalf("%+v: index %d done %d times", c, i, n)
			}
		}
	}
}

// A cancelled context stops the work and is reported.
func TestRunCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	var ran atomic.Int64
	err := Run(ctx, 2, 1<<20, 1, func(_, lo, hi int) {
		if ran.Add(int64(hi-lo)) == 10 {
			cancel()
		}
	})
	if err != context.Canceled {
		t.Fatalf("err %v, want context.Canceled", err)
	}
	if ran.Load() == 1<<20 {
		t.Fatal("cancelling did not stop the work")
	}
}

// A finished meter says "all done" last; one that did not finish does not.
func TestMeterFinish(t *testing.T) {
	var last Step
	m := NewMeter(func(s Step) { last = s }, 50)
	m.Add(20)
	m.Finish(true)
	if last != (Step{Done: 50, Total: 50, Unit: UnitWork, Last: true}) {
		t.Fatalf("last report %+v, want 50 of 50, last", last)
	}
	last = Step{}
	m = NewMeter(func(s Step) { last = s }, 50)
	m.Add(20)
	m.Finish(false)
	if last.Done == 50 || last.Last {
		t.Fatalf("an unfinished call reported %+v", last)
	}
	NewMeter(nil, 5).Finish(true) // counts only; must not block or panic
}
