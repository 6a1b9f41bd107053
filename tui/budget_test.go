package tui

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/charmbracelet/x/exp/teatest"

	"scorewright/generator/design"
	"scorewright/internal/num"
	"scorewright/internal/pool"
)

// selectBudgetField focuses the budget pane and selects the field
// labelled label, failing when there is none.
func selectBudgetField(t *testing.T, m *Model, label string) {
	t.Helper()
	m.setFocus(paneBudget)
	m.layout()
	for i, f := range fieldsFor(m.d) {
		if f.label == label {
			m.budget.sel = i
			return
		}
	}
	t.Fatalf("no budget field %q", label)
}

// typeBudget types text into the field labelled label key by key, as a
// user does (the value shown is replaced by the first key), and presses
// enter.
func typeBudget(t *testing.T, m *Model, label, text string) {
	t.Helper()
	selectBudgetField(t, m, label)
	press(t, m, keyEnter)
	if !m.budget.Typing() {
		t.Fatalf("%s: enter did not open the input (note %q)", label, m.budget.note)
	}
	for _, r := range text {
		press(t, m, runes(string(r)))
	}
	press(t, m, keyEnter)
}

// Every field of the budget pane is editable in the pane and lands in the
// design it names.
func TestBudgetFieldsEditable(t *testing.T) {
	menu := filepath.Join(t.TempDir(), "menu.csv")
	if err := os.WriteFile(menu, []byte("0.1,0.9\n0.3,0.7\n0.5,0.5\n0.7,0.3\n0.9,0.1\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		label, text string
		ok          func(d *design.Design) bool
	}{
		{"Floor", "2", func(d *design.Design) bool { return d.Budget.Floor == 2 }},
		{"Cap", "55", func(d *design.Design) bool { return d.Budget.Cap == 55 }},
		{"Mean", "31", func(d *design.Design) bool { return d.Budget.MeanPay != nil && *d.Budget.MeanPay == 31 }},
		{"Step", "0.1", func(d *design.Design) bool { return d.Budget.Step == 0.1 }},
		{"Menu", menu, func(d *design.Design) bool { return d.Budget.Menu == menu && d.Budget.Step == 0 }},
		{"R.floor", "0.01", func(d *design.Design) bool { return d.Budget.ReportFloor == 0.01 }},
		{"Clamp", "0.02", func(d *design.Design) bool { return d.Budget.Clamp == 0.02 }},
		{"Unit", "1", func(d *design.Design) bool { return d.Budget.Unit == 1 }},
		{"Rounding", "down", func(d *design.Design) bool { return d.Budget.Rounding == "down" }},
		{"Weights", "1, 2", func(d *design.Design) bool { return len(d.Weights) == 2 && d.Weights[1] == 2 }},
		{"Currency", "credits", func(d *design.Design) bool { return d.Contract.Currency == "credits" }},
		{"Forecasts", "90", func(d *design.Design) bool { return d.Contract.Forecasts == 90 }},
	}
	if len(cases)+1 != len(budgetFields()) { // Ref. is tested below, with a mean pay
		t.Fatalf("%d cases for %d fields", len(cases), len(budgetFields()))
	}
	for _, c := range cases {
		d := DemoFrost()
		if c.label == "Weights" {
			d.Preset, d.Formula = "", "1 - sum(w*p^2)" // weights need a formula that reads w
		}
		m := testModel(t, d, Settings{})
		start(t, m, 80, 24)
		gen := m.Generation()
		typeBudget(t, m, c.label, c.text)
		if d := m.Design(); !c.ok(d) || m.Generation() == gen {
			t.Errorf("%s = %q: not in the design (note %q, budget %+v)", c.label, c.text, m.budget.note, d.Budget)
		}
		if m.budget.err != nil || m.budget.table == nil {
			t.Errorf("%s = %q: no table: %v", c.label, c.text, m.budget.err)
		}
	}
	// The reference belief needs a mean pay; then it is taken.
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	selectBudgetField(t, m, "Ref.")
	press(t, m, keyEnter)
	if m.budget.Typing() || !strings.Contains(m.budget.note, "mean pay") {
		t.Errorf("reference without a mean pay: typing %v, note %q", m.budget.Typing(), m.budget.note)
	}
	typeBudget(t, m, "Mean", "30")
	typeBudget(t, m, "Ref.", "0.2, 0.8")
	if d := m.Design(); len(d.Budget.Reference) != 2 || d.Budget.Reference[0] != 0.2 {
		t.Errorf("reference %v", d.Budget.Reference)
	}
}

// The menu file's table is what pay = A - B·L gives on the file's reports.
// Frost demo, quadratic rule: L(p, k) = 2(1 - p_k)^2 for two outcomes; on
// the menu 0.1 … 0.9 the efforts run from 0.02 to 1.62, so floor 0 and cap
// 40 give B = 25, A = 40.5 (derived by hand); row (0.3, 0.7) pays
// 40.5 - 25·0.98 = 16 if frost and 40.5 - 25·0.18 = 36 if clear.
func TestBudgetMenuFileTable(t *testing.T) {
	menu := filepath.Join(t.TempDir(), "menu.csv")
	if err := os.WriteFile(menu, []byte("0.1,0.9\n0.3,0.7\n0.5,0.5\n0.7,0.3\n0.9,0.1\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	typeBudget(t, m, "Menu", menu)
	tv := m.budget.table
	if tv == nil || len(tv.Rows) != 5 {
		t.Fatalf("table %+v, err %v", tv, m.budget.err)
	}
	if got := strings.Join(tv.Rows[1], " "); got != "(0.3, 0.7) 16.0 36.0" {
		t.Errorf("row 2: %q", got)
	}
	// A step typed again replaces the file.
	typeBudget(t, m, "Step", "0.25")
	if d := m.Design(); d.Budget.Menu != "" || len(m.budget.table.Rows) != 5 {
		t.Errorf("menu %q, %d rows", d.Budget.Menu, len(m.budget.table.Rows))
	}
}

// Bad values are refused with a message naming the field, and the design
// keeps its value; fields that do not apply say so.
func TestBudgetFieldsRefuse(t *testing.T) {
	cases := []struct{ label, text, want string }{
		{"Clamp", "0.6", "budget.clamp"},
		{"Rounding", "sideways", "budget.rounding"},
		{"Weights", "1, -1", "weights"},
		{"Weights", "1, 2", "does not use the outcome weights"},
		{"Ref.", "0.5, 0.4", "set a mean pay first"},
		{"Forecasts", "many", "forecasts"},
		{"Currency", strings.Repeat("x", 40), "contract.currency"},
		{"Floor", "NaN", "not a finite number"},
	}
	for _, c := range cases {
		m := testModel(t, nil, Settings{})
		start(t, m, 80, 24)
		before := m.Design()
		selectBudgetField(t, m, c.label)
		press(t, m, keyEnter)
		if m.budget.Typing() {
			m.budget.ti.SetValue(c.text)
			press(t, m, keyEnter)
		}
		if !strings.Contains(m.budget.note, c.want) {
			t.Errorf("%s = %q: note %q, want %q", c.label, c.text, m.budget.note, c.want)
		}
		if after := m.Design(); after.Budget.Clamp != before.Budget.Clamp || after.Budget.Rounding != before.Budget.Rounding ||
			after.Weights != nil || after.Contract.Forecasts != 0 || after.Budget.Floor != 0 {
			t.Errorf("%s = %q changed the design: %+v", c.label, c.text, after.Budget)
		}
	}
	// A point design's table has no clamp.
	pd := &design.Design{Version: 1, Title: "milk yield", Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 40},
		Budget: design.Budget{Floor: 0, Cap: 20, Step: 10}}
	pm := testModel(t, pd, Settings{})
	start(t, pm, 80, 24)
	for _, f := range fieldsFor(pm.d) {
		if f.label == "Clamp" || f.label == "Mean" || f.label == "Menu" {
			t.Errorf("a point design lists %s", f.label)
		}
	}
	pm.setFocus(paneBudget)
	pm.layout()
	if v := pm.View(); strings.Contains(v, "Clamp") || !strings.Contains(v, "Step") {
		t.Errorf("point budget pane:\n%s", v)
	}
}

// ←/→ step the listed fields: the rounding mode cycles, forecasts go by 10.
func TestBudgetFieldsStep(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	selectBudgetField(t, m, "Rounding")
	press(t, m, keyRight)
	if r := m.Design().Budget.Rounding; r != "down" {
		t.Errorf("nearest → %q, want down", r)
	}
	press(t, m, keyLeft, keyLeft)
	if r := m.Design().Budget.Rounding; r != "up" {
		t.Errorf("down ←← %q, want up", r)
	}
	selectBudgetField(t, m, "Forecasts")
	press(t, m, keyRight, keyRight)
	if n := m.Design().Contract.Forecasts; n != 20 {
		t.Errorf("forecasts %d, want 20", n)
	}
	selectBudgetField(t, m, "Clamp")
	press(t, m, keyRight)
	if c := m.Design().Budget.Clamp; c != 0.001 {
		t.Errorf("clamp %v, want 0.001", c)
	}
}

// blockingFitter reports progress, then waits for its context to end (an
// edit) or for release; it counts the runs that were cancelled.
type blockingFitter struct {
	release   chan struct{}
	started   atomic.Int64
	cancelled atomic.Int64
}

func (b *blockingFitter) fit(ctx context.Context, d *design.Design, progress pool.Progress) (*TableView, error) {
	b.started.Add(1)
	progress(pool.Step{Done: 3, Total: 6, Unit: pool.UnitWork})
	select {
	case <-ctx.Done():
		b.cancelled.Add(1)
		return nil, ctx.Err()
	case <-b.release:
	}
	return &TableView{Header: []string{"report", "a"}, Rows: [][]string{{"(0, 1)", "1.0"}}, Passed: true, MinMargin: 1}, nil
}

// The fit runs in the background with progress, and an edit cancels it.
func TestBudgetFitProgressAndCancel(t *testing.T) {
	bf := &blockingFitter{release: make(chan struct{})}
	tm, o := budgetProgram(t, testModel(t, nil, Settings{Fitter: bf.fit, Checker: (&fakeChecker{points: 10}).check}))
	o.wait("50% fitting")
	o.act()
	tm.Send(keyRight) // the floor goes up: the running fit is for an old design
	waitFor(t, func() bool { return bf.cancelled.Load() >= 1 && bf.started.Load() >= 2 })
	close(bf.release)
	o.wait("menu re-check passed")
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlC}) // asks: the floor is unsaved
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlC}) // out; the recovery file keeps it
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	if fm.Design().Budget.Floor != 1 {
		t.Errorf("floor %v", fm.Design().Budget.Floor)
	}
}

// budgetProgram runs m as a real program at 80×24 with the budget pane
// focused (design → picture → checks → budget).
func budgetProgram(t *testing.T, m *Model) (*teatest.TestModel, *outputWatch) {
	tm := teatest.NewTestModel(t, m, teatest.WithInitialTermSize(80, 24))
	for _, k := range []tea.KeyMsg{keyTab, keyTab, keyTab} {
		tm.Send(k)
	}
	return tm, &outputWatch{t: t, tm: tm}
}

// waitFor polls cond until it holds (20 s at most): a condition, not a
// timing.
func waitFor(t *testing.T, cond func() bool) {
	t.Helper()
	for end := time.Now().Add(20 * time.Second); !cond(); {
		if time.Now().After(end) {
			t.Fatal("condition never held")
		}
		time.Sleep(5 * time.Millisecond)
	}
}

// The budget pane with its new fields, at both sizes: a value typed
// into one field, another selected.
func TestGoldenBudget80x24(t *testing.T) { goldenBudget(t, 80, 24, "Currency", "credits", "Clamp") }

func TestGoldenBudget120x40(t *testing.T) { goldenBudget(t, 120, 40, "Mean", "30", "Ref.") }

func goldenBudget(t *testing.T, w, h int, typed, text, sel string) {
	m := testModel(t, nil, Settings{})
	start(t, m, w, h)
	typeBudget(t, m, typed, text)
	selectBudgetField(t, m, sel)
	golden.RequireEqual(t, []byte(m.View()))
}

// An unbounded rule's table asks for a report floor or a clamp by the
// pane's own field names, and either one set in the pane gives a table.
func TestBudgetUnboundedWaysOut(t *testing.T) {
	for _, field := range []string{"R.floor", "Clamp"} {
		d := DemoFrost()
		d.Preset, d.Formula = "", "-sum(p*ln(p))" // the logarithmic rule: effort -ln p_k, infinite at p_k = 0
		m := testModel(t, d, Settings{})
		start(t, m, 80, 24)
		if m.budget.err == nil || !strings.Contains(m.budget.err.Error(), "R.floor") || !strings.Contains(m.budget.err.Error(), "Clamp") {
			t.Fatalf("error %v", m.budget.err)
		}
		typeBudget(t, m, field, "0.01")
		if m.budget.err != nil || m.budget.table == nil {
			t.Errorf("%s 0.01: err %v, table %+v", field, m.budget.err, m.budget.table)
		}
	}
}

// bruteRowMargins recomputes each row's margin from the table as shown,
// by brute force over its rows: for the belief that is row i's report,
// the expected pay of row i less the best expected pay of any other row.
// It reads only the printed cells, so it checks the re-check's margins
// and marks from outside.
func bruteRowMargins(t *testing.T, tv *TableView) []float64 {
	t.Helper()
	var reports, pays [][]float64
	for _, r := range tv.Rows {
		p, err := num.ParseVector(strings.Trim(r[0], "()"))
		if err != nil {
			t.Fatal(err)
		}
		v, err := num.ParseVector(strings.Join(r[1:], ","))
		if err != nil {
			t.Fatal(err)
		}
		reports, pays = append(reports, p), append(pays, v)
	}
	exp := func(q, row []float64) float64 {
		s := 0.0
		for k := range q {
			s += q[k] * row[k]
		}
		return s
	}
	out := make([]float64, len(reports))
	for i, q := range reports {
		best := math.Inf(-1)
		for j := range reports {
			if j != i {
				best = math.Max(best, exp(q, pays[j]))
			}
		}
		out[i] = exp(q, pays[i]) - best
	}
	return out
}

// Rows the rounded table fails are marked TIE or BEATEN, and every row
// shows its margin; both agree with the brute force over the printed
// table (frost demo rounded to whole tens: most rows collapse).
func TestBudgetMarksAgainstBruteForce(t *testing.T) {
	for _, unit := range []string{"10", "5", "0.1"} {
		m := testModel(t, nil, Settings{})
		start(t, m, 80, 24)
		typeBudget(t, m, "Unit", unit)
		tv := m.budget.table
		if tv == nil || len(tv.Marks) != len(tv.Rows) || len(tv.Margins) != len(tv.Rows) {
			t.Fatalf("unit %s: table %+v", unit, tv)
		}
		marked := 0
		for i, mg := range bruteRowMargins(t, tv) {
			want := ""
			switch {
			case math.Abs(mg) < 1e-9:
				want = markTie
			case mg < 0:
				want = markBeaten
			}
			if tv.Marks[i] != want {
				t.Errorf("unit %s row %v: mark %q, brute-force margin %g", unit, tv.Rows[i], tv.Marks[i], mg)
			}
			if got, _ := strconv.ParseFloat(tv.Margins[i], 64); math.Abs(got-mg) > 1e-3*math.Max(1, math.Abs(mg)) {
				t.Errorf("unit %s row %v: margin %s, brute force %g", unit, tv.Rows[i], tv.Margins[i], mg)
			}
			if want != "" {
				marked++
			}
		}
		if (marked > 0) == tv.Passed {
			t.Errorf("unit %s: %d marked rows, passed %v", unit, marked, tv.Passed)
		}
		if v := m.View(); marked > 0 && !strings.Contains(v, "mark") {
			t.Errorf("unit %s: the mark column is not shown:\n%s", unit, v)
		}
	}
}

// A menu file named relative in a design is beside the design file, not
// in the working directory: a design opened from its folder fits on its
// menu (the tests run in tui/, where there is no menu.csv), a name typed
// into the Menu field means the same, and saving into another folder
// writes the path so it still names that file.
func TestBudgetMenuRelativeToTheDesign(t *testing.T) {
	root := t.TempDir()
	home, elsewhere := filepath.Join(root, "bakery"), filepath.Join(root, "archive", "2027")
	for _, dir := range []string{home, elsewhere} {
		if err := os.MkdirAll(dir, 0o700); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(filepath.Join(home, "menu.csv"), []byte("0.1\n0.3\n0.5\n0.7\n0.9\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(home, "short.csv"), []byte("0.2\n0.5\n0.8\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	d := DemoFrost()
	d.Budget.Step, d.Budget.Menu, d.Dir = 0, "menu.csv", home
	file := filepath.Join(home, "sells-out.toml")
	if err := d.Save(file, false); err != nil {
		t.Fatal(err)
	}
	opened, err := design.Load(file)
	if err != nil {
		t.Fatal(err)
	}
	m := testModel(t, opened, Settings{Dir: root})
	start(t, m, 80, 24)
	if tv := m.budget.table; tv == nil || len(tv.Rows) != 5 {
		t.Fatalf("the design's own menu.csv was not read: table %+v, err %v", tv, m.budget.err)
	}
	typeBudget(t, m, "Menu", "short.csv")
	if tv := m.budget.table; tv == nil || len(tv.Rows) != 3 || m.Design().Budget.Menu != "short.csv" {
		t.Fatalf("a typed relative menu was not read beside the design: table %+v, err %v", tv, m.budget.err)
	}
	press(t, m, keyCtrlS)
	if m.dialog == nil {
		t.Fatal("ctrl+s opened no dialog")
	}
	moved := filepath.Join(elsewhere, "sells-out.toml")
	m.dialog.path.SetValue(moved)
	press(t, m, keyEnter)
	text, err := os.ReadFile(moved)
	if err != nil {
		t.Fatalf("not saved: %v (status %q)", err, m.status)
	}
	if !strings.Contains(string(text), `menu = "../../bakery/short.csv"`) {
		t.Errorf("the menu path does not name the same file from the new folder:\n%s", text)
	}
	if got := m.Design().MenuPath(); got != filepath.Join(home, "short.csv") {
		t.Errorf("after the save the workbench reads the menu from %q", got)
	}
	if m.Unsaved() {
		t.Error("rewriting the menu path for the new folder left the design unsaved")
	}
}

// The workbench states what the contract costs, as the command and the
// annex do, with the currency on every amount: the water utility's design
// (testdata/designs/water.toml) costs 52286.25 EUR over 365 forecasts
// from a forecaster who only reports the base rate 0.1 (row 0.1 pays 89.25
// or 149.25; 0.1·89.25 + 0.9·149.25 = 143.25 a day, derived by hand),
// 54750.00 EUR from a perfect one and at worst.
func TestBudgetStatesTheCost(t *testing.T) {
	d, err := design.Load(filepath.Join("..", "testdata", "designs", "water.toml"))
	if err != nil {
		t.Fatal(err)
	}
	m := testModel(t, d, Settings{})
	start(t, m, 120, 40)
	tv := m.budget.table
	if tv == nil {
		t.Fatal("no table in the budget pane")
	}
	notes := strings.Join(tv.Notes, "\n")
	for _, want := range []string{"52286.25 EUR for a forecaster who only reports the base rate", "54750.00 EUR for a perfect forecaster", "54750.00 EUR at worst"} {
		if !strings.Contains(notes, want) {
			t.Errorf("the budget pane's notes lack %q:\n%s", want, notes)
		}
	}
}
