package tui

import (
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/charmbracelet/x/exp/teatest"

	"scorewright/contract/budget"
	"scorewright/generator/design"
	"scorewright/internal/num"
)

// f searches off the UI goroutine; 1 takes the proposal, and the table
// then passes. The flow runs a real program, waiting only on lines that
// change.
func TestProposeFlow(t *testing.T) {
	d := DemoFrost()
	d.Budget.Unit = 10
	tm, o := budgetProgram(t, testModel(t, d, Settings{}))
	o.wait("menu re-check FAILED")
	o.act()
	tm.Send(runes("f"))
	o.wait("1 unit 0.1, the coarsest")
	o.act()
	tm.Send(runes("1"))
	o.wait("took the proposal")
	o.wait("menu re-check passed")
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlC})
	tm.Send(tea.KeyMsg{Type: tea.KeyCtrlC})
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	if u := fm.Design().Budget.Unit; u != 0.1 {
		t.Errorf("unit %v, want 0.1", u)
	}
}

// An edit while the search runs cancels it, and its late answer is
// dropped.
func TestProposeCancelledByEdit(t *testing.T) {
	d := DemoFrost()
	d.Budget.Unit = 10
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	selectBudgetField(t, m, "Unit")
	old := m.budgetKey(runes("f")) // the search, not yet run
	if !m.budget.prop.running {
		t.Fatal("f did not start a search")
	}
	press(t, m, keyLeft) // a finer unit: the design changed
	if m.budget.prop.shown() {
		t.Fatal("the edit left the search showing")
	}
	settle(t, m, old)
	if m.budget.prop.props != nil || m.budget.prop.running {
		t.Errorf("the stale search landed: %+v", m.budget.prop)
	}
}

// Marks and a proposal on screen, at both sizes.
func TestGoldenPropose80x24(t *testing.T) { goldenPropose(t, 80, 24) }

func TestGoldenPropose120x40(t *testing.T) { goldenPropose(t, 120, 40) }

func goldenPropose(t *testing.T, w, h int) {
	d := DemoFrost()
	d.Budget.Unit = 1
	d.Budget.Cap = 100
	m := testModel(t, d, Settings{})
	start(t, m, w, h)
	selectBudgetField(t, m, "Unit")
	settle(t, m, m.budgetKey(runes("f")))
	if n := len(m.budget.prop.props); n != 2 {
		t.Fatalf("%d proposals: %+v", n, m.budget.prop)
	}
	golden.RequireEqual(t, []byte(m.View()))
}

// Over three ordered outcomes (the harvest demo, ranked probability
// rule) the proposed unit passes by brute force over the printed table,
// and every coarser unit of the ladder fails by it.
func TestProposeHarvestBruteForce(t *testing.T) {
	d := DemoHarvest()
	d.Budget.Unit = 5
	checkCoarsestUnit(t, d, func(tv *TableView) bool {
		for _, mg := range bruteRowMargins(t, tv) {
			if mg <= 1e-9 {
				return false
			}
		}
		return true
	})
}

// checkCoarsestUnit asks the budget pane of design d for proposals and
// checks the first, a unit, with brute: the table passes at it, and at
// every coarser unit of the ladder up to half the range it fails.
func checkCoarsestUnit(t *testing.T, d *design.Design, brute func(tv *TableView) bool) {
	t.Helper()
	m := testModel(t, d, Settings{})
	start(t, m, 120, 40)
	selectBudgetField(t, m, "Unit")
	settle(t, m, m.budgetKey(runes("f")))
	props := m.budget.prop.props
	if len(props) == 0 || props[0].Field != "unit" {
		t.Fatalf("proposals %+v, err %v", props, m.budget.prop.err)
	}
	u := props[0].Budget.Unit
	passes := func(unit float64) bool {
		t.Helper()
		m.d.Budget.Unit = unit
		settle(t, m, m.edited())
		return brute(m.budget.table)
	}
	if !passes(u) {
		t.Errorf("proposed unit %g fails by brute force", u)
	}
	for _, c := range budget.ProposalUnits() {
		if c > u && c <= (d.Budget.Cap-d.Budget.Floor)/2 && passes(c) {
			t.Errorf("unit %g passes by brute force and is coarser than the proposed %g", c, u)
		}
	}
}

// pointPasses decides by brute force over a printed point-forecast table
// whether every report is the strict best for every belief whose mean it
// is, among point masses and mixtures of two outcome columns (the beliefs
// the table's re-check tries): reports down, outcome values across.
func pointPasses(t *testing.T, tv *TableView) bool {
	t.Helper()
	ys, err := num.ParseVector(strings.Join(tv.Header[1:], ","))
	if err != nil {
		t.Fatal(err)
	}
	var xs []float64
	var pays [][]float64
	for _, r := range tv.Rows {
		v, err := num.ParseVector(strings.Join(r, ","))
		if err != nil {
			t.Fatal(err)
		}
		xs, pays = append(xs, v[0]), append(pays, v[1:])
	}
	for i, x := range xs {
		for a := range ys {
			for b := a; b < len(ys); b++ {
				if ys[a] > x || ys[b] < x || (a == b && ys[a] != x) {
					continue
				}
				w := 1.0 // weight on column a, so the mean is x
				if b != a {
					w = (ys[b] - x) / (ys[b] - ys[a])
				}
				exp := func(row []float64) float64 { return w*row[a] + (1-w)*row[b] }
				for j := range xs {
					if j != i && exp(pays[j]) >= exp(pays[i])-1e-9 {
						return false
					}
				}
			}
		}
	}
	return true
}

// A point-forecast table gets proposals too: the proposed unit passes by
// brute force over the printed table and every coarser unit fails by it.
func TestProposePointBruteForce(t *testing.T) {
	d := &design.Design{Version: 1, Title: "milk yield", Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 40},
		Budget: design.Budget{Floor: 0, Cap: 20, Step: 4, Unit: 5}}
	checkCoarsestUnit(t, d, func(tv *TableView) bool {
		if tv == nil || tv.Passed != pointPasses(t, tv) {
			t.Fatalf("the re-check and the brute force disagree on %+v", tv)
		}
		return pointPasses(t, tv)
	})
}

// At 80×24 with two proposals showing, the table keeps its head and at
// least four rows, and each row's margin and mark are on screen (they
// come first; the pays scroll sideways with < and >).
func TestBudgetTableRoomAt80x24(t *testing.T) {
	d := DemoFrost()
	d.Budget.Unit = 1
	d.Budget.Cap = 100
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	selectBudgetField(t, m, "Unit")
	settle(t, m, m.budgetKey(runes("f")))
	if len(m.budget.prop.props) != 2 {
		t.Fatalf("proposals %+v", m.budget.prop)
	}
	view := m.View()
	rows, head := 0, false
	for _, l := range strings.Split(view, "\n") {
		head = head || strings.Contains(l, "mark  margin  report")
		if strings.Contains(l, "(0") && strings.Contains(l, ")") {
			rows++
		}
	}
	if !head || rows < 4 {
		t.Errorf("head shown %v, %d table rows at 80×24:\n%s", head, rows, view)
	}
	headLine := func() string {
		for _, l := range strings.Split(m.View(), "\n") {
			if strings.Contains(l, "pay if") {
				return l
			}
		}
		return ""
	}
	if strings.Contains(headLine(), "clear") {
		t.Fatalf("the table fits the pane; the sideways scroll is not tested:\n%s", m.View())
	}
	press(t, m, runes(">"))
	if !strings.Contains(headLine(), "clear") {
		t.Errorf("> did not scroll the table to its last column:\n%s", m.View())
	}
}

// A failing table whose cap search finds nothing gets the unit proposal
// and a line saying that no larger cap passes, and which caps were tried:
// the frost demo at unit 10 (floor 0, cap 40) is searched over caps 50 to 200
// in steps of 10 (five times the range, at whole units: derived by hand
// from CapGrain), as TestProposeAgainstBruteForce checks against brute
// force for the same rule.
func TestProposeSaysNoCapPasses(t *testing.T) {
	d := DemoFrost()
	d.Budget.Unit = 10
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	selectBudgetField(t, m, "Unit")
	settle(t, m, m.budgetKey(runes("f")))
	props := m.budget.prop.props
	if len(props) != 1 || props[0].Field != "unit" {
		t.Fatalf("proposals %+v, want the unit alone", props)
	}
	if nl := props[0].NoLarger; nl == nil || nl.From != 50 || nl.To != 200 || nl.Grain != 10 {
		t.Errorf("cap search %+v, want caps 50 to 200 in steps of 10", nl)
	}
	v := ansi.Strip(m.View())
	if !strings.Contains(v, "no larger cap passes at unit 10") || !strings.Contains(v, "five times the range") {
		t.Errorf("the pane does not say that no cap passes:\n%s", v)
	}
	golden.RequireEqual(t, []byte(m.View()))
}
