package tui

import (
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/exp/teatest"
)

// A value input opened on a value: the first printable key replaces it,
// backspace clears it, and a cursor key keeps it to edit.
func TestValueInputReplacesThenEdits(t *testing.T) {
	cases := []struct {
		name string
		keys []tea.KeyMsg
		want string
	}{
		{"typed", []tea.KeyMsg{runes("0"), runes("."), runes("0"), runes("2")}, "0.02"},
		{"pasted", []tea.KeyMsg{{Type: tea.KeyRunes, Runes: []rune("0.02"), Paste: true}}, "0.02"},
		{"backspace clears", []tea.KeyMsg{keyBack, runes("7")}, "7"},
		{"cursor keeps", []tea.KeyMsg{keyEnd, runes("5")}, "0.015"},
		{"left then type", []tea.KeyMsg{keyLeft, runes("9")}, "0.091"},
		{"typed then backspace", []tea.KeyMsg{runes("3"), runes("4"), keyBack}, "3"},
	}
	for _, c := range cases {
		v := newValueInput(testStyles(t).Selected)
		v.Start("0.01")
		if !v.Whole() {
			t.Fatalf("%s: a started input does not stand whole", c.name)
		}
		for _, k := range c.keys {
			v, _ = v.Update(k)
		}
		if got := v.Value(); got != c.want {
			t.Errorf("%s: %q, want %q", c.name, got, c.want)
		}
	}
}

// In a running workbench: the report floor holds 0.01; enter, then 0.02
// typed and enter, sets 0.02 (it used to give 0.010.02 and be refused).
// Then the cap gets a digit added after a cursor key: 40 → 400.
func TestBudgetTypingReplacesFlow(t *testing.T) {
	d := DemoFrost()
	d.Budget.ReportFloor = 0.01
	m := testModel(t, d, Settings{})
	tm, o := budgetProgram(t, m)
	o.wait("menu re-check")
	downs := func(n int) {
		for range n {
			tm.Send(keyDown)
		}
	}
	downs(6) // Floor, Cap, Mean, Ref., Step, Menu, R.floor
	o.press("typing replaces", keyEnter)
	o.act()
	for _, r := range "0.02" {
		tm.Send(runes(string(r)))
	}
	tm.Send(keyEnter)
	o.wait("0.02")
	for range 6 {
		tm.Send(keyUp)
	}
	tm.Send(keyDown) // Cap
	o.press("typing replaces", keyEnter)
	o.act()
	tm.Send(keyEnd)
	tm.Send(runes("0"))
	tm.Send(keyEnter)
	o.wait("400")
	tm.Send(keyCtrlC)
	tm.Send(keyCtrlC)
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(10*time.Second)).(*Model)
	if b := fm.Design().Budget; b.ReportFloor != 0.02 || b.Cap != 400 {
		t.Errorf("report floor %v, cap %v; want 0.02 and 400", b.ReportFloor, b.Cap)
	}
}

// Entering the value a field already has is no edit: the design stays
// saved (before, enter on Forecasts and enter again marked it unsaved).
func TestSameValueIsNoEdit(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	m.savedGen = m.gen
	typeBudget(t, m, "Cap", "40")
	selectBudgetField(t, m, "Forecasts")
	press(t, m, keyEnter, keyEnter)
	if m.Unsaved() {
		t.Error("the budget's own values entered again marked the design unsaved")
	}
	m.setFocus(paneDesign)
	press(t, m, keyEnter, keyEnter) // the outcomes as they are
	if m.Unsaved() {
		t.Error("the outcomes entered again marked the design unsaved")
	}
	press(t, m, tea.KeyMsg{Type: tea.KeyF2}, keyEnter, keyEnter)
	if m.Unsaved() {
		t.Error("the title entered again marked the design unsaved")
	}
	press(t, m, keyEsc)
	typeBudget(t, m, "Cap", "41")
	if !m.Unsaved() {
		t.Error("a new cap did not mark the design unsaved")
	}
}

// With a menu file the step reads "menu file" and the report floor,
// which only shapes the step's grid, says it is not used.
func TestMenuFileFieldsSayWhy(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	m.d.Budget.Step, m.d.Budget.Menu = 0, "menu.csv"
	selectBudgetField(t, m, "Menu")
	v := m.budget.View(m.d)
	if !strings.Contains(v, "menu file") || !strings.Contains(v, "not used with a menu file") {
		t.Errorf("with a menu file:\n%s", v)
	}
}
