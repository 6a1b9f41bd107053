package main

import (
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
