package tui

import (
	"context"
	"errors"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"scorewright/generator/design"
	"scorewright/generator/formula"
)

// A formula longer than the editor's old 4,000 characters is shown and
// edited whole; a paste past the language's 64 KiB is refused with a
// message and changes nothing.
func TestFormulaEditorNeverCuts(t *testing.T) {
	d := DemoFrost()
	d.Formula = "1 - sum(p^2)" + strings.Repeat(" + 0*p1", 1500) // 10,512 bytes
	p := NewDesignPane(testStyles(t), DefaultKeyMap(), d)
	if got := p.ta.Value(); got != d.Formula {
		t.Fatalf("editor holds %d bytes of a %d-byte formula", len(got), len(d.Formula))
	}
	p.edit = editFormula
	p.ta.Focus()
	p.ta.CursorEnd()
	long := d.Formula
	p, _, changed := p.Update(runes(" + 0"), d)
	if !changed || d.Formula != long+" + 0" {
		t.Fatalf("typing at the end: changed %v, %d bytes, want %d", changed, len(d.Formula), len(long)+4)
	}
	before := d.Formula
	paste := tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(strings.Repeat("+p1", formula.MaxSource/3)), Paste: true}
	p, _, changed = p.Update(paste, d)
	if changed || d.Formula != before || p.ta.Value() != before {
		t.Errorf("a paste past 64 KiB changed the formula (%d bytes)", len(d.Formula))
	}
	if !strings.Contains(p.note, "at most 65536") {
		t.Errorf("note %q", p.note)
	}
}

// withOtherDesign starts a workbench beside a saved design file, other,
// at path.
func withOtherDesign(t *testing.T) (*Model, string, *design.Design) {
	t.Helper()
	m := testModel(t, nil, Settings{})
	start(t, m, 120, 40)
	path := filepath.Join(m.set.Dir, "other.toml")
	other := DemoFrost()
	other.Title = "Opened from a file"
	if err := other.Save(path, false); err != nil {
		t.Fatal(err)
	}
	return m, path, other
}

// A late "open" answer must not replace a design the user moved on from:
// open, cancel with esc, ctrl+n to the next demo, then the answer arrives.
func TestLateOpenIgnored(t *testing.T) {
	m, path, other := withOtherDesign(t)
	m.openDialog(dialogOpen)
	m.dialog.path.SetValue(path)
	late := m.submitDialog()
	press(t, m, keyEsc, keyCtrlN)
	if m.d.Title == other.Title {
		t.Fatal("test setup: the file was opened already")
	}
	want := m.d.Title
	_, cmd := m.Update(late())
	settle(t, m, cmd)
	if m.d.Title != want {
		t.Errorf("a late open replaced the design: title %q, want %q", m.d.Title, want)
	}
	// The same after a new dialog of another kind was opened meanwhile.
	m.openDialog(dialogOpen)
	m.dialog.path.SetValue(path)
	late = m.submitDialog()
	press(t, m, keyEsc)
	m.openDialog(dialogSave)
	_, cmd = m.Update(late())
	settle(t, m, cmd)
	if m.d.Title != want || m.dialog == nil || m.dialog.kind != dialogSave {
		t.Errorf("a late open landed on the save dialog: title %q", m.d.Title)
	}
}

// The export's format is the one its file name says: annex.pdf is a PDF
// even when the format field showed csv.
func TestExportFormatFromExtension(t *testing.T) {
	d := newFileDialog(testStyles(t), DefaultKeyMap(), dialogExport, "annex.pdf", []string{"csv", "md", "pdf"})
	if d.Format() != "csv" {
		t.Fatal("test setup: format field should start at csv")
	}
	d.formatFromPath()
	if d.Format() != "pdf" {
		t.Errorf("format %q for annex.pdf", d.Format())
	}
	d = newFileDialog(testStyles(t), DefaultKeyMap(), dialogExport, "annex.txt", []string{"csv", "md"})
	if d.formatFromPath(); d.Format() != "csv" {
		t.Errorf("an unknown extension changed the format to %q", d.Format())
	}
}

// esc leaves an open dialog that is still reading its file ("working…"),
// and stops the read: the answer that comes after says the read was
// cancelled, and is dropped.
func TestOpenCancelledWhileReading(t *testing.T) {
	m, path, _ := withOtherDesign(t)
	want := m.d.Title
	m.openDialog(dialogOpen)
	m.dialog.path.SetValue(path)
	_, cmd := m.Update(keyEnter) // the read's command, not yet run
	if m.dialog == nil || !m.dialog.busy {
		t.Fatal("test setup: the dialog is not reading")
	}
	press(t, m, keyEsc)
	if m.dialog != nil || m.status != "cancelled: the file was not opened" {
		t.Fatalf("after esc: dialog %v, status %q", m.dialog != nil, m.status)
	}
	var opened []openedMsg
	var collect func(msg tea.Msg)
	collect = func(msg tea.Msg) {
		switch msg := msg.(type) {
		case openedMsg:
			opened = append(opened, msg)
		case tea.BatchMsg:
			for _, c := range msg {
				if c != nil {
					collect(c())
				}
			}
		}
	}
	collect(cmd())
	if len(opened) != 1 || !errors.Is(opened[0].err, context.Canceled) {
		t.Fatalf("the read's answers %+v, want one that says it was cancelled", opened)
	}
	_, next := m.Update(opened[0])
	settle(t, m, next)
	if m.d.Title != want {
		t.Errorf("a cancelled open replaced the design: title %q", m.d.Title)
	}
}

// Editing the formula of a design made from a preset drops the preset's
// name, and the pane says so.
func TestPresetDroppedNote(t *testing.T) {
	d := DemoFrost()
	if d.Preset == "" {
		t.Fatal("test setup: the demo names no preset")
	}
	name := d.Preset
	p := NewDesignPane(testStyles(t), DefaultKeyMap(), d)
	p.edit = editFormula
	p.ta.Focus()
	p.ta.CursorEnd()
	p, _, changed := p.Update(runes(" + 0"), d)
	if !changed || d.Preset != "" {
		t.Fatalf("changed %v, preset %q after editing the formula", changed, d.Preset)
	}
	if want := `"` + name + `" preset dropped`; !strings.Contains(p.note, want) {
		t.Errorf("note %q, want it to say %s", p.note, want)
	}
}
