package tui

import (
	"runtime"
	"strings"
	"testing"

	"scorewright/verify"
)

// A workbench check leaves one core to the screen: all cores but one by
// default, at least one, and the setting when given.
func TestCheckWorkersLeaveOneCore(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	for _, c := range []struct{ procs, want int }{{1, 1}, {2, 1}, {4, 3}, {16, 15}} {
		runtime.GOMAXPROCS(c.procs)
		if got := workers(Settings{}); got != c.want {
			t.Errorf("%d cores: %d workers, want %d", c.procs, got, c.want)
		}
	}
	if got := workers(Settings{Workers: 7}); got != 7 {
		t.Errorf("Workers 7: %d", got)
	}
}

// The checks pane says whether the verdict stands on the full grid or a
// sample, and how many points.
func TestChecksPaneStatesFullOrSampled(t *testing.T) {
	full := fromVerify(&verify.Report{Verdict: verify.StrictlyProper, Grid: verify.Grid{Resolution: 225, Points: 25651, Tolerance: 1e-9}})
	if got := gridLine(full); !strings.HasPrefix(got, "full grid") || !strings.Contains(got, "25651 points") {
		t.Errorf("full: %q", got)
	}
	sampled := fromVerify(&verify.Report{Verdict: verify.Proper, Grid: verify.Grid{Resolution: 80, Points: 3008, Tolerance: 1e-9, Sampled: true}})
	if got := gridLine(sampled); !strings.HasPrefix(got, "sampled grid") || !strings.Contains(got, "3008 points") {
		t.Errorf("sampled: %q", got)
	}
}
