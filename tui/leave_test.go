package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/exp/teatest"

	"scorewright/generator/design"
)

// handWrite types into the formula, so the design has unsaved work that a
// preset would replace, and leaves the cursor on the preset row.
func handWrite(t *testing.T, m *Model) {
	t.Helper()
	press(t, m, keyDown, keyDown, keyDown, keyEnter, keyEnd, runes(" + 0"), keyEsc)
	for i := 0; i < 8; i++ {
		press(t, m, keyDown)
	}
	if !handWritten(m.d) || !m.Unsaved() {
		t.Fatalf("the formula is not the user's own: %q", m.d.Formula)
	}
}

// leavePaths are the keys that leave or replace the design, with what
// shows that they acted.
var leavePaths = []struct {
	name  string
	keys  []tea.KeyMsg // the last key is the one that asks
	acted func(m *Model) bool
}{
	{"q", []tea.KeyMsg{runes("q")}, func(m *Model) bool { return m.quitting }},
	{"ctrl+c", []tea.KeyMsg{keyCtrlC}, func(m *Model) bool { return m.quitting }},
	{"next demo", []tea.KeyMsg{keyCtrlN}, func(m *Model) bool { return m.Design().Title == DemoHarvest().Title }},
	{"open", []tea.KeyMsg{tea_ctrlO()}, func(m *Model) bool { return m.dialog != nil && m.dialog.kind == dialogOpen }},
	{"preset", []tea.KeyMsg{keyEnter, keyEnter}, func(m *Model) bool { return m.Design().Preset != "" }},
	{"new", []tea.KeyMsg{{Type: tea.KeyF3}}, func(m *Model) bool { return m.Design().Formula == NewDesign().Formula }},
}

// Every key that would drop unsaved edits asks first: esc keeps the
// design exactly as it was, d goes on without saving.
func TestEveryLeaveKeyAsks(t *testing.T) {
	for _, lp := range leavePaths {
		t.Run(lp.name, func(t *testing.T) {
			m := testModel(t, nil, Settings{})
			start(t, m, 80, 24)
			handWrite(t, m)
			before := m.Design().Formula
			press(t, m, lp.keys...)
			if m.leaving == nil || lp.acted(m) {
				t.Fatalf("%s acted without asking", lp.name)
			}
			if !strings.Contains(m.View(), "would drop unsaved changes") {
				t.Fatalf("the question is not on screen:\n%s", m.View())
			}
			press(t, m, keyEsc)
			if m.leaving != nil || lp.acted(m) || m.Design().Formula != before {
				t.Fatalf("esc did not keep the design (formula %q)", m.Design().Formula)
			}
			press(t, m, lp.keys[len(lp.keys)-1], runes("d"))
			if !lp.acted(m) {
				t.Fatalf("d did not go on (status %q)", m.Status())
			}
		})
	}
}

// With nothing unsaved, the same keys act at once.
func TestNothingToLoseNoQuestion(t *testing.T) {
	for _, lp := range append(leavePaths[:4:4], leavePaths[5]) {
		m := testModel(t, nil, Settings{})
		start(t, m, 80, 24)
		press(t, m, lp.keys...)
		if m.leaving != nil || !lp.acted(m) {
			t.Errorf("%s asked with nothing to lose", lp.name)
		}
	}
}

// s saves first and then does what was asked; cancelling the save keeps
// the design open.
func TestSaveFirstThenGoOn(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, nil, Settings{Dir: dir})
	start(t, m, 80, 24)
	press(t, m, runes("+")) // a third outcome
	press(t, m, keyCtrlN, runes("s"))
	if m.dialog == nil || m.dialog.kind != dialogSave {
		t.Fatal("s does not open the save dialog")
	}
	press(t, m, keyEsc)
	if m.Design().N() != 3 || m.afterSave != nil {
		t.Fatalf("a cancelled save went on (n = %d)", m.Design().N())
	}
	press(t, m, keyCtrlN, runes("s"), keyEnter)
	if m.Design().Title != DemoHarvest().Title {
		t.Fatalf("after the save the demo did not switch (status %q)", m.Status())
	}
	d, err := design.Load(filepath.Join(dir, "orchard-co-operative-frost-night-forecasts.toml"))
	if err != nil || d.N() != 3 {
		t.Fatalf("the edits were not saved first: %v", err)
	}
	press(t, m, runes("+"), runes("q"), runes("s"), keyEnter)
	if !m.quitting {
		t.Fatalf("save then quit did not quit (status %q, dialog %v)", m.Status(), m.dialog != nil)
	}
}

// recoveryFile is the one recovery file in dir, or "".
func recoveryFile(t *testing.T, dir string) string {
	t.Helper()
	fs, _ := filepath.Glob(filepath.Join(dir, "*.recover.toml"))
	if len(fs) > 1 {
		t.Fatalf("more than one recovery file: %v", fs)
	}
	if len(fs) == 0 {
		return ""
	}
	return fs[0]
}

// While edits are unsaved they are on disk; saving or dropping them
// removes the file.
func TestRecoveryFileFollowsTheEdits(t *testing.T) {
	rec, dir := t.TempDir(), t.TempDir()
	m := testModel(t, nil, Settings{RecoveryDir: rec, Dir: dir})
	start(t, m, 80, 24)
	if recoveryFile(t, rec) != "" {
		t.Fatal("a recovery file with nothing unsaved")
	}
	press(t, m, runes("+"))
	f := recoveryFile(t, rec)
	if f == "" {
		t.Fatal("no recovery file for an unsaved edit")
	}
	b, _ := os.ReadFile(f)
	d, err := design.Decode(b)
	if err != nil || d.N() != 3 {
		t.Fatalf("the recovery file does not hold the edit: %v", err)
	}
	press(t, m, keyCtrlS, keyEnter)
	if recoveryFile(t, rec) != "" {
		t.Fatal("the recovery file outlived the save")
	}
	press(t, m, runes("+"))
	if recoveryFile(t, rec) == "" {
		t.Fatal("no recovery file after editing the saved design")
	}
	press(t, m, runes("q"), runes("d"))
	if !m.quitting || recoveryFile(t, rec) != "" {
		t.Fatal("quitting without saving kept the dropped edits")
	}
}

// ctrl+c twice leaves at once; the edits stay in the recovery file and the
// next start offers them: r restores them, still unsaved.
func TestRecoveryOfferedAfterAHardQuit(t *testing.T) {
	rec := t.TempDir()
	crash := func() {
		m := testModel(t, nil, Settings{RecoveryDir: rec})
		start(t, m, 80, 24)
		press(t, m, runes("+"), keyCtrlC, keyCtrlC)
		if !m.quitting || recoveryFile(t, rec) == "" {
			t.Fatal("ctrl+c twice did not quit keeping the edits")
		}
	}
	crash()
	m := testModel(t, nil, Settings{RecoveryDir: rec})
	start(t, m, 80, 24)
	if m.recOffer == nil || !strings.Contains(m.View(), "Unsaved edits were kept") {
		t.Fatalf("the edits were not offered:\n%s", m.View())
	}
	press(t, m, runes("q")) // the offer waits for its answer
	if m.quitting || m.Design().N() != 2 {
		t.Fatal("a key other than the offer's acted")
	}
	press(t, m, runes("r"))
	if m.Design().N() != 3 || !m.Unsaved() || !strings.Contains(m.Status(), "restored") {
		t.Fatalf("not restored: n = %d unsaved %v", m.Design().N(), m.Unsaved())
	}

	// d drops them for good.
	crash()
	m = testModel(t, nil, Settings{RecoveryDir: rec})
	start(t, m, 80, 24)
	press(t, m, runes("d"))
	if m.Design().N() != 2 || recoveryFile(t, rec) != "" {
		t.Fatal("d did not drop the recovered edits")
	}

	// esc keeps them as a design file to open later.
	crash()
	m = testModel(t, nil, Settings{RecoveryDir: rec})
	start(t, m, 80, 24)
	press(t, m, keyEsc)
	kept, _ := filepath.Glob(filepath.Join(rec, "*-kept-*.toml"))
	if len(kept) != 1 || recoveryFile(t, rec) != "" || !strings.Contains(m.Status(), kept[0]) {
		t.Fatalf("esc did not set the edits aside: %v (status %q)", kept, m.Status())
	}
	if d, err := design.Load(kept[0]); err != nil || d.N() != 3 {
		t.Fatalf("the kept file does not open as the design: %v", err)
	}
}

// Edits of a design file are offered when that file is opened again, and
// the file they came from is named.
func TestRecoveryOfADesignFile(t *testing.T) {
	rec, dir := t.TempDir(), t.TempDir()
	path := filepath.Join(dir, "frost.toml")
	if err := DemoFrost().Save(path, false); err != nil {
		t.Fatal(err)
	}
	open := func() *Model {
		d, err := design.Load(path)
		if err != nil {
			t.Fatal(err)
		}
		m := New(d, path, Settings{RecoveryDir: rec, Dir: dir, Debounce: 1}, testStyles(t))
		t.Cleanup(m.Close)
		start(t, m, 80, 24)
		return m
	}
	m := open()
	press(t, m, runes("+"), keyCtrlC, keyCtrlC)
	m = open()
	if m.recOffer == nil || !strings.Contains(m.View(), "frost.toml") {
		t.Fatalf("the edits of frost.toml were not offered:\n%s", m.View())
	}
	press(t, m, runes("r"), keyCtrlS, keyEnter, runes("y"))
	if d, _ := design.Load(path); d == nil || d.N() != 3 || recoveryFile(t, rec) != "" {
		t.Fatal("restored edits were not saved back to frost.toml")
	}
}

// Opening another design after agreeing to drop the edits removes their
// recovery file once the new design is read.
func TestOpenDropsTheOldEdits(t *testing.T) {
	rec, dir := t.TempDir(), t.TempDir()
	if err := DemoHarvest().Save(filepath.Join(dir, "harvest.toml"), false); err != nil {
		t.Fatal(err)
	}
	m := testModel(t, nil, Settings{RecoveryDir: rec, Dir: dir})
	start(t, m, 80, 24)
	press(t, m, runes("+"))
	press(t, m, tea_ctrlO(), runes("d"), keyEsc)
	if recoveryFile(t, rec) == "" {
		t.Fatal("a cancelled open dropped the edits")
	}
	press(t, m, tea_ctrlO(), runes("d"), runes("harvest.toml"), keyEnter)
	if m.Design().Title != DemoHarvest().Title || recoveryFile(t, rec) != "" {
		t.Fatalf("open: title %q, recovery file %q", m.Design().Title, recoveryFile(t, rec))
	}
}

// A session through a real program: an edit, q asks, s saves first (tab
// completes the folder typed) and the program then quits; the design is
// on disk and no recovery file is left.
func TestLeaveFlow(t *testing.T) {
	rec, dir := t.TempDir(), t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, "contracts"), 0o755); err != nil {
		t.Fatal(err)
	}
	m := testModel(t, nil, Settings{Dir: dir, RecoveryDir: rec})
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(80, 24))
	o := &outputWatch{t: t, tm: tm}
	o.wait("strictly proper")
	o.press("outcome 3", runes("+"))
	o.press("would drop unsaved changes", runes("q"))
	o.press("Save the design", runes("s"))
	o.act()
	// Replace the offered path with a folder to complete, then a name.
	for range 80 {
		tm.Send(keyBack)
	}
	tm.Type(dir + "/contr")
	tm.Send(keyTab)
	o.wait("/contracts/")
	tm.Type("kept.toml")
	tm.Send(keyEnter)
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(20*time.Second)).(*Model)
	if !fm.quitting {
		t.Fatal("the program did not quit after saving")
	}
	d, err := design.Load(filepath.Join(dir, "contracts", "kept.toml"))
	if err != nil || d.N() != 3 {
		t.Fatalf("the edit was not saved first: %v", err)
	}
	if f := recoveryFile(t, rec); f != "" {
		t.Errorf("a recovery file outlived the save: %s", f)
	}
}

// A new design is valid, checks at once and is named by no demo: its
// files are "design.*" until the terms give it a title.
func TestNewDesign(t *testing.T) {
	if err := NewDesign().Validate(); err != nil {
		t.Fatal(err)
	}
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, tea.KeyMsg{Type: tea.KeyF3})
	if m.Design().Title != "" || filepath.Base(m.defaultName("csv")) != "design.csv" {
		t.Fatalf("new design titled %q, exported as %s", m.Design().Title, m.defaultName("csv"))
	}
	if r := m.CheckReport(); r == nil || r.Verdict != "strictly-proper" {
		t.Fatalf("the new design's check: %+v", r)
	}
	if h := headerOf(m); !strings.Contains(h, "untitled design") {
		t.Fatalf("header %q", h)
	}
}

// On a terminal below 80×24 the notice that a question about unsaved
// edits waits is wrapped to the width, never cut at the edge, and does
// not offer q, which the question does not take.
func TestTooSmallNoticeWraps(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	handWrite(t, m)
	press(t, m, runes("q"))
	if m.leaving == nil {
		t.Fatal("q with unsaved edits did not ask")
	}
	for _, w := range []int{60, 40} {
		_, cmd := m.Update(tea.WindowSizeMsg{Width: w, Height: 15})
		settle(t, m, cmd)
		v := m.View()
		for i, l := range strings.Split(v, "\n") {
			if n := lipgloss.Width(l); n > w {
				t.Errorf("%d wide: line %d is %d wide: %q", w, i, n, l)
			}
		}
		flat := strings.Join(strings.Fields(v), " ")
		if !strings.Contains(flat, "a question about unsaved edits waits to be answered.") {
			t.Errorf("%d wide: the notice lost its end:\n%s", w, v)
		}
		// q does not quit while the question waits, so it is not offered.
		if strings.Contains(flat, "press q") {
			t.Errorf("%d wide: the notice offers q, which the waiting question does not take:\n%s", w, v)
		}
	}
}
