package tui

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"

	"scorewright/generator/design"
	"scorewright/presets"
)

// Golden views at the two sizes the workbench promises. Regenerate with
// go test ./tui -run Golden -update.
func TestGoldenFrost80x24(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenFrost120x40(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenHarvest80x24(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 80, 24)
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenHarvest120x40(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 120, 40)
	press(t, m, keyTab, runes("m"))
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenFormulaError80x24(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyDown, keyDown, keyDown, keyEnter, keyEnd, runes(" + q"))
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenHelp80x24(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, runes("?"))
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenTooSmall(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 60, 20)
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenFivePoints120x40(t *testing.T) {
	d := DemoHarvest()
	d.Title = "five-way test"
	d.Labels = []string{"a", "b", "c", "d", "e"}
	d.Ordered, d.Preset, d.Formula = false, "", "1 - sum(p^2)"
	m := testModel(t, d, Settings{})
	start(t, m, 120, 40)
	golden.RequireEqual(t, []byte(m.View()))
}

func TestViewFitsTheTerminal(t *testing.T) {
	for _, size := range [][2]int{{80, 24}, {100, 30}, {120, 40}, {160, 50}, {60, 20}} {
		m := testModel(t, nil, Settings{})
		start(t, m, size[0], size[1])
		lines := strings.Split(m.View(), "\n")
		if len(lines) != size[1] {
			t.Errorf("%v: %d lines", size, len(lines))
		}
		for i, l := range lines {
			if w := ansi.StringWidth(l); w > size[0] {
				t.Errorf("%v: line %d is %d wide", size, i, w)
			}
		}
	}
}

func TestTypingNeverTriggersShortcuts(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyDown, keyDown, keyDown, keyEnter, keyEnd)
	// q would quit, ? would open help, m and p are picture keys, + adds an outcome.
	press(t, m, runes("q"), runes("?"), runes("m"), runes("p"), runes("+"), runes("["))
	if m.quitting || m.help {
		t.Fatalf("a shortcut fired while typing: quitting=%v help=%v", m.quitting, m.help)
	}
	if got := m.Design().Formula; !strings.HasSuffix(got, "q?mp+[") {
		t.Fatalf("formula = %q, want the typed keys at its end", got)
	}
	if m.Design().N() != 2 {
		t.Fatal("+ added an outcome while typing")
	}
	press(t, m, keyEsc, runes("q"))
	if m.quitting || m.leaving == nil {
		t.Fatalf("q quit at once with unsaved changes (status %q)", m.Status())
	}
	press(t, m, runes("d"))
	if !m.quitting {
		t.Fatal("q, then d, does not quit once typing stopped")
	}
}

func TestFormulaErrorShowsCaretAndClears(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyDown, keyEnter, keyEnd, runes(" + zz"))
	v := m.View()
	if !strings.Contains(v, `unknown name "zz"`) {
		t.Fatalf("no error for an unknown name:\n%s", v)
	}
	// The caret line sits under the formula line with the caret at the column.
	lines := strings.Split(v, "\n")
	for i, l := range lines {
		if j := strings.Index(l, "(1 - sum(p^g)) / (g - 1) + zz"); j >= 0 && !strings.Contains(l, "┃") {
			caret := strings.IndexRune(lines[i+1], '^')
			if want := j + strings.Index("(1 - sum(p^g)) / (g - 1) + zz", "zz"); runeCol(lines[i+1], caret) != runeCol(l, want) {
				t.Errorf("caret at %d, want under column %d:\n%s\n%s", caret, want, l, lines[i+1])
			}
		}
	}
	press(t, m, keyBack, keyBack, keyBack, keyBack, keyBack)
	if v := m.View(); !strings.Contains(v, "✓ compiles") {
		t.Fatalf("error did not clear:\n%s", v)
	}
}

func runeCol(s string, byteIdx int) int { return len([]rune(s[:byteIdx])) }

func TestParameterStepRewritesTheFormula(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyDown, keyDown, keyDown, keyDown, keyRight, keyRight)
	if got := m.Design().Formula; !strings.Contains(got, "\ng = 2.2\n") {
		t.Fatalf("formula after two steps up:\n%s", got)
	}
	if !strings.Contains(m.View(), "g       = 2.2") {
		t.Fatal("parameter list does not show 2.2")
	}
}

func TestSetParamKeepsComment(t *testing.T) {
	d := &design.Design{Formula: "a = 1  # weight\nb = 2\nc^(a-1) * (1-c)^(b-1)"}
	setParam(d, "a", 1.5)
	if want := "a = 1.5  # weight\nb = 2\nc^(a-1) * (1-c)^(b-1)"; d.Formula != want {
		t.Fatalf("got %q, want %q", d.Formula, want)
	}
	// An override gives way to the line, so the text shown is the value
	// checked (issue 13: what is seen is what is saved).
	d.Params = map[string]float64{"b": 3}
	setParam(d, "b", 4)
	if d.Params != nil || !strings.Contains(d.Formula, "\nb = 4\n") {
		t.Fatalf("the line must say the value and the override go: %v %q", d.Params, d.Formula)
	}
}

func TestPruneParams(t *testing.T) {
	d := &design.Design{Formula: "g = 2\n1 - sum(p^g)", Params: map[string]float64{"g": 3, "gone": 1}}
	pruneParams(d)
	if _, ok := d.Params["gone"]; ok || d.Params["g"] != 3 {
		t.Fatalf("params = %v", d.Params)
	}
}

func TestShiftBeliefStaysOnTheSimplex(t *testing.T) {
	q := []float64{0.2, 0.3, 0.5}
	for i := 0; i < 40; i++ {
		q = shiftBelief(q, i%3, 0.05*float64(1-2*(i%2)))
		s := 0.0
		for _, v := range q {
			if v < 0 || v > 1 {
				t.Fatalf("entry outside [0, 1]: %v", q)
			}
			s += v
		}
		if math.Abs(s-1) > 1e-12 {
			t.Fatalf("sum %v: %v", s, q)
		}
	}
}

// The honesty gap drawn in the picture, against values derived by hand.
func TestGapOnGrid(t *testing.T) {
	cases := []struct {
		name    string
		mode    design.Mode
		formula string
		belief  []float64
		want    float64
		tol     float64
	}{
		// Linear rule pay = p_y (improper, common practice): belief 0.6
		// expects 0.6 from reporting 1, 0.6^2 + 0.4^2 = 0.52 when honest.
		{"linear", design.ModePayout, "p[y]", []float64{0.6, 0.4}, 0.08, 1e-12},
		// Quadratic generator (Brier 1950): proper, no gain anywhere.
		{"quadratic", design.ModeGenerator, "1 - sum(p^2)", []float64{0.6, 0.4}, 0, 0},
		// Convex "generator" H = |p|^2 (derived by hand): g = 2p, so
		// L(p,k) = |p|^2 + 2p_k - 2|p|^2 = 2p_k - |p|^2 and
		// Phi(q,p) = 2<q,p> - |p|^2. Honest: |q|^2 = 0.52. Best report the
		// vertex (0, 1): 2*0.4 - 1 = -0.2. Gap 0.52 - (-0.2) = 0.72.
		{"convex", design.ModeGenerator, "sum(p^2)", []float64{0.6, 0.4}, 0.72, 1e-12},
	}
	for _, c := range cases {
		d := &design.Design{Version: 1, Labels: []string{"a", "b"}, Mode: c.mode, Formula: c.formula}
		comp := compileDesign(d)
		if !comp.ok() {
			t.Fatalf("%s: %v", c.name, comp.err)
		}
		s := comp.newSampler()
		got := gapOnGrid(s, gridScores(s, 2, 200), c.belief)
		if math.Abs(got-c.want) > c.tol {
			t.Errorf("%s: gap %v, want %v", c.name, got, c.want)
		}
	}
}

func TestPresetPicker(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyDown, keyDown, keyEnter) // formula has no params: row 4 is the preset
	if !m.designPane.Picking() {
		t.Fatal("enter on the preset row does not open the picker")
	}
	// Move to the log preset (first) and apply it.
	for i := 0; i < len(presets.All()); i++ {
		if m.designPane.pick == 0 {
			break
		}
		press(t, m, keyUp)
	}
	press(t, m, keyEnter)
	if d := m.Design(); d.Preset != "log" || d.Formula != "-sum(p*ln(p))" {
		t.Fatalf("preset not applied: %q %q", d.Preset, d.Formula)
	}
}

func TestOutcomesEditAndCount(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyEnter)
	for range "frost, clear" {
		press(t, m, keyBack)
	}
	press(t, m, runes("hard frost, light frost, none"), keyEnter)
	if d := m.Design(); strings.Join(d.Labels, "|") != "hard frost|light frost|none" {
		t.Fatalf("labels %q", d.Labels)
	}
	press(t, m, runes("-"))
	if m.Design().N() != 2 {
		t.Fatal("- did not remove an outcome")
	}
	press(t, m, runes("-"))
	if m.Design().N() != 2 {
		t.Fatal("- removed below 2 outcomes")
	}
}

func TestSaveAsksBeforeOverwriting(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, nil, Settings{Dir: dir})
	start(t, m, 80, 24)
	press(t, m, keyCtrlS, keyEnter)
	path := filepath.Join(dir, "orchard-co-operative-frost-night-forecasts.toml")
	if _, err := os.Stat(path); err != nil {
		t.Fatalf("not saved: %v (status %q)", err, m.Status())
	}
	if !strings.Contains(m.Status(), path) {
		t.Fatalf("status %q does not say where", m.Status())
	}
	press(t, m, keyDown, keyDown, keyDown, keyDown, keyRight) // g = 2.1
	press(t, m, keyCtrlS, keyEnter)
	if m.dialog == nil || !m.dialog.confirm {
		t.Fatal("no question before replacing the file")
	}
	press(t, m, runes("n"))
	if d, _ := design.Load(path); !strings.Contains(d.Formula, "g = 2\n") {
		t.Fatal("file replaced after no")
	}
	press(t, m, keyEnter, runes("y"))
	d, err := design.Load(path)
	if err != nil || !strings.Contains(d.Formula, "g = 2.1\n") {
		t.Fatalf("file not replaced after yes: %v %q", err, d.Formula)
	}
	// Open it back after switching demos.
	press(t, m, keyCtrlN)
	press(t, m, tea_ctrlO(), runes(filepath.Base(path)), keyEnter)
	if d := m.Design(); d.N() != 2 || !strings.Contains(d.Formula, "g = 2.1") {
		t.Fatalf("open gave %q (status %q)", d.Formula, m.Status())
	}
}

func TestOpenReportsBadFiles(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.toml")
	if err := os.WriteFile(bad, []byte("version = 1\nmode = \"generator\"\noutcomes = [\"a\"]\nformula = \"1\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	m := testModel(t, nil, Settings{Dir: dir})
	start(t, m, 80, 24)
	press(t, m, tea_ctrlO(), runes("bad.toml"), keyEnter)
	if m.dialog == nil || !strings.Contains(m.dialog.msg, "outcomes") {
		msg := "no dialog"
		if m.dialog != nil {
			msg = m.dialog.msg
		}
		t.Fatalf("no clear message for a bad file: %s", msg)
	}
}

func TestResizeKeepsWorking(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	for _, s := range [][2]int{{80, 24}, {60, 20}, {200, 60}, {80, 24}} {
		_, cmd := m.Update(sizeMsg(s[0], s[1]))
		settle(t, m, cmd)
		if v := m.View(); s[0] < 80 && !strings.Contains(v, "at least 80×24") {
			t.Fatalf("%v: no clear message", s)
		}
	}
	if !strings.Contains(m.View(), "effort per outcome") {
		t.Fatal("picture lost after resizing")
	}
}

// Keys that would lose unsaved work ask first (tui/leave_test.go has
// every path); ctrl+n is the editor's own key while typing, never the demo
// switch, and the global keys that are not text still work while typing.
func TestUnsavedChangesAsk(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, runes("+")) // an edit
	press(t, m, keyCtrlN)
	if m.Design().N() != 3 || m.leaving == nil {
		t.Fatal("ctrl+n discarded an edit without asking")
	}
	press(t, m, runes("d"))
	if m.Design().Title != DemoHarvest().Title {
		t.Fatal("d did not switch")
	}
	press(t, m, keyDown, keyDown, keyDown, keyEnter, keyCtrlN)
	if m.Design().Title != DemoHarvest().Title || !m.designPane.Typing() || m.leaving != nil {
		t.Fatal("ctrl+n while typing switched the design or asked")
	}
	press(t, m, tea.KeyMsg{Type: tea.KeyF1})
	if !m.help {
		t.Fatal("F1 does not open the help while typing")
	}
	press(t, m, keyEsc, keyCtrlS)
	if m.dialog == nil || m.dialog.kind != dialogSave {
		t.Fatal("ctrl+s does not open the save dialog while typing")
	}
}

// Once the budget is fitted the picture can draw pay. Derived by hand: the
// demo's g = 2 generator has effort 2(1-p)^2 and 2p^2 (Brier 1950), 0..2
// over the menu, so floor 0 and cap 40 give pay = 40 - 20 L; at p = 0.3
// that is 40 - 20(0.98) = 20.4 and 40 - 20(0.18) = 36.4.
func TestPictureDrawsFittedPay(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyTab, runes("m"))
	v := m.View()
	if !strings.Contains(v, "Picture · pay per outcome") || !strings.Contains(v, "┊ 0.30: 20.4 / 36.4") {
		t.Fatalf("fitted pay not drawn:\n%s", v)
	}
}

// A mean-pay budget from the budget pane. Frost demo (quadratic effort
// L(p, k) = 1 - 2p_k + sum p^2, floor 0): the largest menu effort is 2
// (report (0, 1), frost) and H(uniform) = 0.5, so a mean pay M gives
// B = M/1.5 and A = 2B (derived by hand from pay = A - B·L, A - B·2 = floor,
// A - B·0.5 = M). M = 30 is the cap-40 table again; M = 31 pays 41.3 (41.33
// rounded to 0.1) for (0, 1) when it stays clear.
func TestMeanPayBudget(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	m.setFocus(paneBudget)
	press(t, m, keyDown, keyDown, keyRight)
	d := m.Design()
	if d.Budget.MeanPay == nil || *d.Budget.MeanPay != 30 {
		t.Fatalf("mean pay %v", d.Budget.MeanPay)
	}
	row := func() []string {
		t.Helper()
		tv := m.budget.table
		if tv == nil || m.budget.err != nil || len(tv.Rows) == 0 {
			t.Fatalf("no table: %v", m.budget.err)
		}
		return tv.Rows[0]
	}
	if r := row(); strings.Join(r, " ") != "(0, 1) 0.0 40.0" || !m.budget.table.Passed {
		t.Fatalf("mean 30: first row %q, passed %v", r, m.budget.table.Passed)
	}
	if v := m.View(); !strings.Contains(v, "unused while a mean pay is set") {
		t.Fatalf("the cap's note is missing:\n%s", v)
	}
	press(t, m, keyRight)
	if r := row(); strings.Join(r, " ") != "(0, 1) 0.0 41.3" {
		t.Fatalf("mean 31: first row %q", r)
	}
	// Typing 0 goes back to the cap budget.
	press(t, m, keyEnter)
	m.budget.ti.SetValue("0")
	press(t, m, keyEnter)
	if d := m.Design(); d.Budget.MeanPay != nil {
		t.Fatalf("mean pay still set: %v", *d.Budget.MeanPay)
	}
	if r := row(); strings.Join(r, " ") != "(0, 1) 0.0 40.0" {
		t.Fatalf("cap again: first row %q", r)
	}
	// A point design refuses a mean pay.
	pd := &design.Design{Version: 1, Title: "milk yield", Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 40},
		Budget: design.Budget{Floor: 0, Cap: 20, Step: 10}}
	pm := testModel(t, pd, Settings{})
	start(t, pm, 120, 40)
	pm.setFocus(paneBudget)
	for _, f := range fieldsFor(pm.d) {
		if f.label == "Mean" {
			t.Fatal("a point design offers a mean pay")
		}
	}
}

// An export records what the checks proved of the design as it stands:
// the demo's quadratic rule is strictly proper (a textbook fact: its
// generator 1 - sum(p^2) has Hessian -2I), the certificate proves it, and
// the record's verdict kind is "certified strictly proper" with the
// statement beside it,
// as `scorewright table --certify` writes it. -(||p||_3^(1/2))^2 is the
// pseudospherical generator -||p||_3, strictly proper too (Gneiting and
// Raftery 2007, JASA, section 3), but written as a power of a power it is
// not the norm shape the structural argument reads, and its curvature
// vanishes on the faces, so in a short deadline the certificate leaves it
// undecided and the record stays grid evidence.
func TestExportRecordsTheCertificate(t *testing.T) {
	for _, tc := range []struct {
		formula, kind string
	}{{"", "certified strictly proper"}, {"-(sum(p^3)^(1/6))^2", "grid evidence"}} {
		dir := t.TempDir()
		d := DemoFrost()
		if tc.formula != "" {
			d.Preset, d.Formula, d.Params = "", tc.formula, nil
			d.Budget.Unit = 0.001 // fine enough for its re-check to pass
			if _, err := PrepareDesign(d); err != nil {
				t.Fatal(err)
			}
		}
		m := testModel(t, d, Settings{Dir: dir, Version: "test", CertifyDeadline: 200 * time.Millisecond})
		start(t, m, 80, 24)
		r := m.CheckReport()
		if r == nil || r.Certificate == nil {
			t.Fatalf("%s: no certificate ran: %+v", tc.kind, r)
		}
		press(t, m, tea_ctrlX(), keyDown, keyEnter) // csv → md, export
		b, err := os.ReadFile(filepath.Join(dir, "orchard-co-operative-frost-night-forecasts.md"))
		if err != nil {
			t.Fatalf("%v: %s", err, m.Status())
		}
		if !strings.Contains(string(b), "**verdict kind:** "+tc.kind) {
			t.Errorf("%s (certificate %s): record:\n%s", tc.kind, r.Certificate.Verdict, b)
		}
		if tc.kind != "grid evidence" && !strings.Contains(string(b), "**certificate:** certified strictly proper") {
			t.Errorf("record lacks the certificate's statement:\n%s", b)
		}
	}
}
