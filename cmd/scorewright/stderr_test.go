package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// stderr goes through the same filter as a terminal's stdout, file or
// not: a message quoting a hostile title cannot clear the screen, move
// the cursor or reverse the text after it. Progress lines go around it,
// as they rewrite themselves with a carriage return.
func TestStderrIsFiltered(t *testing.T) {
	dir := t.TempDir()
	open := func(name string) *os.File {
		f, err := os.Create(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { f.Close() })
		return f
	}
	out, errf := open("out"), open("err")
	e := newEnv([]string{"table"}, os.Stdin, out, errf)
	fmt.Fprint(e.stderr, "design \x1b[2J\x1b[Htitle \u202edeliaf\u202c: bad\r\n")
	fmt.Fprint(e.progressOut(), "\r 50% ")
	fmt.Fprint(e.stdout, "a,b\x1b[31m\n") // a file: exports pass unchanged
	got, _ := os.ReadFile(errf.Name())
	if want := "design title deliaf: bad\n\r 50% "; string(got) != want {
		t.Errorf("stderr holds %q, want %q", got, want)
	}
	if got, _ := os.ReadFile(out.Name()); string(got) != "a,b\x1b[31m\n" {
		t.Errorf("stdout to a file holds %q, want the bytes unchanged", got)
	}
}

// A design file that names a preset but gives another formula is run by
// its formula, and the user is told the name was dropped (on stderr, so
// the table's output stays what it was).
func TestPresetDroppedNotice(t *testing.T) {
	path := filepath.Join(t.TempDir(), "mixed.toml")
	src := "version = 1\noutcomes = [\"frost\", \"clear\"]\nmode = \"generator\"\npreset = \"log\"\nformula = \"1 - sum(p^2)\"\n" +
		"[budget]\nfloor = 0\ncap = 10\nstep = 0.1\n"
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	code, stdout, stderr := runCmd(t, "table", "--design", path)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if want := `scorewright: note: ` + path + `: the design names preset "log" but gives a formula of its own; the formula is used and recorded, the preset name is not`; !strings.Contains(stderr, want) {
		t.Errorf("stderr %q lacks %q", stderr, want)
	}
	if strings.Contains(stdout, "preset: log") {
		t.Error("the table still records the dropped preset")
	}
}
