package tui

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/golden"

	"scorewright/contract/annex"
	"scorewright/contract/lottery"
	"scorewright/generator/design"
	"scorewright/internal/safefile"
)

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

// A design opened from a folder other than the working one exports beside
// its file by default, whatever the export format.
func TestExportDefaultsBesideTheDesign(t *testing.T) {
	dir := t.TempDir()
	file := filepath.Join(dir, "sells-out.toml")
	m := New(DemoFrost(), file, Settings{Dir: t.TempDir(), Debounce: time.Millisecond, RecoveryDir: t.TempDir()}, testStyles(t))
	t.Cleanup(m.Close)
	start(t, m, 80, 24)
	press(t, m, tea.KeyMsg{Type: tea.KeyCtrlE})
	if m.dialog == nil {
		t.Fatal("no export dialog")
	}
	if got := m.dialog.Path(); filepath.Dir(got) != dir || !strings.HasPrefix(filepath.Base(got), "sells-out.") {
		t.Errorf("export path %q, want sells-out.* in %s", got, dir)
	}
}
