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

// An exported table names the design's menu file as the design does,
// not by the absolute path of the machine that made it: the record goes
// into annexes other people keep.
func TestDesignMenuRecordedAsNamed(t *testing.T) {
	path := writeMenuDesign(t, "0\n0.5\n1\n", "floor = 0\ncap = 10\nunit = 1\n")
	dir := filepath.Dir(path)
	out := filepath.Join(dir, "t.csv")
	if code, _, stderr := runCmd(t, "table", "--design", path, "--out", out); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(b), "# menu: 3 reports listed in m.csv (the design's menu file)\n") {
		t.Errorf("menu line missing:\n%s", b)
	}
	if strings.Contains(string(b), dir) {
		t.Errorf("the table records the folder %s:\n%s", dir, b)
	}
}

// distort --design on a design whose budget names a menu file holds the
// forecaster to that menu, as the contract does, instead of saying "no
// menu". By hand, quadratic rule on [0, 10], unit 1, menu 0, 0.5, 1: the
// rows pay (0, 10), (8, 8) (7.5 rounded half away from zero) and (10, 0),
// so at belief (0.5, 0.5) a risk-neutral forecaster expects 5, 8 and 5
// and picks 0.5.
func TestDistortUsesTheDesignsMenuFile(t *testing.T) {
	path := writeMenuDesign(t, "0\n0.5\n1\n", "floor = 0\ncap = 10\nunit = 1\n")
	code, out, stderr := runCmd(t, "distort", "--design", path, "--utility", "linear", "--belief", "0.5,0.5")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if strings.Contains(out, "no menu") || !strings.Contains(out, "on the menu: 3 reports listed in m.csv") {
		t.Errorf("the design's menu is not the risk's:\n%s", out)
	}
	if !strings.Contains(out, "menu pick (0.5, 0.5)") {
		t.Errorf("menu pick missing or wrong:\n%s", out)
	}
}
