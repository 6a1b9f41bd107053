package design

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A relative menu path is the design file's: opened, it names the file
// beside the design whatever the working directory; saved into another
// folder, it is rewritten to name the same file from there; an absolute
// path is kept as it is.
func TestMenuPathFollowsTheDesignFile(t *testing.T) {
	root := t.TempDir()
	a, b := filepath.Join(root, "a"), filepath.Join(root, "b", "c")
	for _, dir := range []string{a, b} {
		if err := os.MkdirAll(dir, 0o700); err != nil {
			t.Fatal(err)
		}
	}
	d := &Design{Version: SchemaVersion, Labels: []string{"sold out", "left over"}, Mode: ModeGenerator,
		Formula: "1 - sum(p^2)", Budget: Budget{Cap: 10, Menu: "menu.csv"}, Dir: a}
	first := filepath.Join(a, "bakery.toml")
	if err := d.Save(first, false); err != nil {
		t.Fatal(err)
	}
	if d.Budget.Menu != "menu.csv" || d.Dir != a {
		t.Fatalf("after saving in its own folder: menu %q, dir %q", d.Budget.Menu, d.Dir)
	}
	back, err := Load(first)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := back.MenuPath(), filepath.Join(a, "menu.csv"); got != want {
		t.Errorf("menu read from %q, want %q (the design's folder, not the working directory)", got, want)
	}
	second := filepath.Join(b, "bakery.toml")
	if err := back.Save(second, false); err != nil {
		t.Fatal(err)
	}
	text, err := os.ReadFile(second)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(text), `menu = "../../a/menu.csv"`) {
		t.Errorf("saved elsewhere, the menu path was not rewritten:\n%s", text)
	}
	moved, err := Load(second)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := moved.MenuPath(), filepath.Join(a, "menu.csv"); got != want {
		t.Errorf("after the move the menu is read from %q, want %q", got, want)
	}
	abs := filepath.Join(root, "menus", "m.csv")
	moved.Budget.Menu = abs
	moved.MoveTo(root)
	if moved.Budget.Menu != abs || moved.MenuPath() != abs {
		t.Errorf("an absolute menu path changed: %q", moved.Budget.Menu)
	}
	fresh := &Design{Labels: []string{"a", "b"}, Mode: ModeGenerator, Formula: "1 - sum(p^2)", Budget: Budget{Cap: 10, Menu: "m.csv"}}
	if fresh.MenuPath() != "m.csv" {
		t.Error("a design never saved reads its menu from somewhere other than the working directory")
	}
	wd, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	if err := fresh.Save(filepath.Join(b, "fresh.toml"), false); err != nil {
		t.Fatal(err)
	}
	if got, want := fresh.MenuPath(), filepath.Join(wd, "m.csv"); got != want {
		t.Errorf("a design never saved, saved elsewhere, reads its menu from %q, want %q (the working directory's file)", got, want)
	}
}

// A save that is refused (the file exists) leaves the design as it was.
func TestRefusedSaveKeepsTheMenuPath(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "x", "d.toml")
	if err := os.MkdirAll(filepath.Dir(path), 0o700); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte("keep"), 0o600); err != nil {
		t.Fatal(err)
	}
	d := &Design{Labels: []string{"a", "b"}, Mode: ModeGenerator, Formula: "1 - sum(p^2)", Budget: Budget{Cap: 10, Menu: "m.csv"}, Dir: dir}
	if err := d.Save(path, false); err == nil {
		t.Fatal("saved over an existing file")
	}
	if d.Budget.Menu != "m.csv" || d.Dir != dir {
		t.Errorf("a refused save changed the design: menu %q, dir %q", d.Budget.Menu, d.Dir)
	}
}
