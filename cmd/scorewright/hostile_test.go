package main

import (
	"os"
	"strings"
	"testing"
)

// The point table far from zero pays what the formula gives: squared
// error on [1000000, 1000001], menu of tenths, cap 50 pays
// 50 - 50·(0.1)^2 = 49.50 at report 1000000.1 and outcome 1000000 (derived
// by hand), and every column label is distinct.
func TestPointTableFarFromZero(t *testing.T) {
	code, out, errs := runCmd(t, "table", "--interval", "1000000,1000001", "--preset", "squared-error",
		"--floor", "0", "--cap", "50", "--step", "0.1", "--unit", "0.01", "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var head, row []string
	for _, line := range strings.Split(out, "\n") {
		if strings.HasPrefix(line, "#") || line == "" {
			continue
		}
		cells := strings.Split(line, ",")
		if head == nil {
			head = cells
			continue
		}
		if cells[0] == "1000000.1" {
			row = cells
		}
	}
	seen := map[string]bool{}
	for _, h := range head {
		if seen[h] {
			t.Errorf("column %q appears twice in %q", h, head)
		}
		seen[h] = true
	}
	if len(head) < 2 || !strings.Contains(head[1], "1000000") || strings.Contains(strings.Join(head, ","), "e+06") {
		t.Errorf("header %q", head)
	}
	if row == nil || row[1] != "49.50" {
		t.Errorf("row 1000000.1: %q", row)
	}
}

// A constant in the generator changes no cent of the table.
func TestGeneratorConstantChangesNoCent(t *testing.T) {
	body := func(gen string) string {
		code, out, errs := runCmd(t, "table", "--outcomes", "2", "--generator", gen, "--floor", "0", "--cap", "10", "--step", "0.05", "--unit", "0.01", "--format", "csv")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", gen, code, errs)
		}
		var rows []string
		for _, line := range strings.Split(out, "\n") {
			if !strings.HasPrefix(line, "#") {
				rows = append(rows, line)
			}
		}
		return strings.Join(rows, "\n")
	}
	if a, b := body("1 - sum(p^2)"), body("1e12 + 1 - sum(p^2)"); a != b {
		t.Errorf("tables differ:\n%s\n---\n%s", a, b)
	}
}

// Number flags take one form and say so in one style.
func TestNumberFlagsOneStyle(t *testing.T) {
	table := []string{"table", "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--step", "0.1"}
	check := []string{"check", "--outcomes", "2", "--preset", "quadratic"}
	cases := []struct {
		args []string
		want string
	}{
		{append(append([]string{}, table...), "--cap", "0x10"), `--cap: "0x10" is not a number (write it like 10, 0.5 or 1e-3)`},
		{append(append([]string{}, table...), "--cap", "1_000"), `--cap: "1_000" is not a number`},
		{append(append([]string{}, table...), "--cap", "Inf"), `--cap: "Inf" is not a number`},
		{append(append([]string{}, table...), "--cap", "1e400"), `--cap: "1e400" is out of range`},
		{append(append([]string{}, check...), "--limit", "NaN"), `--limit: "NaN" is not a number`},
		{append(append([]string{}, check...), "--workers", "1e3"), `--workers: "1e3" is not a whole number`},
		{append(append([]string{}, check...), "--param", "g=0x2"), `g: "0x2" is not a number`},
		{append(append([]string{}, table...), "--cap", "10", "--weights", "1,NaN"), `--weights: entry 2 ("NaN") is not a number`},
	}
	for _, c := range cases {
		code, _, errs := runCmd(t, c.args...)
		if code != 2 || !strings.Contains(errs, c.want) || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: exit %d, %q; want %q", c.args, code, errs, c.want)
		}
	}
}

// Sample and worker counts beyond what the machine holds are refused at
// once, with the cap in the message, before anything is allocated.
func TestCheckCapsSamplesAndWorkers(t *testing.T) {
	for _, c := range []struct{ flag, value, want string }{
		{"--samples", "1000000000", "--samples: 1000000000 is more than this machine can hold for 8 outcomes (at most "},
		{"--workers", "1000000", "--workers: 1000000 is more than this machine can use (at most "},
	} {
		code, _, errs := runCmd(t, "check", "--outcomes", "8", "--preset", "quadratic", c.flag, c.value)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%s %s: exit %d, %q", c.flag, c.value, code, errs)
		}
	}
}

// The record states only what applies.
func TestRecordStatesOnlyWhatApplies(t *testing.T) {
	code, _, errs := runCmd(t, "table", "--outcomes", "2", "--preset", "quadratic", "--weights", "1,5", "--floor", "0", "--cap", "10", "--step", "0.1")
	if code != 2 || !strings.Contains(errs, `--weights: preset "quadratic" does not use the outcome weights w`) {
		t.Errorf("unweighted preset with weights: exit %d, %q", code, errs)
	}
	dir := t.TempDir()
	path := dir + "/mismatch.toml"
	writeFile(t, path, "version = 1\nmode = \"generator\"\noutcomes = [\"frost\", \"clear\"]\npreset = \"log\"\nformula = \"1 - sum(p^2)\"\n[budget]\nfloor = 0\ncap = 10\nstep = 0.1\n")
	code, out, errs := runCmd(t, "table", "--design", path, "--format", "md")
	if code != 0 || strings.Contains(out, "log") || !strings.Contains(out, "1 - sum(p^2)") {
		t.Errorf("preset log over a quadratic formula: exit %d, %s\n%s", code, errs, out)
	}
	ref := dir + "/reference.toml"
	writeFile(t, ref, "version = 1\nmode = \"generator\"\noutcomes = [\"frost\", \"clear\"]\npreset = \"quadratic\"\n[budget]\nfloor = 0\ncap = 10\nstep = 0.1\nreference = [0.2, 0.8]\n")
	code, _, errs = runCmd(t, "table", "--design", ref)
	if code != 2 || !strings.Contains(errs, "budget.reference") || !strings.Contains(errs, "mean_pay") {
		t.Errorf("design reference without mean_pay: exit %d, %q", code, errs)
	}
}

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// Output errors name the path the user gave, never a temporary file, and
// no special file is replaced even with --force.
func TestOutputErrorsNameTheUsersPath(t *testing.T) {
	dir := t.TempDir()
	table := []string{"table", "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--cap", "10", "--step", "0.1", "--force", "--out"}
	adir := dir + "/adir.md"
	if err := os.Mkdir(adir, 0o755); err != nil {
		t.Fatal(err)
	}
	link := dir + "/link.md"
	if err := os.Symlink(dir+"/elsewhere.md", link); err != nil {
		t.Fatal(err)
	}
	for _, path := range []string{adir, link, dir + "/no-such-dir/annex.md"} {
		code, _, errs := runCmd(t, append(append([]string{}, table...), path)...)
		if code != 2 || !strings.Contains(errs, path) || strings.Contains(errs, ".tmp") {
			t.Errorf("--out %s: exit %d, %q", path, code, errs)
		}
	}
	if _, err := os.Lstat(dir + "/elsewhere.md"); err == nil {
		t.Error("the link's target was written")
	}
	bt := append(append([]string{"backtest"}, frostRule...), "--floor", "0", "--cap", "10", "--step", "0.1", "--history", frostHistory, "--force", "--pay-out")
	for _, path := range []string{link, dir + "/no-such-dir/pay.csv"} {
		code, _, errs := runCmd(t, append(append([]string{}, bt...), path)...)
		if code != 2 || !strings.Contains(errs, path) || strings.Contains(errs, ".tmp") {
			t.Errorf("--pay-out %s: exit %d, %q", path, code, errs)
		}
	}
}
