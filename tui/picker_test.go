package tui

import (
	"strings"
	"testing"

	"github.com/charmbracelet/x/exp/golden"

	"scorewright/generator/design"
	"scorewright/presets"
)

// openPickerAt opens the preset picker of m's design pane on preset name.
func openPickerAt(t *testing.T, m *Model, name string) {
	t.Helper()
	m.setFocus(paneDesign)
	m.designPane.sel = m.designPane.presetRow()
	press(t, m, keyEnter)
	if !m.designPane.Picking() {
		t.Fatal("the picker did not open")
	}
	for i, ps := range presets.All() {
		if ps.Name == name {
			m.designPane.pick = i
			return
		}
	}
	t.Fatalf("no preset %q", name)
}

// A point preset on a design over outcomes is marked, asks before the
// outcomes go, and is taken on the second enter; esc keeps the design.
func TestPickerAsksBeforeDroppingOutcomes(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	openPickerAt(t, m, "squared-error")
	if v := m.View(); !strings.Contains(v, "[point]") {
		t.Errorf("point presets are not marked:\n%s", v)
	}
	press(t, m, keyEnter)
	if d := m.Design(); d.Mode != design.ModeGenerator || !m.designPane.Picking() {
		t.Fatalf("the first enter took the preset: mode %s", d.Mode)
	}
	if v := m.View(); !strings.Contains(v, "frost, clear are") {
		t.Errorf("no question:\n%s", v)
	}
	press(t, m, keyEsc)
	if d := m.Design(); d.Mode != design.ModeGenerator || d.Preset != "power" {
		t.Fatalf("esc changed the design: %s %s", d.Mode, d.Preset)
	}
	openPickerAt(t, m, "squared-error")
	press(t, m, keyEnter, keyEnter)
	if d := m.Design(); d.Mode != design.ModePoint || d.Preset != "squared-error" {
		t.Fatalf("two enters did not take it: %s %s", d.Mode, d.Preset)
	}
	// A preset of the same kind is taken at once.
	openPickerAt(t, m, "qlike")
	press(t, m, keyEnter)
	if d := m.Design(); d.Preset != "qlike" {
		t.Errorf("a point preset on a point design asked: %s", d.Preset)
	}
	// Back to outcomes asks about the interval.
	openPickerAt(t, m, "quadratic")
	press(t, m, keyEnter)
	if d := m.Design(); d.Preset != "qlike" || !strings.Contains(m.View(), "interval [") {
		t.Errorf("outcome preset on a point design: %s\n%s", d.Preset, m.View())
	}
	press(t, m, keyEnter)
	if d := m.Design(); d.Mode != design.ModeGenerator || d.N() != 2 {
		t.Errorf("back to outcomes: %s, %d outcomes", d.Mode, d.N())
	}
}

// A hand-written formula with unsaved edits: the kind question comes
// first, then the unsaved-changes prompt, and the pick lands once both
// are answered (no loop between them).
func TestPickerQuestionThenUnsavedPrompt(t *testing.T) {
	d := DemoFrost()
	d.Preset, d.Formula = "", "1 - sum(p^2)"
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	typeBudget(t, m, "Cap", "41") // an unsaved edit
	openPickerAt(t, m, "squared-error")
	press(t, m, keyEnter) // the kind question
	press(t, m, keyEnter) // the unsaved-changes prompt
	if m.leaving == nil {
		t.Fatalf("no unsaved-changes prompt; mode %s", m.Design().Mode)
	}
	press(t, m, runes(m.keys.Discard.Keys()[0]))
	if d := m.Design(); d.Mode != design.ModePoint || d.Preset != "squared-error" || m.leaving != nil {
		t.Errorf("after both answers: mode %s, preset %q, prompt %v", d.Mode, d.Preset, m.leaving)
	}
}

// The picker with its question, at both sizes.
func TestGoldenPickerQuestion80x24(t *testing.T) { goldenPicker(t, 80, 24) }

func TestGoldenPickerQuestion120x40(t *testing.T) { goldenPicker(t, 120, 40) }

func goldenPicker(t *testing.T, w, h int) {
	m := testModel(t, nil, Settings{})
	start(t, m, w, h)
	openPickerAt(t, m, "patton")
	press(t, m, keyEnter)
	golden.RequireEqual(t, []byte(m.View()))
}
