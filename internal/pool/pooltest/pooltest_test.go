package pooltest

import (
	"testing"

	"scorewright/internal/pool"
)

// The checker passes a sound run and catches each broken promise.
func TestCheck(t *testing.T) {
	w := pool.UnitWork
	good := []pool.Step{{Done: 0, Total: 4, Unit: w}, {Done: 2, Total: 4, Unit: w}, {Done: 4, Total: 4, Unit: w, Last: true}}
	unknown := []pool.Step{{Done: 5, Unit: pool.UnitBytes}, {Done: 9, Total: 9, Unit: pool.UnitBytes, Last: true}}
	for _, c := range []struct {
		name  string
		unit  pool.Unit
		steps []pool.Step
		ok    bool
	}{
		{"sound", w, good, true},
		{"total learnt at the end", pool.UnitBytes, unknown, true},
		{"none", w, nil, false},
		{"wrong unit", pool.UnitShare, good, false},
		{"falls", w, []pool.Step{{Done: 3, Total: 4, Unit: w}, {Done: 2, Total: 4, Unit: w}, {Done: 4, Total: 4, Unit: w, Last: true}}, false},
		{"beyond total", w, []pool.Step{{Done: 5, Total: 4, Unit: w, Last: true}}, false},
		{"total moves", w, []pool.Step{{Done: 1, Total: 4, Unit: w}, {Done: 5, Total: 5, Unit: w, Last: true}}, false},
		{"short of total", w, []pool.Step{{Done: 1, Total: 4, Unit: w}, {Done: 3, Total: 4, Unit: w, Last: true}}, false},
		{"no last", w, good[:2], false},
		{"last too early", w, []pool.Step{{Done: 4, Total: 4, Unit: w, Last: true}, {Done: 4, Total: 4, Unit: w, Last: true}}, false},
	} {
		var r Recorder
		for _, s := range c.steps {
			r.Progress(s)
		}
		if err := r.Check(c.unit); (err == nil) != c.ok {
			t.Errorf("%s: Check says %v", c.name, err)
		}
	}
	// Monotone accepts a run that ended short of its total.
	var r Recorder
	r.Progress(pool.Step{Done: 0.4, Total: 1, Unit: pool.UnitShare, Last: true})
	if err := r.Monotone(pool.UnitShare); err != nil {
		t.Errorf("Monotone of a run short of its total: %v", err)
	}
}
