package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
)

// F2 opens the terms; a title typed there becomes the design's title and
// the name files are offered under; a bad date is refused with the
// field's name and leaves the design as it was; esc goes back.
func TestTermsEditTitleAndParties(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, nil, Settings{Dir: dir, Version: "test"})
	start(t, m, 80, 24)
	f2 := tea.KeyMsg{Type: tea.KeyF2}
	enter := tea.KeyMsg{Type: tea.KeyEnter}
	down := tea.KeyMsg{Type: tea.KeyDown}
	press(t, m, f2)
	if !m.terms.Shown() || !strings.Contains(m.View(), "Terms of the annex") {
		t.Fatalf("F2 did not open the terms:\n%s", m.View())
	}
	press(t, m, enter, runes("Kestrel Vale daily capacity"), enter) // typing replaces the demo's title
	if m.d.Title != "Kestrel Vale daily capacity" {
		t.Fatalf("title %q", m.d.Title)
	}
	press(t, m, down, enter, runes("Kestrel Vale Water Board"), enter)
	if m.d.Contract.Buyer != "Kestrel Vale Water Board" {
		t.Fatalf("buyer %q", m.d.Contract.Buyer)
	}
	press(t, m, down, down, down, enter, runes("2027-13-01"), enter)
	if m.d.Contract.Start != "" || !strings.Contains(m.View(), "contract.start") {
		t.Fatalf("a bad date was taken: %q\n%s", m.d.Contract.Start, m.View())
	}
	press(t, m, tea.KeyMsg{Type: tea.KeyEsc}, tea.KeyMsg{Type: tea.KeyEsc})
	if m.terms.Shown() {
		t.Fatal("esc did not leave the terms")
	}
	if name := m.defaultName("pdf"); filepath.Base(name) != "kestrel-vale-daily-capacity.pdf" {
		t.Errorf("export name %q", name)
	}
	// The annex exported from the workbench carries the buyer.
	path := filepath.Join(dir, "k.html")
	if _, err := defaultExporter("test").Export(t.Context(), m.d, ExportRequest{Format: "html", Path: path}); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); !strings.Contains(string(b), "Kestrel Vale Water Board") {
		t.Error("the annex lacks the buyer typed in the workbench")
	}
}

// In the terms view q quits as it does elsewhere (asking first when edits
// are unsaved), while typed into a field it is text.
func TestTermsViewLetsQQuit(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	f2 := tea.KeyMsg{Type: tea.KeyF2}
	press(t, m, f2, keyEnter, runes("q"))
	if m.quitting || m.leaving != nil || !strings.Contains(m.terms.ti.Value(), "q") {
		t.Fatal("q typed into a term did not stay text")
	}
	press(t, m, keyEnter) // the title now ends in q: an unsaved edit
	press(t, m, runes("q"))
	if m.leaving == nil {
		t.Fatal("q in the terms view did not ask before quitting")
	}
	press(t, m, runes("d"))
	if !m.quitting {
		t.Fatal("q in the terms view does not quit")
	}
}

// A refused value dropped with esc takes its refusal with it: the field
// shows its old value, and the message about the typed one is gone.
func TestTermsEscClearsARefusal(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	enter, esc, down := tea.KeyMsg{Type: tea.KeyEnter}, tea.KeyMsg{Type: tea.KeyEsc}, tea.KeyMsg{Type: tea.KeyDown}
	press(t, m, tea.KeyMsg{Type: tea.KeyF2}, down, down, down, down, enter, runes("2027-02-30"), enter)
	if !strings.Contains(m.View(), `contract.start: "2027-02-30"`) {
		t.Fatalf("the bad date was not refused:\n%s", m.View())
	}
	press(t, m, esc)
	if v := m.View(); strings.Contains(v, "2027-02-30") {
		t.Errorf("after esc the refusal of a value no longer typed stays:\n%s", v)
	}
	if !m.terms.Shown() || m.d.Contract.Start != "" {
		t.Errorf("esc left the terms or changed the start %q", m.d.Contract.Start)
	}
}
