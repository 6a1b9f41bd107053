package tui

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/teatest"
)

// pump runs cmd in the background and forwards the messages it leads to
// into msgs, expanding batches; ticks and streams run as they would in a
// program.
func pump(cmd tea.Cmd, msgs chan<- tea.Msg) {
	if cmd == nil {
		return
	}
	go func() {
		msg := cmd()
		if b, ok := msg.(tea.BatchMsg); ok {
			for _, c := range b {
				pump(c, msgs)
			}
			return
		}
		if msg != nil {
			msgs <- msg
		}
	}()
}

// While a large check runs in the background, Update keeps answering:
// every key sent is handled while the job is still running. No clock is
// consulted; the job is held open until the keys are done.
func TestUpdateAnswersWhileACheckRuns(t *testing.T) {
	fc := &fakeChecker{points: 1 << 16, block: make(chan struct{})}
	m := testModel(t, nil, Settings{Checker: fc.check})
	msgs := make(chan tea.Msg, 64)
	pump(m.Init(), msgs)
	_, cmd := m.Update(sizeMsg(80, 24))
	pump(cmd, msgs)
	deadline := time.After(10 * time.Second)
	for !fc.running.Load() || !m.Checking() {
		select {
		case msg := <-msgs:
			_, cmd := m.Update(msg)
			pump(cmd, msgs)
		case <-deadline:
			t.Fatal("no check started")
		}
	}
	// The progress bar follows the run.
	for m.checks.done == 0 || !strings.Contains(m.View(), "% checking") {
		select {
		case msg := <-msgs:
			_, cmd := m.Update(msg)
			pump(cmd, msgs)
		case <-deadline:
			t.Fatal("no progress shown")
		}
	}
	m.setFocus(panePicture)
	const keys = 500
	before := m.updates
	for i := 0; i < keys; i++ {
		m.Update(runes("m")) // its picture command is not run: only Update's own work counts
		if !fc.running.Load() {
			t.Fatalf("the check stopped after %d keys", i)
		}
	}
	if got := m.updates - before; got != keys || !m.Checking() {
		t.Fatalf("handled %d of %d keys while checking=%v", got, keys, m.Checking())
	}
	close(fc.block)
	for m.CheckReport() == nil {
		select {
		case msg := <-msgs:
			_, cmd := m.Update(msg)
			pump(cmd, msgs)
		case <-deadline:
			t.Fatal("the check never finished")
		}
	}
	if m.CheckReport().Verdict != "test-pass" {
		t.Fatalf("report %+v", m.CheckReport())
	}
}

// An edit while a check runs cancels it through its context, and a late
// answer from the cancelled run is dropped.
func TestStaleRunDropped(t *testing.T) {
	fc := &fakeChecker{points: 10, block: make(chan struct{})}
	m := testModel(t, nil, Settings{Checker: fc.check})
	msgs := make(chan tea.Msg, 64)
	pump(m.Init(), msgs)
	_, cmd := m.Update(sizeMsg(80, 24))
	pump(cmd, msgs)
	// Feed messages until the first run has started.
	for fc.started.Load() == 0 || !m.Checking() {
		_, cmd := m.Update(<-msgs)
		pump(cmd, msgs)
	}
	firstRun := m.checkJob.run
	// Edit: the parameter step.
	_, cmd = m.Update(keyDown)
	pump(cmd, msgs)
	for i := 0; i < 3; i++ {
		_, cmd = m.Update(keyDown)
		pump(cmd, msgs)
	}
	_, cmd = m.Update(keyRight)
	pump(cmd, msgs)
	if m.gen < 2 {
		t.Fatal("edit did not start a new generation")
	}
	// The first run sees its context cancelled.
	deadline := time.After(10 * time.Second)
	for fc.stopped.Load() == 0 {
		select {
		case msg := <-msgs:
			_, cmd := m.Update(msg)
			pump(cmd, msgs)
		case <-deadline:
			t.Fatal("the stale run was not cancelled")
		}
	}
	// A late answer from the first run is ignored.
	m.Update(checkRunMsg{run: firstRun, msg: checkDoneMsg{gen: 1, report: &CheckReport{Verdict: "stale"}}})
	if r := m.CheckReport(); r != nil && r.Verdict == "stale" {
		t.Fatal("a stale report was shown")
	}
	close(fc.block)
	for m.CheckReport() == nil {
		select {
		case msg := <-msgs:
			_, cmd := m.Update(msg)
			pump(cmd, msgs)
		case <-deadline:
			t.Fatal("the new run never finished")
		}
	}
	if fc.started.Load() < 2 {
		t.Fatalf("%d runs started, want a fresh one after the edit", fc.started.Load())
	}
}

// A whole session through a real program, with the real checks, fit and
// export: edit the formula, see the error, fix it, see the checks pass,
// change the budget, export a CSV, save the design, quit.
func TestSessionFlow(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, nil, Settings{Dir: dir, Version: "test"})
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(120, 40))
	o := &outputWatch{t: t, tm: tm}
	wait, act := o.wait, o.act
	wait("Verdict strictly-proper")
	act()
	for _, k := range []tea.KeyMsg{keyDown, keyDown, keyDown, keyEnter, keyEnd} {
		tm.Send(k)
	}
	tm.Type(" + zz")
	wait(`unknown name "zz"`)
	wait("not run: the formula does not compile")
	act()
	for i := 0; i < 5; i++ {
		tm.Send(keyBack)
	}
	wait("compiles")
	wait("Verdict strictly-proper")
	act()
	tm.Send(keyEsc)
	// To the budget pane (design → picture → checks → budget): raise the cap.
	tm.Send(keyTab)
	tm.Send(keyTab)
	tm.Send(keyTab)
	tm.Send(keyDown)
	tm.Send(keyRight)
	wait("41")
	wait("menu re-check passed")
	act()
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlE})
	wait("Export the payment table")
	act()
	tm.Send(keyEnter)
	wait("exported:")
	act()
	tm.Send(keyCtrlS)
	wait("Save the design")
	act()
	tm.Send(keyEnter)
	wait("saved the design to")
	tm.Send(runes("q"))
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	d := fm.Design()
	if d.Budget.Cap != 41 {
		t.Errorf("cap %v, want 41", d.Budget.Cap)
	}
	if !strings.HasSuffix(d.Formula, "(g - 1)") {
		t.Errorf("formula %q", d.Formula)
	}
	if r := fm.CheckReport(); r == nil || r.Verdict != "strictly-proper" {
		t.Errorf("check report at the end: %+v", r)
	}
	csv, err := os.ReadFile(filepath.Join(dir, "orchard-co-operative-frost-night-forecasts.csv"))
	if err != nil {
		t.Fatalf("no CSV: %v", err)
	}
	if !bytes.Contains(csv, []byte("frost")) || !bytes.Contains(csv, []byte("41")) {
		t.Errorf("CSV lacks the labels or the new cap:\n%s", csv)
	}
	if !bytes.Contains(bytes.ToLower(csv), []byte("counsel")) {
		t.Errorf("CSV lacks the caution")
	}
	if _, err := os.Stat(filepath.Join(dir, "orchard-co-operative-frost-night-forecasts.toml")); err != nil {
		t.Errorf("design not saved: %v", err)
	}
}

// BenchmarkUpdateWhileChecking measures one Update (a picture key) while a
// check of a large grid runs in the background.
func BenchmarkUpdateWhileChecking(b *testing.B) {
	fc := &fakeChecker{points: 1 << 40}
	m := testModel(b, nil, Settings{Checker: fc.check})
	msgs := make(chan tea.Msg, 64)
	pump(m.Init(), msgs)
	_, cmd := m.Update(sizeMsg(120, 40))
	pump(cmd, msgs)
	for !fc.running.Load() {
		_, cmd := m.Update(<-msgs)
		pump(cmd, msgs)
	}
	m.setFocus(panePicture)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		m.Update(runes("m"))
	}
	b.StopTimer()
	if !fc.running.Load() {
		b.Fatal("the check was not running during the benchmark")
	}
	m.Close()
}

// BenchmarkUpdateTyping measures one Update for a key typed into the
// formula (the recompile it starts is a command, not run here).
func BenchmarkUpdateTyping(b *testing.B) {
	m := testModel(b, nil, Settings{})
	start(b, m, 120, 40)
	press(b, m, keyDown, keyDown, keyDown, keyEnter, keyEnd)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if i%2 == 0 {
			m.Update(runes(" "))
		} else {
			m.Update(keyBack)
		}
	}
}

// BenchmarkView measures drawing the whole 120×40 screen.
func BenchmarkView(b *testing.B) {
	m := testModel(b, DemoHarvest(), Settings{})
	start(b, m, 120, 40)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		_ = m.View()
	}
}
