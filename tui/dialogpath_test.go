package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"
)

// A dialog's path field opens with the suggested path standing whole, as
// a value input does: the first key typed replaces it (typing a.md gives
// a.md, not the suggestion with a.md after it, and the format follows the
// extension); a cursor key first keeps it to edit in place; backspace
// clears it. The save dialog's field is the same field; the open dialog
// suggests a folder, which typing extends.
func TestDialogPathReplacedOnFirstKey(t *testing.T) {
	dir := t.TempDir()
	m := testModel(t, nil, Settings{Dir: dir, Version: "test"})
	start(t, m, 80, 24)
	press(t, m, tea_ctrlX())
	suggested := m.dialog.Path()
	if !strings.HasSuffix(suggested, ".csv") {
		t.Fatalf("suggested path %q", suggested)
	}
	press(t, m, runes("a.md"))
	if got := m.dialog.Path(); got != "a.md" || m.dialog.Format() != "md" {
		t.Fatalf("typed a.md over %q: path %q, format %s", suggested, got, m.dialog.Format())
	}
	press(t, m, keyEnter)
	if _, err := os.Stat(filepath.Join(dir, "a.md")); err != nil {
		t.Fatalf("export to the typed path: %v (%s)", err, m.Status())
	}

	press(t, m, tea_ctrlX())
	before := m.dialog.Path()
	press(t, m, keyLeft, keyEnd, runes("x"))
	if got := m.dialog.Path(); got != before+"x" {
		t.Errorf("after a cursor key, typing x extends %q: %q", before, got)
	}
	press(t, m, keyEsc)

	press(t, m, tea_ctrlX(), keyBack)
	if got := m.dialog.Path(); got != "" {
		t.Errorf("backspace on the whole suggestion: %q", got)
	}
	press(t, m, keyEsc, keyCtrlS)
	if m.dialog == nil || m.dialog.kind != dialogSave || !m.dialog.path.Whole() {
		t.Fatalf("save dialog: %+v", m.dialog)
	}
	press(t, m, runes("b"))
	if got := m.dialog.Path(); got != "b" {
		t.Errorf("save dialog: typed b, path %q", got)
	}
	press(t, m, keyEsc, tea_ctrlO())
	folder := m.dialog.Path()
	press(t, m, runes("b"))
	if got := m.dialog.Path(); got != folder+"b" {
		t.Errorf("open dialog: typed b after %q, path %q", folder, got)
	}
}

// In the help overlay q neither quits nor closes it (q is listed there as
// quit; one key must not mean two things); esc or the help key closes it,
// and the overlay's title says so.
func TestHelpClosesWithEscOrHelpOnly(t *testing.T) {
	m := testModel(t, nil, Settings{})
	start(t, m, 80, 24)
	press(t, m, runes("?"))
	if !m.help || !strings.Contains(ansi.Strip(m.View()), "esc or ? / F1 closes this help") {
		t.Fatalf("help open %v:\n%s", m.help, ansi.Strip(m.View()))
	}
	press(t, m, runes("q"))
	if !m.help || m.quitting {
		t.Fatalf("q in help: help %v, quitting %v", m.help, m.quitting)
	}
	press(t, m, keyEsc)
	if m.help {
		t.Fatal("esc did not close help")
	}
	press(t, m, runes("?"), runes("?"))
	if m.help || m.quitting {
		t.Fatalf("? did not close help: help %v, quitting %v", m.help, m.quitting)
	}
}
