package tui

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"

	"scorewright/contract/annex"
	"scorewright/contract/lottery"
	"scorewright/generator/design"
	"scorewright/internal/safefile"
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

func TestModeSwitchOffersAPayout(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyDown, keyDown, keyRight)
	d := m.Design()
	if d.Mode != design.ModePayout || !strings.Contains(d.Formula, "hit") {
		t.Fatalf("mode %s formula %q", d.Mode, d.Formula)
	}
	if !strings.Contains(m.View(), "pay per outcome") {
		t.Fatal("picture does not show pay for a payout")
	}
	press(t, m, keyLeft)
	if got := m.Design().Formula; got != DemoFrost().Formula {
		t.Fatalf("back in generator mode the formula is %q", got)
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

// Emphasis mode: the beta weight with a = b = 1 is the quadratic rule up
// to scale (Buja, Stuetzle & Shen 2005), so the workbench draws it, the
// checks pass and the budget fits.
func TestEmphasisMode(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyRight, keyRight) // generator → payout → emphasis
	d := m.Design()
	if d.Mode != design.ModeEmphasis || !strings.Contains(d.Formula, "c^(a-1)") {
		t.Fatalf("mode %s formula %q", d.Mode, d.Formula)
	}
	v := m.View()
	for _, want := range []string{"emphasis weight w(c)", "✓ compiles", "Verdict strictly-proper", "menu re-check passed"} {
		if !strings.Contains(v, want) {
			t.Errorf("view lacks %q:\n%s", want, v)
		}
	}
	// Half squared error (Buja et al. 2005, a = b = 1): at report 0.3 the
	// efforts are (1-0.3)^2/2 = 0.245 and 0.3^2/2 = 0.045.
	eff := make([]float64, 2)
	m.comp.newSampler().scores(eff, []float64{0.3, 0.7})
	if math.Abs(eff[0]-0.245) > 1e-9 || math.Abs(eff[1]-0.045) > 1e-9 {
		t.Errorf("efforts at 0.3: %v, want 0.245, 0.045", eff)
	}
	// With three outcomes the emphasis mode is skipped.
	press(t, m, keyLeft, keyLeft, keyUp, keyUp, runes("+"), keyDown, keyDown, keyRight, keyRight)
	if got := m.Design().Mode; got == design.ModeEmphasis {
		t.Fatal("emphasis offered for 3 outcomes")
	}
}

// Point mode: squared error on [0, 100] (Savage 1971; Gneiting 2011):
// the effort of report x when y happens is (y - x)^2, the checks pass and
// the budget pane shows the point table.
func TestPointMode(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyRight, keyRight, keyRight) // → point
	d := m.Design()
	if d.Mode != design.ModePoint || d.Formula != samplePoint || len(d.Interval) != 2 {
		t.Fatalf("mode %s formula %q interval %v", d.Mode, d.Formula, d.Interval)
	}
	v := m.View()
	for _, want := range []string{"Interval", "[0, 100]", "effort by report", "Verdict strictly-proper", "report \\ outcome"} {
		if !strings.Contains(v, want) {
			t.Errorf("view lacks %q:\n%s", want, v)
		}
	}
	// D(y, x) = (y - x)^2 for phi = -x^2 (derived by hand: phi(x) - 2x(y - x) + y^2).
	ev := m.comp.point.NewEvaluator()
	if got := ev.Divergence(75, 30); math.Abs(got-2025) > 1e-9 {
		t.Errorf("D(75, 30) = %v, want 2025", got)
	}
	// Edit the interval.
	press(t, m, keyUp, keyUp, keyEnter)
	for i := 0; i < 10; i++ {
		press(t, m, keyBack)
	}
	press(t, m, runes("10, 20"), keyEnter)
	if iv := m.Design().Interval; iv[0] != 10 || iv[1] != 20 {
		t.Fatalf("interval %v", iv)
	}
	golden.RequireEqual(t, []byte(m.View()))
	// Next, the point payout audit keeps the interval; then back to
	// outcomes: the probability step comes back.
	press(t, m, keyDown, keyDown, keyRight)
	if d := m.Design(); d.Mode != design.ModePointPayout || len(d.Interval) != 2 || d.Interval[0] != 10 {
		t.Fatalf("after point: mode %s interval %v", d.Mode, d.Interval)
	}
	press(t, m, keyRight)
	if d := m.Design(); d.Mode != design.ModeGenerator || d.Budget.Step != 0.05 {
		t.Fatalf("back to generator: mode %s step %v", d.Mode, d.Budget.Step)
	}
}

// The export dialog: tab changes the format and the file's extension;
// an existing file is replaced only after y; the status says where.
func TestExportDialog(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, nil, Settings{Dir: dir, Version: "test"})
	start(t, m, 80, 24)
	press(t, m, tea_ctrlX(), keyDown) // csv → md
	if m.dialog == nil || m.dialog.Format() != "md" || !strings.HasSuffix(m.dialog.Path(), ".md") {
		t.Fatalf("format change: %+v", m.dialog.Path())
	}
	press(t, m, keyEnter)
	path := filepath.Join(dir, "orchard-co-operative-frost-night-forecasts.md")
	b, err := os.ReadFile(path)
	if err != nil || !strings.Contains(string(b), "| ") {
		t.Fatalf("markdown export: %v\n%s", err, b)
	}
	if !strings.Contains(m.Status(), path) {
		t.Fatalf("status %q does not say where", m.Status())
	}
	press(t, m, tea_ctrlX(), keyEnter) // the dialog keeps md, the format chosen last
	if m.dialog == nil || !m.dialog.confirm {
		t.Fatal("no question before replacing an export")
	}
	press(t, m, runes("y"))
	if m.dialog != nil {
		t.Fatalf("dialog still open: %s", m.dialog.msg)
	}
}

// The workbench writes the same record as the table command: an ordered
// design's outcomes say so, and the formula says what it is.
func TestExportRecordOrdered(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, DemoHarvest(), Settings{Dir: dir, Version: "test"})
	start(t, m, 80, 24)
	press(t, m, tea_ctrlX(), keyDown, keyEnter) // csv → md, export
	b, err := os.ReadFile(filepath.Join(dir, "orchard-co-operative-harvest-outlook.md"))
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"below, near, above (ordered)", "the generator H(p), concave"} {
		if !strings.Contains(string(b), want) {
			t.Errorf("record lacks %q:\n%s", want, b)
		}
	}
}

// A point design exports its own table in every format, with the
// re-check in the budget pane; a table that fails the re-check is refused
// as a table over outcomes is.
func TestPointExport(t *testing.T) {
	dir := t.TempDir()
	d := &design.Design{Version: 1, Title: "milk yield", Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 40},
		Budget: design.Budget{Floor: 0, Cap: 20, Step: 10}}
	ex := defaultExporter("test")
	if got := ex.Formats(d); strings.Join(got, ",") != strings.Join(annex.ExportFormats(), ",") {
		t.Fatalf("formats %v", got)
	}
	for _, f := range ex.Formats(d) {
		path := filepath.Join(dir, "milk."+f)
		files, err := ex.Export(t.Context(), d, ExportRequest{Format: f, Path: path})
		if err != nil || len(files) != 1 {
			t.Fatalf("%s export: %v %v", f, files, err)
		}
		b, _ := os.ReadFile(path)
		if len(b) == 0 {
			t.Fatalf("%s export is empty", f)
		}
		if f == "csv" {
			// Five reports 0, 10, ..., 40; a perfect forecast is paid the cap.
			if !strings.Contains(string(b), "20") || strings.Count(string(b), "\n") < 5 || !strings.Contains(strings.ToLower(string(b)), "counsel") {
				t.Fatalf("csv:\n%s", b)
			}
		}
	}
	if _, err := ex.Export(t.Context(), d, ExportRequest{Format: "csv", Path: filepath.Join(dir, "milk.csv")}); !errors.Is(err, safefile.ErrExists) {
		t.Fatalf("an existing file was replaced without being asked: %v", err)
	}

	// Squared error on [0, 10], cap 100: pay = 100 - (y - x)^2, rounded
	// to 25; a forecaster sure of y = 5 gets 100 from x = 5 and from
	// x = 4 (99 rounds to 100), a tie (derived by hand; the same case as
	// the table command's test), so the re-check fails.
	bad := &design.Design{Version: 1, Title: "milk yield", Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 10},
		Budget: design.Budget{Floor: 0, Cap: 100, Step: 1, Unit: 25}}
	path := filepath.Join(dir, "refused.csv")
	if _, err := ex.Export(t.Context(), bad, ExportRequest{Format: "csv", Path: path}); err == nil || !strings.Contains(err.Error(), "re-check failed") {
		t.Fatalf("a failing point table was exported: %v", err)
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Fatalf("a refused table was written: %v", err)
	}
	m := testModel(t, bad, Settings{})
	start(t, m, 120, 40)
	if v := m.View(); !strings.Contains(v, "menu re-check FAILED") || strings.Contains(v, "no menu re-check") {
		t.Fatalf("budget pane does not show the failed re-check:\n%s", v)
	}
	good := testModel(t, d, Settings{})
	start(t, good, 120, 40)
	if v := good.View(); !strings.Contains(v, "menu re-check passed, margin") {
		t.Fatalf("budget pane does not show the passed re-check:\n%s", v)
	}
}

// Payout audit: the sample payout 10 - 5 sum (p - hit)^2 is the quadratic
// rule scaled by 5 and shifted by 10 (its effort is the Brier sum, Brier
// 1950), so the audit passes and names it; the linear rule p[y] is
// improper (common practice).
func TestPayoutAudit(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	press(t, m, keyDown, keyDown, keyRight)
	r := m.CheckReport()
	if r == nil || r.Verdict == "improper" {
		t.Fatalf("sample payout: %+v", r)
	}
	if !strings.Contains(strings.Join(r.Notes, "\n"), "quadratic") {
		t.Errorf("not identified as the quadratic rule: %q", r.Notes)
	}
	press(t, m, keyDown, keyEnter)
	for i := 0; i < 80; i++ {
		press(t, m, keyBack)
	}
	press(t, m, runes("p[y]"), keyEsc)
	r = m.CheckReport()
	if r == nil || r.Verdict != "improper" {
		t.Fatalf("linear payout verdict: %+v", r)
	}
	if !strings.Contains(m.View(), "✗ properness") {
		t.Errorf("the failing check is not shown:\n%s", m.View())
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

// The linear rule over three outcomes, as the workbench shows it. Derived
// by hand: under belief q the best report is the vertex of the likeliest
// outcome, so the gap is max_k q_k - sum_k q_k^2; at q = (2/3, 1/6, 1/6)
// that is 2/3 - 1/2 = 1/6.
func TestGoldenLinearAudit80x24(t *testing.T) {
	d := DemoHarvest()
	d.Mode, d.Formula, d.Preset = design.ModePayout, "p[y]", ""
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	s := m.comp.newSampler()
	if got := gapOnGrid(s, gridScores(s, 3, 6), []float64{2.0 / 3, 1.0 / 6, 1.0 / 6}); math.Abs(got-1.0/6) > 1e-12 {
		t.Errorf("gap %v, want 1/6", got)
	}
	if r := m.CheckReport(); r == nil || r.Verdict != "improper" {
		t.Fatalf("verdict: %+v", r)
	}
	golden.RequireEqual(t, []byte(m.View()))
}

// The export dialog's lottery option writes chances of one prize, as
// `scorewright table --lottery` does, and says the gambling caution in
// the dialog and in the file. Frost demo: floor 0, cap 40, so a cell's
// chance is pay/40 (contract/lottery) and the prize is 40.
func TestLotteryExport(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, nil, Settings{Dir: dir, Version: "test"})
	start(t, m, 80, 24)
	press(t, m, tea_ctrlX(), tea.KeyMsg{Type: tea.KeyCtrlT})
	if m.dialog == nil || !m.dialog.lottery {
		t.Fatal("ctrl+t did not choose the lottery")
	}
	if v := m.View(); !strings.Contains(v, "[lottery]") || !strings.Contains(v, "gambling") {
		t.Fatalf("the dialog does not show the lottery and its caution:\n%s", v)
	}
	golden.RequireEqual(t, []byte(m.View()))
	press(t, m, keyEnter)
	b, err := os.ReadFile(filepath.Join(dir, "orchard-co-operative-frost-night-forecasts.csv"))
	if err != nil {
		t.Fatalf("no export: %v (status %q)", err, m.Status())
	}
	text := string(b)
	if !strings.Contains(text, lottery.Caution) || !strings.Contains(strings.ToLower(text), "counsel") {
		t.Errorf("the file lacks the lottery or the general caution:\n%s", text)
	}
	// The report (0.5, 0.5) pays 30 in money when either outcome happens
	// (40 - 20·0.5, quadratic effort 0.5): a chance of 30/40 = 0.75, written
	// in whole thousandths.
	if !strings.Contains(text, "\n0.5,0.5,0.750,0.750\n") || !strings.Contains(text, "chance if frost") {
		t.Errorf("no chance 0.75 for the even report:\n%s", text)
	}
	// A point table too: squared error on [0, 40], floor 0, cap 20.
	pd := &design.Design{Version: 1, Title: "milk yield", Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 40},
		Budget: design.Budget{Floor: 0, Cap: 20, Step: 10}}
	pp := filepath.Join(dir, "milk-lottery.md")
	if _, err := defaultExporter("test").Export(t.Context(), pd, ExportRequest{Format: "md", Path: pp, Lottery: true}); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(pp); !strings.Contains(string(b), lottery.Caution) || !strings.Contains(string(b), "chance") {
		t.Errorf("point lottery export:\n%s", b)
	}
	// The next export dialog keeps the lottery chosen last; ctrl+t goes
	// back to money.
	press(t, m, tea_ctrlX())
	if !m.dialog.lottery {
		t.Fatal("the export dialog forgot the lottery")
	}
	press(t, m, tea.KeyMsg{Type: tea.KeyCtrlT})
	if m.dialog.lottery {
		t.Fatal("ctrl+t did not go back to money")
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
// the record's verdict kind is "certified" with the statement beside it,
// as `scorewright table --certify` writes it. The pseudospherical rule is
// strictly proper too (Gneiting and Raftery 2007, JASA, section 3), but its
// curvature vanishes on the faces, so in a short deadline the certificate
// leaves it undecided and the record stays grid evidence.
func TestExportRecordsTheCertificate(t *testing.T) {
	for _, tc := range []struct {
		preset, kind string
	}{{"", "certified"}, {"pseudospherical", "grid evidence"}} {
		dir := t.TempDir()
		d := DemoFrost()
		if tc.preset != "" {
			d.Preset, d.Formula, d.Params = tc.preset, "", nil
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
		if tc.kind == "certified" && !strings.Contains(string(b), "certified strictly proper") {
			t.Errorf("record lacks the certificate's statement:\n%s", b)
		}
	}
}
