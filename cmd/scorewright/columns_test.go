package main

import (
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"
)

// The command line's tables are laid out by display width: outcome labels
// with wide characters (two columns each) keep eval's values in one
// column, where a rune count would pull those lines one column short per
// wide character.
func TestEvalColumnsByDisplayWidth(t *testing.T) {
	code, out, errText := runCmd(t, "eval", "--outcomes", "霜 frost,clear,雨", "--preset", "quadratic", "--report", "0.5,0.3,0.2")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errText)
	}
	at := -1
	for _, l := range strings.Split(strings.TrimSpace(out), "\n") {
		if !strings.HasPrefix(l, "effort if") {
			continue
		}
		i := strings.LastIndex(l, " ") + 1
		if c := ansi.StringWidth(l[:i]); at < 0 {
			at = c
		} else if c != at {
			t.Errorf("%q: value at column %d, want %d\n%s", l, c, at, out)
		}
	}
	if at < 0 {
		t.Fatalf("no effort lines:\n%s", out)
	}
}
