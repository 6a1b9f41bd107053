package tui

import (
	"context"
	"testing"
)

// A new run cancels the one before it and makes its answers stale; drop
// makes the latest run's answers stale too; stop only cancels.
func TestJobRuns(t *testing.T) {
	var j job
	ctx1, run1 := j.start(context.Background(), 7)
	if !j.current(run1) || j.gen != 7 || !j.running() {
		t.Fatal("a started run is not the current one")
	}
	ctx2, run2 := j.start(context.Background(), 8)
	if ctx1.Err() == nil || j.current(run1) || !j.current(run2) || j.gen != 8 {
		t.Fatal("a second run did not replace the first")
	}
	j.stop()
	if ctx2.Err() == nil || !j.current(run2) || j.running() {
		t.Fatal("stop must cancel and keep the run's answers")
	}
	_, run3 := j.start(context.Background(), 8)
	j.drop()
	if j.current(run3) || j.running() {
		t.Fatal("drop left the run's answers current")
	}
}
