package main

import (
	"os"
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

// The backtest's forecaster column pads names to the widest by display
// width, so that names read left-aligned in the right-aligned tables: a
// name in wide characters (two columns each) starts in the same column as
// the others, and the counts after it stay in one column.
func TestBacktestNamesByDisplayWidth(t *testing.T) {
	hist := t.TempDir() + "/h.csv"
	csv := "forecaster,question,outcome,frost,clear\n" +
		"山田,n1,frost,0.7,0.3\nAlder,n1,frost,0.6,0.4\n山田,n2,clear,0.2,0.8\nAlder,n2,clear,0.5,0.5\n"
	if err := os.WriteFile(hist, []byte(csv), 0o600); err != nil {
		t.Fatal(err)
	}
	code, out, errText := runCmd(t, "backtest", "--outcomes", "frost,clear", "--preset", "quadratic",
		"--floor", "0", "--cap", "10", "--history", hist)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errText)
	}
	// The forecaster table comes first: where each row's name starts and
	// where its count (the cell after the name) ends.
	type cols struct{ name, count int }
	at := map[string]cols{}
	for _, l := range strings.Split(out, "\n") {
		t := strings.TrimLeft(l, " ")
		for _, name := range []string{"山田", "Alder", "forecaster"} {
			if _, seen := at[name]; seen || !strings.HasPrefix(t, name+" ") {
				continue
			}
			rest := strings.TrimLeft(t[len(name):], " ")
			end := len(l) - len(rest) + strings.IndexByte(rest+" ", ' ')
			at[name] = cols{len(l) - len(t), ansi.StringWidth(l[:end])}
		}
	}
	if len(at) != 3 || at["山田"] != at["Alder"] || at["Alder"] != at["forecaster"] {
		t.Errorf("name starts and count ends %v, want one column each:\n%s", at, out)
	}
}
