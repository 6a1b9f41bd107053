package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// --help lists a command's options under a heading, and a command that
// has none (open takes only the design file) prints no empty heading.
func TestHelpHeadingOnlyWithOptions(t *testing.T) {
	code, out, stderr := runCmd(t, "open", "--help")
	if code != 0 || stderr != "" {
		t.Fatalf("open --help: exit %d, stderr %q", code, stderr)
	}
	if out != "usage: scorewright open DESIGN.toml\n" {
		t.Errorf("open --help prints %q", out)
	}
	code, out, _ = runCmd(t, "check", "--help")
	if code != 0 || !strings.Contains(out, "\n\noptions:\n  --certify\n") {
		t.Errorf("check --help: exit %d, output lacks its options heading:\n%s", code, out)
	}
}

// A design whose menu file is missing is refused with a message that says
// the file is the design's menu, not a bare "open x.csv: no such file".
func TestMissingDesignMenuNamesTheSetting(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "d.toml")
	src := "version = 1\noutcomes = [\"wet\", \"dry\"]\nmode = \"generator\"\nformula = \"1 - sum(p^2)\"\n\n[budget]\nfloor = 0\ncap = 10\nunit = 1\nmenu = \"gone.csv\"\n"
	if err := os.WriteFile(path, []byte(src), 0o600); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := runCmd(t, "table", "--design", path)
	if code != 2 {
		t.Errorf("exit %d, want 2", code)
	}
	if !strings.Contains(stderr, `the design's report menu (menu = "gone.csv" under [budget])`) || !strings.Contains(stderr, "gone.csv: no such file") {
		t.Errorf("stderr %q", stderr)
	}
}
