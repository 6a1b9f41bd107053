package tui

import (
	"fmt"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/charmbracelet/x/exp/teatest"
)

func samplePath(t testing.TB, name string) string {
	t.Helper()
	p, err := filepath.Abs(filepath.Join("..", "testdata", "histories", name))
	if err != nil {
		t.Fatal(err)
	}
	return p
}

var keyCtrlB = tea.KeyMsg{Type: tea.KeyCtrlD}

// loadHistory opens the history dialog, replaces its path with path and
// confirms.
func loadHistory(t testing.TB, m *Model, path string) {
	t.Helper()
	press(t, m, keyCtrlB)
	if m.dialog == nil || m.dialog.kind != dialogHistory {
		t.Fatal("ctrl+d with no history did not open the history dialog")
	}
	m.dialog.path.SetValue(path)
	press(t, m, keyEnter)
}

// The frost sample through the frost demo (the power rule with g = 2,
// i.e. quadratic; cap 40, step 0.05, unit 0.1). The totals are what
// `scorewright backtest --preset quadratic --outcomes frost,clear --cap 40
// --step 0.05 --unit 0.1 --history .../orchard-frost.csv` prints (run by
// hand): the workbench must pay a history as the command does. 176 good
// rows and the 4 bad lines are the ones the sample plants
// (contract/backtest/history/sample_test.go).
func TestBacktestFrost(t *testing.T) {
	for _, size := range [][2]int{{80, 24}, {120, 40}} {
		t.Run(fmt.Sprintf("%dx%d", size[0], size[1]), func(t *testing.T) {
			m := testModel(t, nil, Settings{})
			start(t, m, size[0], size[1])
			loadHistory(t, m, samplePath(t, "orchard-frost.csv"))
			if m.dialog != nil || !m.BacktestShown() {
				t.Fatalf("dialog %v, view shown %v; status %q", m.dialog, m.BacktestShown(), m.Status())
			}
			r := m.Backtest()
			if r == nil {
				t.Fatalf("no result; view:\n%s", m.View())
			}
			res := r.Result
			if res.Rows != 176 || res.SkippedCount != 4 || res.Skipped[0].Line != 24 {
				t.Fatalf("rows %d skipped %d %v", res.Rows, res.SkippedCount, res.Skipped)
			}
			want := map[string]string{"Alder": "2045.0", "Birch": "1978.7", "Cedar": "2025.5"}
			for _, f := range res.Forecasters {
				if got := r.cash(f.Money[0].Total); got != want[f.Name] {
					t.Errorf("%s paid %s, the command says %s", f.Name, got, want[f.Name])
				}
			}
			if got := r.cash(res.All[0].Total); got != "6049.2" {
				t.Errorf("all paid %s, the command says 6049.2", got)
			}
			// One quantity, the same digits in both front ends: the mean pay,
			// the decomposition and the CORP terms as the same command prints
			// them (run by hand; Alder's row).
			text := m.bt.resultText(200)
			for _, s := range []string{"34.66", "0.2669", "0.324", "0.0854", "0.03173", "0.02459", "0.08168"} {
				if !regexp.MustCompile(`(^|\s)` + regexp.QuoteMeta(s) + `(\s|$)`).MatchString(text) {
					t.Errorf("the backtest view lacks the cell %q, which the command prints:\n%s", s, text)
				}
			}
			v := m.View()
			for _, s := range []string{`observed frequency of "frost"`, "perfect reliability", "● Alder", "176 forecasts, 4 rows skipped", "(current design)", "forecaster"} {
				if !strings.Contains(v, s) {
					t.Errorf("view lacks %q:\n%s", s, v)
				}
			}
			assertFits(t, v, size[0], size[1])
			// Scrolling reaches the skipped rows.
			seen := false
			for range 40 {
				press(t, m, keyDown)
				if seen = strings.Contains(m.View(), "line 24: probabilities sum to 1.1"); seen {
					break
				}
			}
			if v := m.View(); !seen {
				t.Errorf("scrolled view lacks the first skipped row:\n%s", v)
			}
			// esc closes the view, ctrl+d opens it again without asking.
			press(t, m, keyEsc)
			if m.BacktestShown() || !strings.Contains(m.View(), "Picture") {
				t.Fatal("esc did not close the backtest view")
			}
			press(t, m, keyCtrlB)
			if !m.BacktestShown() || m.dialog != nil {
				t.Fatal("ctrl+d did not reopen the view")
			}
		})
	}
}

func assertFits(t *testing.T, v string, w, h int) {
	t.Helper()
	lines := strings.Split(v, "\n")
	if len(lines) != h {
		t.Errorf("view has %d lines, want %d", len(lines), h)
	}
	for i, l := range lines {
		if lw := len([]rune(l)); lw != w {
			t.Errorf("line %d is %d wide, want %d: %q", i, lw, w, l)
		}
	}
}

// Three outcomes: no picture, and the view says so; totals still show.
func TestBacktestHarvestHasNoPicture(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 80, 24)
	loadHistory(t, m, samplePath(t, "harvest-outlook.csv"))
	r := m.Backtest()
	if r == nil || r.Result.Rows != 70 || r.Result.SkippedCount != 2 {
		t.Fatalf("result %+v; view:\n%s", r, m.View())
	}
	v := m.View()
	if !strings.Contains(v, "no reliability picture") || strings.Contains(v, "perfect reliability") {
		t.Errorf("view:\n%s", v)
	}
	if !strings.Contains(v, "Alder") {
		t.Errorf("view lacks the forecasters:\n%s", v)
	}
}

// A history whose header does not fit the design stays in the dialog with
// the reason; nothing is loaded.
func TestBacktestHeaderMismatch(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 80, 24)
	loadHistory(t, m, samplePath(t, "orchard-frost.csv"))
	if m.dialog == nil || !strings.HasPrefix(m.dialog.msg, "✗ orchard-frost.csv") || m.history != "" || m.BacktestShown() {
		t.Fatalf("dialog %+v history %q shown %v", m.dialog, m.history, m.BacktestShown())
	}
	press(t, m, keyEsc)
	m.dialog = nil
	loadHistory(t, m, filepath.Join(t.TempDir(), "missing.csv"))
	if m.dialog == nil || !strings.Contains(m.dialog.msg, "no file") || !strings.Contains(m.dialog.msg, "missing.csv") {
		t.Fatalf("missing file: dialog %+v", m.dialog)
	}
}

// An edit reruns the backtest (after the debounce) under the new budget;
// answers of the run for the old design are dropped.
func TestBacktestFollowsTheDesign(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	loadHistory(t, m, samplePath(t, "orchard-frost.csv"))
	before := m.Backtest()
	if before == nil || !strings.Contains(before.Budget, "[0, 40]") {
		t.Fatalf("first result %+v", before)
	}
	oldRun := m.btJob.run
	press(t, m, keyEsc)
	m.setFocus(paneBudget)
	// Without settling, so that the edit's rerun has not happened yet.
	m.Update(keyDown)
	_, cmd := m.Update(keyRight) // cap 40 → 41
	if m.btJob.run == oldRun || m.BacktestRunning() {
		t.Fatal("the edit did not retire the old run")
	}
	if !strings.Contains(m.bt.statusLine(), "previous design") {
		t.Errorf("status %q", m.bt.statusLine())
	}
	// A late answer of the old run changes nothing.
	m.Update(btRunMsg{run: oldRun, msg: btDoneMsg{err: fmt.Errorf("late")}})
	if m.bt.err != nil {
		t.Fatal("a stale answer was taken")
	}
	settle(t, m, cmd)
	after := m.Backtest()
	if after == before || !strings.Contains(after.Budget, "[0, 41]") || m.btJob.gen != m.gen {
		t.Fatalf("after the edit: %+v (gen %d, run for %d)", after, m.gen, m.btJob.gen)
	}
	// A mean-pay budget: the view says what it aimed at.
	press(t, m, keyDown, keyRight) // Mean: none → 31 (three quarters of 0..41)
	r := m.Backtest()
	if r == nil || !strings.Contains(strings.Join(r.Notes, " "), "aims at 31.0 per forecast") {
		t.Fatalf("mean-pay backtest notes: %+v", r)
	}
}

// x stops a run; its late answers are dropped.
func TestBacktestStops(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, keyCtrlB)
	m.dialog.path.SetValue(samplePath(t, "orchard-frost.csv"))
	_, cmd := m.Update(keyEnter) // the run's command, not yet run
	m.dialog = nil
	m.showBT = true
	run := m.btJob.run
	press(t, m, runes("x"))
	if m.btJob.run == run || m.btJob.cancel != nil {
		t.Fatal("x did not stop the run")
	}
	settle(t, m, cmd)
	if m.Backtest() != nil || m.BacktestRunning() {
		t.Fatalf("a stopped run left a result or a running mark:\n%s", m.View())
	}
}

// A whole session through a real program: load the frost history, wait
// for the picture, close the view, quit.
func TestBacktestFlow(t *testing.T) {
	path := samplePath(t, "orchard-frost.csv")
	m := testModel(t, nil, Settings{})
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(80, 24))
	o := &outputWatch{t: t, tm: tm}
	wait := o.wait
	wait("Verdict strictly-proper")
	o.act()
	tm.Send(keyCtrlB)
	wait("Load a forecast history")
	for range 200 {
		tm.Send(keyBack)
	}
	tm.Type(path)
	o.act()
	tm.Send(keyEnter)
	wait("perfect reliability")
	wait("176 forecasts, 4 rows skipped")
	o.act()
	tm.Send(keyEsc)
	wait("Picture")
	tm.Send(runes("q"))
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	r := fm.Backtest()
	if r == nil || r.Path != path || r.Result.Rows != 176 || len(r.Result.Forecasters) != 3 {
		t.Fatalf("final backtest %+v", r)
	}
	if fm.BacktestShown() {
		t.Error("the view should be closed")
	}
}

// Golden backtest views: the frost picture at both sizes, and the harvest
// outlook's totals without a picture.
func TestGoldenBacktestFrost80x24(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	loadHistory(t, m, samplePath(t, "orchard-frost.csv"))
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenBacktestFrost120x40(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	loadHistory(t, m, samplePath(t, "orchard-frost.csv"))
	golden.RequireEqual(t, []byte(m.View()))
}

func TestGoldenBacktestHarvest120x40(t *testing.T) {
	m := testModel(t, DemoHarvest(), Settings{})
	start(t, m, 120, 40)
	loadHistory(t, m, samplePath(t, "harvest-outlook.csv"))
	golden.RequireEqual(t, []byte(m.View()))
}
