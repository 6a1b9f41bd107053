package tui

import (
	"context"
	"runtime"
	"slices"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/bregman"
	"scorewright/verify"
)

// BenchmarkKeyToScreenUnderCheck is the time from a key to its redrawn
// screen (Update, then View, at 80x24) while a grid check runs beside it
// on the workers the workbench gives it (all cores but one, see workers)
// and, for comparison, on every core. It reports the median and the 99th
// percentile in milliseconds; a check that takes every core leaves the
// screen's goroutine waiting for the scheduler to preempt a worker.
//
//	go test -run '^$' -bench KeyToScreen -benchtime 400x ./tui
func BenchmarkKeyToScreenUnderCheck(b *testing.B) {
	if runtime.GOMAXPROCS(0) < 2 {
		b.Skip("one core: there is none to leave to the screen")
	}
	f, err := bregman.NewFormula("-sum(p*ln(p))", bregman.Options{Outcomes: 3})
	if err != nil {
		b.Fatal(err)
	}
	rule := &bregman.Rule{Gen: f}
	for _, c := range []struct {
		name    string
		workers int
	}{
		{"idle", 0},
		{"check-on-all-but-one", workers(Settings{})},
		{"check-on-every-core", runtime.GOMAXPROCS(0)},
	} {
		b.Run(c.name, func(b *testing.B) {
			m := testModel(b, NewDesign(), Settings{})
			m.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
			ctx, cancel := context.WithCancel(context.Background())
			done := make(chan struct{})
			go func() {
				defer close(done)
				for c.workers > 0 && ctx.Err() == nil {
					// Resolution 600: 180,901 points, seconds a check.
					_, _ = verify.CheckRule(ctx, rule, verify.Settings{Resolution: 600, Workers: c.workers})
				}
			}()
			time.Sleep(50 * time.Millisecond) // let the check's workers start
			keys := []tea.KeyMsg{{Type: tea.KeyTab}, {Type: tea.KeyDown}, {Type: tea.KeyUp}}
			lat := make([]float64, 0, b.N)
			b.ResetTimer()
			for i := range b.N {
				t0 := time.Now()
				m.Update(keys[i%len(keys)])
				_ = m.View()
				lat = append(lat, float64(time.Since(t0).Microseconds())/1000)
				time.Sleep(2 * time.Millisecond) // a typist's pace, not a flood
			}
			b.StopTimer()
			cancel()
			<-done
			slices.Sort(lat)
			b.ReportMetric(lat[len(lat)/2], "p50-ms")
			b.ReportMetric(lat[len(lat)*99/100], "p99-ms")
		})
	}
}
