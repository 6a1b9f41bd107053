package tui

import (
	"bytes"
	"context"
	"io"
	"reflect"
	"sync/atomic"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/exp/teatest"
	"github.com/muesli/termenv"

	"scorewright/generator/design"
	"scorewright/internal/pool"
)

// testStyles pins the colour profile so views are plain text.
func testStyles(t testing.TB) Styles {
	t.Helper()
	lipgloss.SetColorProfile(termenv.Ascii)
	r := lipgloss.NewRenderer(io.Discard)
	r.SetColorProfile(termenv.Ascii)
	return NewStyles(r)
}

func testModel(t testing.TB, d *design.Design, set Settings) *Model {
	t.Helper()
	if set.Debounce == 0 {
		set.Debounce = time.Millisecond
	}
	if set.Dir == "" {
		set.Dir = t.TempDir()
	}
	if set.RecoveryDir == "" {
		set.RecoveryDir = t.TempDir()
	}
	m := New(d, "", set, testStyles(t))
	t.Cleanup(m.Close)
	return m
}

// settle runs cmd and every command its messages lead to, synchronously,
// feeding each message to m; it stops at tea.Quit.
func settle(t testing.TB, m *Model, cmd tea.Cmd) {
	t.Helper()
	queue := []tea.Cmd{cmd}
	for steps := 0; len(queue) > 0; steps++ {
		if steps > 10000 {
			t.Fatal("settle: too many steps")
		}
		c := queue[0]
		queue = queue[1:]
		if c == nil {
			continue
		}
		msg := c()
		switch msg := msg.(type) {
		case nil:
			continue
		case tea.BatchMsg:
			queue = append(queue, msg...)
			continue
		case tea.QuitMsg:
			return
		}
		if reflect.TypeOf(msg).String() == "tea.sequenceMsg" {
			t.Fatal("settle: sequences are not used by the workbench")
		}
		_, next := m.Update(msg)
		queue = append(queue, next)
	}
}

// start sizes and initialises m and lets its work finish.
func start(t testing.TB, m *Model, w, h int) {
	t.Helper()
	settle(t, m, m.Init())
	_, cmd := m.Update(tea.WindowSizeMsg{Width: w, Height: h})
	settle(t, m, cmd)
}

// press sends keys to m and lets the work they start finish.
func press(t testing.TB, m *Model, keys ...tea.KeyMsg) {
	t.Helper()
	for _, k := range keys {
		_, cmd := m.Update(k)
		settle(t, m, cmd)
	}
}

func runes(s string) tea.KeyMsg { return tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(s)} }

var (
	keyDown  = tea.KeyMsg{Type: tea.KeyDown}
	keyUp    = tea.KeyMsg{Type: tea.KeyUp}
	keyEnter = tea.KeyMsg{Type: tea.KeyEnter}
	keyEsc   = tea.KeyMsg{Type: tea.KeyEsc}
	keyTab   = tea.KeyMsg{Type: tea.KeyTab}
	keyRight = tea.KeyMsg{Type: tea.KeyRight}
	keyLeft  = tea.KeyMsg{Type: tea.KeyLeft}
	keyBack  = tea.KeyMsg{Type: tea.KeyBackspace}
	keyEnd   = tea.KeyMsg{Type: tea.KeyEnd}
	keyCtrlS = tea.KeyMsg{Type: tea.KeyCtrlS}
	keyCtrlN = tea.KeyMsg{Type: tea.KeyCtrlN}
	keyCtrlC = tea.KeyMsg{Type: tea.KeyCtrlC}
)

// fakeChecker stands in for the checks package in tests of the
// workbench's plumbing: it walks a grid of the requested size, reporting
// progress, and passes. It judges nothing.
type fakeChecker struct {
	points  int64
	block   chan struct{} // when set, the run waits here before finishing
	started atomic.Int64
	stopped atomic.Int64 // runs that saw their context cancelled
	running atomic.Bool
}

func (f *fakeChecker) check(ctx context.Context, d *design.Design, s Settings, progress pool.Progress) (*CheckReport, error) {
	f.started.Add(1)
	f.running.Store(true)
	defer f.running.Store(false)
	for i := int64(1); i <= f.points; i++ {
		if ctx.Err() != nil {
			f.stopped.Add(1)
			return nil, ctx.Err()
		}
		if i%64 == 0 || i == f.points {
			progress(pool.Step{Done: float64(i), Total: float64(f.points), Unit: pool.UnitWork, Last: i == f.points})
		}
	}
	if f.block != nil {
		select {
		case <-f.block:
		case <-ctx.Done():
			f.stopped.Add(1)
			return nil, ctx.Err()
		}
	}
	return &CheckReport{Verdict: "test-pass", Resolution: 10, Points: f.points, Tolerance: 1e-9,
		Rows: []CheckRow{{Name: "plumbing", Passed: true, Worst: 0}}}, nil
}

func tea_ctrlO() tea.KeyMsg { return tea.KeyMsg{Type: tea.KeyCtrlF} }

func sizeMsg(w, h int) tea.WindowSizeMsg { return tea.WindowSizeMsg{Width: w, Height: h} }

func tea_ctrlX() tea.KeyMsg { return tea.KeyMsg{Type: tea.KeyCtrlE} }

// outputWatch waits on a teatest program's output. The renderer only
// redraws lines that changed, so a wait looks at all output since the
// last act rather than since the last wait.
type outputWatch struct {
	t    *testing.T
	tm   *teatest.TestModel
	all  []byte
	mark int
}

// press marks the output, sends keys and waits until what shows after
// them: one step of a flow.
func (o *outputWatch) press(what string, keys ...tea.KeyMsg) {
	o.t.Helper()
	o.act()
	for _, k := range keys {
		o.tm.Send(k)
	}
	o.wait(what)
}

// act marks the point after which the next waits look.
func (o *outputWatch) act() { o.mark = len(o.all) }

// wait blocks until what shows in the output since the last act (20 s at
// most).
func (o *outputWatch) wait(what string) {
	o.t.Helper()
	base := o.all
	teatest.WaitFor(o.t, o.tm.Output(), func(b []byte) bool {
		o.all = append(base[:len(base):len(base)], b...)
		return bytes.Contains(o.all[o.mark:], []byte(what))
	}, teatest.WithDuration(20*time.Second), teatest.WithCheckInterval(5*time.Millisecond))
}
