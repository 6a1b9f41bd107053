package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Per-question totals are a regrouping of the same payments, so they add
// up to each rule's total and their counts to the rows scored (derived by
// hand: a sum does not depend on how its terms are grouped).
func TestBacktestByQuestion(t *testing.T) {
	code, out, stderr := runCmd(t, "backtest", "--outcomes", "frost,clear", "--preset", "quadratic",
		"--floor", "0", "--cap", "10", "--step", "0.05", "--unit", "0.01", "--report-floor", "0.01",
		"--history", frostHistory, "--versus-preset", "log", "--by-question", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var got struct {
		Rows  int
		Rules []struct {
			Total float64
		}
		Questions []struct {
			Name    string
			Outcome string
			Count   int
			Total   []float64
		}
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Questions) == 0 {
		t.Fatal("no questions reported")
	}
	count := 0
	sums := make([]float64, len(got.Rules))
	for _, q := range got.Questions {
		count += q.Count
		for i, v := range q.Total {
			sums[i] += v
		}
	}
	if count != got.Rows {
		t.Errorf("question counts add to %d, rows scored %d", count, got.Rows)
	}
	for i, r := range got.Rules {
		if math.Abs(sums[i]-r.Total) > 1e-6 {
			t.Errorf("rule %d: questions add to %v, total %v", i, sums[i], r.Total)
		}
	}
}

// Rows of one question that disagree about what happened are named.
func TestBacktestQuestionConflict(t *testing.T) {
	path := filepath.Join(t.TempDir(), "h.csv")
	data := "forecaster,question,outcome,frost,clear\nAlder,night 1,frost,0.6,0.4\nBirch,night 1,clear,0.3,0.7\n"
	if err := os.WriteFile(path, []byte(data), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, stderr := runCmd(t, "backtest", "--outcomes", "frost,clear", "--preset", "quadratic",
		"--floor", "0", "--cap", "10", "--step", "0.1", "--unit", "0.01", "--history", path, "--by-question")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, `question "night 1" has rows that disagree about the outcome (line 2 says "frost", line 3 another)`) {
		t.Errorf("conflict not reported:\n%s", out)
	}
}
