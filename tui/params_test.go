package tui

import (
	"strings"
	"testing"

	"github.com/charmbracelet/x/exp/golden"

	"scorewright/generator/design"
)

// selectParam selects parameter row i of the design pane.
func selectParam(t *testing.T, m *Model, i int) {
	t.Helper()
	m.setFocus(paneDesign)
	m.designPane.sel = int(rowParams) + i
	if i >= len(m.designPane.params) {
		t.Fatalf("no parameter %d: %+v", i, m.designPane.params)
	}
}

// Stepping a parameter rewrites its line, in the design and in the
// editor, and the checked value is the one the line says; an override
// from the file gives way to the line.
func TestParamStepRewritesTheLine(t *testing.T) {
	d := DemoFrost()
	d.Formula = "# power family\n  g = 2   # the quadratic rule\n(1 - sum(p^g)) / (g - 1)"
	d.Params = map[string]float64{"g": 3} // as --param g=3 would leave it
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	selectParam(t, m, 0)
	press(t, m, keyRight)
	got := m.Design()
	want := "# power family\n  g = 3.1  # the quadratic rule\n(1 - sum(p^g)) / (g - 1)"
	if got.Formula != want || got.Params != nil {
		t.Fatalf("formula %q, params %v; want %q and no override", got.Formula, got.Params, want)
	}
	if ed := m.designPane.ta.Value(); ed != got.Formula {
		t.Errorf("editor shows %q, design has %q", ed, got.Formula)
	}
	if pv := m.comp.params; len(pv) != 1 || pv[0].Value != 3.1 {
		t.Errorf("compiled parameters %+v, want g = 3.1", pv)
	}
	// Typed: a negative value is written as typed and reads back.
	press(t, m, keyEnter)
	m.designPane.ti.SetValue("-0.5")
	press(t, m, keyEnter)
	if f := m.Design().Formula; !strings.Contains(f, "  g = -0.5  # the quadratic rule\n") || m.designPane.ta.Value() != f {
		t.Errorf("typed -0.5: formula %q, editor %q", f, m.designPane.ta.Value())
	}
}

// rewriteParam leaves the text alone when the line cannot be found, and
// keeps every other line as it was.
func TestRewriteParam(t *testing.T) {
	src := "a = 1\nb = 2 # two\na*p1 + b*p2"
	if out, ok := rewriteParam(src, "b", 0.25); !ok || out != "a = 1\nb = 0.25  # two\na*p1 + b*p2" {
		t.Errorf("b: %q %v", out, ok)
	}
	if _, ok := rewriteParam(src, "c", 1); ok {
		t.Error("rewrote a parameter with no line")
	}
	if _, ok := rewriteParam("a = (1 +\n", "a", 1); ok {
		t.Error("rewrote a formula that does not parse")
	}
	d := &design.Design{Formula: src}
	setParam(d, "c", 4) // no line: an override
	if d.Params["c"] != 4 || d.Formula != src {
		t.Errorf("override: %v, %q", d.Params, d.Formula)
	}
}

// The editor after a step, at both sizes.
func TestGoldenParamStep80x24(t *testing.T) { goldenParamStep(t, 80, 24) }

func TestGoldenParamStep120x40(t *testing.T) { goldenParamStep(t, 120, 40) }

func goldenParamStep(t *testing.T, w, h int) {
	m := testModel(t, nil, Settings{})
	start(t, m, w, h)
	selectParam(t, m, 0)
	press(t, m, keyRight, keyRight, keyRight)
	golden.RequireEqual(t, []byte(m.View()))
}

// A design opened with parameter overrides shows their values in the
// formula's lines: the editor holds the formula that is checked, and the
// pane says what happened. The design is not marked as edited.
func TestOverridesFoldedOnOpen(t *testing.T) {
	d := DemoFrost()
	d.Params = map[string]float64{"g": 3}
	m := testModel(t, d, Settings{})
	start(t, m, 80, 24)
	got := m.Design()
	if got.Params != nil || !strings.Contains(got.Formula, "\ng = 3\n") || m.designPane.ta.Value() != got.Formula {
		t.Fatalf("formula %q, params %v, editor %q", got.Formula, got.Params, m.designPane.ta.Value())
	}
	if pv := m.comp.params; len(pv) != 1 || pv[0].Value != 3 {
		t.Errorf("compiled %+v, want g = 3", pv)
	}
	if !strings.Contains(m.designPane.note, "g") || m.Unsaved() {
		t.Errorf("note %q, unsaved %v", m.designPane.note, m.Unsaved())
	}
	// The same through replaceDesign (a file opened, a demo).
	d.Params = map[string]float64{"g": 1.5}
	settle(t, m, m.replaceDesign(d))
	if f := m.Design().Formula; !strings.Contains(f, "\ng = 1.5\n") || m.designPane.ta.Value() != f {
		t.Errorf("replaced: formula %q, editor %q", f, m.designPane.ta.Value())
	}
}
