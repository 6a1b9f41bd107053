package tui

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func touch(t *testing.T, paths ...string) {
	t.Helper()
	for _, p := range paths {
		if strings.HasSuffix(p, "/") {
			if err := os.MkdirAll(p, 0o755); err != nil {
				t.Fatal(err)
			}
			continue
		}
		if err := os.WriteFile(p, nil, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// Tab completes as far as every match agrees, adds a slash after a single
// folder, keeps to the dialog's extensions and hides dot files unless a dot
// is typed.
func TestCompletePath(t *testing.T) {
	dir := t.TempDir()
	touch(t, dir+"/frost-2026.toml", dir+"/frost-2027.toml", dir+"/fog/", dir+"/notes.txt", dir+"/.hidden.toml", dir+"/žluť.toml")
	toml := []string{"toml"}
	cases := []struct {
		path  string
		exts  []string
		value string
		cands int
	}{
		{dir + "/fr", toml, dir + "/frost-202", 2},
		{dir + "/fo", toml, dir + "/fog/", 0},
		{dir + "/n", toml, dir + "/n", 0},        // notes.txt is not a design
		{dir + "/n", nil, dir + "/notes.txt", 0}, // any file for an export of every format
		{dir + "/", toml, dir + "/", 4},          // no dot files, no notes.txt
		{dir + "/.h", toml, dir + "/.hidden.toml", 0},
		{dir + "/ž", toml, dir + "/žluť.toml", 0},
		{"fr", toml, "frost-202", 2}, // relative to the dialog's folder
		{dir + "/none/x", toml, dir + "/none/x", 0},
	}
	for _, c := range cases {
		got := completePath(c.path, dir, c.exts)
		if got.value != c.value || len(got.cands) != c.cands {
			t.Errorf("completePath(%q) = %q with %d names %v, want %q with %d", c.path, got.value, len(got.cands), got.cands, c.value, c.cands)
		}
	}
	if c := completePath(dir+"/none/x", dir, toml); !strings.Contains(c.note, "no folder") {
		t.Errorf("a missing folder says %q", c.note)
	}
	if p := commonPrefix([]string{"žluť", "žlutá"}); p != "žlu" {
		t.Errorf("common prefix %q cuts a character", p)
	}
}

// In the open dialog tab completes the name; a missing file is one line
// naming it; the export dialog keeps the format chosen last and takes the
// format from a typed extension.
func TestDialogCompletesAndRemembers(t *testing.T) {
	dir := t.TempDir()
	if err := DemoHarvest().Save(filepath.Join(dir, "harvest-outlook.toml"), false); err != nil {
		t.Fatal(err)
	}
	m := testModel(t, nil, Settings{Dir: dir, Version: "test"})
	start(t, m, 80, 24)
	press(t, m, tea_ctrlO(), runes("harv"), keyTab)
	if m.dialog == nil || m.dialog.Path() != dir+"/harvest-outlook.toml" {
		t.Fatalf("tab did not complete: %q", m.dialog.Path())
	}
	press(t, m, keyEsc, tea_ctrlO(), runes("missing.toml"), keyEnter)
	if msg := m.dialog.msg; !strings.HasPrefix(msg, "✗ no file ") || !strings.Contains(msg, "missing.toml") || strings.Contains(msg, "\n") {
		t.Fatalf("missing file: %q", msg)
	}
	press(t, m, keyEsc, tea_ctrlX(), keyDown, keyDown) // csv → md → json
	want := m.dialog.Format()
	press(t, m, keyEnter)
	press(t, m, tea_ctrlX())
	if m.dialog.Format() != want || !strings.HasSuffix(m.dialog.Path(), "."+want) {
		t.Fatalf("the export dialog forgot the format: %s %s", m.dialog.Format(), m.dialog.Path())
	}
	// end keeps the suggested name to edit (a key typed first replaces it).
	press(t, m, keyEnd, keyBack, keyBack, keyBack, keyBack, runes("html"))
	if m.dialog.Format() != "html" {
		t.Fatalf("typing .html left the format at %s", m.dialog.Format())
	}
}

func TestFileErrorIsOneLine(t *testing.T) {
	_, err := os.Open("/nonexistent-dir-for-test/x.toml")
	if got := fileError(err); got != "✗ no file /nonexistent-dir-for-test/x.toml; check the name (tab completes it)" {
		t.Errorf("got %q", got)
	}
	if got := fileError(errors.New("a:\n  b")); got != "✗ a:; b" {
		t.Errorf("got %q", got)
	}
}
