package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// tableRun runs scorewright table with args and returns stdout, stderr
// and the exit status.
func tableRun(t *testing.T, args ...string) (string, string, int) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(append([]string{"table"}, args...), &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb})
	return out.String(), errb.String(), code
}

var brierArgs = []string{"--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.1", "--unit", "1"}

// coarseArgs round the Brier table so coarsely that menu items tie (see
// contract/budget's TestCoarseRoundingTiesCaught for the hand
// derivation).
var coarseArgs = []string{"--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.2", "--unit", "25"}

func with(base []string, more ...string) []string {
	return append(append([]string(nil), base...), more...)
}

func dirNames(t *testing.T, dir string) []string {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range ents {
		names = append(names, e.Name())
	}
	return names
}

// The Brier table of the issue: pay(0.7) = 91 if frost, 51 if clear
// (derived by hand in contract/budget's TestQuadraticBrierTable).
func TestTableToStdout(t *testing.T) {
	t.Setenv("SOURCE_DATE_EPOCH", "1767225600") // 2026-01-01T00:00:00Z
	out, errs, code := tableRun(t, brierArgs...)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	for _, want := range []string{"| 0.7 | 0.3 | 91 | 51 |", "**A:** 100", "**B:** 50", "2026-01-01", "counsel"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	csvOut, _, code := tableRun(t, with(brierArgs, "--format", "csv")...)
	r := csv.NewReader(strings.NewReader(csvOut))
	r.Comment = '#'
	recs, err := r.ReadAll()
	if code != exitOK || err != nil || len(recs) != 12 || recs[8][2] != "91" || recs[8][3] != "51" {
		t.Errorf("csv: exit %d, err %v, records %v", code, err, recs)
	}
}

func TestTableOutOverwriteAndForce(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "annex.csv")
	if _, errs, code := tableRun(t, with(brierArgs, "--out", path)...); code != exitOK {
		t.Fatalf("first write: exit %d, %s", code, errs)
	}
	first, _ := os.ReadFile(path)
	// Same name again, other rounding: refused, old file intact.
	_, errs, code := tableRun(t, with(brierArgs, "--out", path, "--rounding", "down")...)
	if code != exitUsage || !strings.Contains(errs, "exists") || !strings.Contains(errs, "--force") {
		t.Errorf("overwrite without --force: exit %d, stderr %q", code, errs)
	}
	if now, _ := os.ReadFile(path); !bytes.Equal(now, first) {
		t.Errorf("the existing file changed")
	}
	_, errs, code = tableRun(t, with(brierArgs, "--out", path, "--unit", "0.5", "--force")...)
	if now, _ := os.ReadFile(path); code != exitOK || bytes.Equal(now, first) || !strings.Contains(string(now), "multiples of 0.5") {
		t.Errorf("--force did not replace the file: exit %d, %s", code, errs)
	}
	// Atomic writes leave no temporary files behind.
	if names := dirNames(t, dir); len(names) != 1 {
		t.Errorf("directory holds %v", names)
	}
}

func TestTableRefusedWritesNothing(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "annex.md")
	out, errs, code := tableRun(t, with(coarseArgs, "--out", path)...)
	if code != exitFailed {
		t.Fatalf("exit %d, want %d; stderr %s", code, exitFailed, errs)
	}
	if !strings.Contains(out, "FAILED") || !strings.Contains(out, "smallest margin 0") || !strings.Contains(errs, "nothing was written") {
		t.Errorf("refusal not explained:\n%s\n%s", out, errs)
	}
	if names := dirNames(t, dir); len(names) != 0 {
		t.Errorf("a refused table wrote %v", names)
	}
	// Refused to stdout too: the table itself is not printed.
	out, _, code = tableRun(t, coarseArgs...)
	if code != exitFailed || strings.Contains(out, "| 0.4 |") {
		t.Errorf("refused table printed (exit %d):\n%s", code, out)
	}
	// With --force it is written, with the warning in the file, and the
	// exit status still says the check failed.
	_, _, code = tableRun(t, with(coarseArgs, "--out", path, "--force")...)
	b, err := os.ReadFile(path)
	if code != exitFailed || err != nil || !strings.Contains(string(b), "**WARNING:**") {
		t.Errorf("forced export: exit %d, err %v, file:\n%s", code, err, b)
	}
}

func TestTableUnboundedRule(t *testing.T) {
	args := []string{"--outcomes", "frost,clear", "--preset", "log", "--floor", "0", "--cap", "50", "--step", "0.05"}
	_, errs, code := tableRun(t, args...)
	if code != exitUsage || !strings.Contains(errs, "--report-floor") || !strings.Contains(errs, "--clamp") || strings.Count(errs, "\n") != 1 {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
	if _, errs, code := tableRun(t, with(args, "--report-floor", "0.01")...); code != exitOK {
		t.Errorf("with a report floor: exit %d, %s", code, errs)
	}
	out, errs, code := tableRun(t, with(args, "--clamp", "0.01", "--json")...)
	var sum struct {
		Recheck  struct{ Passed bool }
		ClampGap *struct{ Max float64 } `json:"clamp_gap"`
		Output   struct{ Written bool }
	}
	if err := json.Unmarshal([]byte(out), &sum); err != nil || code != exitOK {
		t.Fatalf("exit %d, %v, %s", code, err, errs)
	}
	if sum.ClampGap == nil || !(sum.ClampGap.Max > 0) || sum.Output.Written {
		t.Errorf("clamp summary %+v", sum)
	}
}

func TestTableJSONSummary(t *testing.T) {
	out, _, code := tableRun(t, with(brierArgs, "--json")...)
	var sum struct {
		A, B    float64
		MaxPay  float64 `json:"max_pay"`
		Recheck struct {
			Passed    bool
			MinMargin float64 `json:"min_margin"`
		}
		Cells []struct{ Beliefs int }
	}
	if err := json.Unmarshal([]byte(out), &sum); err != nil || code != exitOK {
		t.Fatalf("exit %d, %v\n%s", code, err, out)
	}
	// A = 100, B = 50 (derived by hand, see contract/budget).
	if sum.A != 100 || sum.B != 50 || sum.MaxPay != 100 || !sum.Recheck.Passed || !(sum.Recheck.MinMargin > 0) || len(sum.Cells) != 11 {
		t.Errorf("summary %+v", sum)
	}
}

func TestTableFigureAndFormats(t *testing.T) {
	dir := t.TempDir()
	png1 := filepath.Join(dir, "pay.png")
	if _, errs, code := tableRun(t, with(brierArgs, "--out", png1)...); code != exitOK {
		t.Fatalf("png: exit %d %s", code, errs)
	}
	f, _ := os.Open(png1)
	defer f.Close()
	if _, err := png.Decode(f); err != nil {
		t.Errorf("png does not decode: %v", err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{with(brierArgs, "--format", "png"), "needs --out"},
		{with(brierArgs, "--format", "xls"), "not one of"},
		{with(brierArgs, "--out", filepath.Join(dir, "t.txt")), "cannot tell the format"},
		{with(brierArgs[:len(brierArgs)-4], "--unit", "1"), "--step"},
		{with(brierArgs, "--menu", "m.csv"), "not both"},
		{with(brierArgs, "--clamp", "0.6"), "clamp"},
		{with(brierArgs, "--out", filepath.Join(dir, "missing", "t.csv")), "no such file"},
	} {
		if _, errs, code := tableRun(t, c.args...); code != exitUsage || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q, want %q", c.args, code, errs, c.want)
		}
	}
	if names := dirNames(t, dir); len(names) != 1 {
		t.Errorf("failed runs left files: %v", names)
	}
}

func TestTableMenuFile(t *testing.T) {
	dir := t.TempDir()
	menu := filepath.Join(dir, "menu.csv")
	os.WriteFile(menu, []byte("# frost menu\n0.1\n0.5\n0.9\n"), 0o644)
	args := []string{"--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--unit", "1", "--menu", menu, "--format", "csv"}
	out, errs, code := tableRun(t, args...)
	// Menu 0.1, 0.5, 0.9: L ranges from 2·0.1² = 0.02 to 2·0.9² = 1.62, so
	// B = 100/1.6 = 62.5 and pay(0.5) = 100 - 62.5·(0.5 - 0.02) = 70
	// (derived by hand with the Brier efforts 2(1-p)² and 2p²).
	if code != exitOK || !strings.Contains(out, "0.5,0.5,70,70") {
		t.Errorf("exit %d, %s\n%s", code, errs, out)
	}
	os.WriteFile(menu, []byte("0.1\n0.5\nhalf\n"), 0o644)
	if _, errs, code := tableRun(t, args...); code != exitUsage || !strings.Contains(errs, "menu.csv:3") {
		t.Errorf("bad menu line: exit %d, %q", code, errs)
	}
}

// A design file carries rule and budget. The dairy's three-way outlook
// with the ranked probability rule, a mean payment of 40 at the reference
// (0.25, 0.5, 0.25) and a floor of 5: by hand, H(ref) = c1(1-c1) + c2(1-c2)
// with c = (0.25, 0.75) is 0.375, the largest effort (report "below" with
// certainty, "above" happens) is 1 + 1 = 2, so B = (40 - 5)/(2 - 0.375)
// and A = 5 + 2B (Epstein 1969's cumulative form, unnormalised).
func TestTableDesignFileMeanPay(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "dairy.toml")
	os.WriteFile(path, []byte(`version = 1
title = "Regional dairy: milk-yield outlook"
outcomes = ["below", "near", "above"]
ordered = true
mode = "generator"
preset = "ranked"
formula = "csum(c*(1-c))"

[budget]
floor = 5
mean_pay = 40
reference = [0.25, 0.5, 0.25]
step = 0.25
unit = 0.01
`), 0o644)
	out, errs, code := tableRun(t, "--design", path, "--json")
	var sum struct {
		A, B         float64
		ReferencePay float64 `json:"reference_pay"`
		MinPay       float64 `json:"min_pay"`
	}
	if err := json.Unmarshal([]byte(out), &sum); err != nil || code != exitOK {
		t.Fatalf("exit %d, %v, %s", code, err, errs)
	}
	B := 35 / 1.625
	if d := sum.B - B; d*d > 1e-18 || (sum.A-5-2*B)*(sum.A-5-2*B) > 1e-18 || (sum.ReferencePay-40)*(sum.ReferencePay-40) > 1e-18 || sum.MinPay != 5 {
		t.Errorf("summary %+v, want B = %g, A = %g, reference pay 40, smallest pay 5", sum, B, 5+2*B)
	}
	// Flags override the file: --cap replaces the file's mean_pay, so
	// payments span [5, 50] exactly (B = 45/2 with efforts from 0 to 2).
	out, errs, code = tableRun(t, "--design", path, "--cap", "50", "--json")
	sum.B = 0
	if err := json.Unmarshal([]byte(out), &sum); err != nil || code != exitOK || sum.B != 22.5 {
		t.Errorf("--cap over a mean-pay design: exit %d, %v, B = %g, %s", code, err, sum.B, errs)
	}
}

// A design file's own menu file and clamp are what the table is fitted
// on, as the workbench fits them. The menu 0.1, 0.5, 0.9 is the one of
// TestTableMenuFile, with the same pay 70 at 0.5 (derived by hand there);
// a clamp of 0.2 pays the report (0.1, 0.9) as (0.2, 0.9)/1.1 = (2/11,
// 9/11), so the efforts run from 2·(2/11)² = 8/121 to 2·(9/11)² = 162/121,
// B = 100·121/154 and pay(0.5) = 100 - 100·(60.5 - 8)/154 = 65.9, 66 in
// whole units (derived by hand with the Brier efforts 2(1-p)² and 2p²).
func TestTableDesignMenuAndClamp(t *testing.T) {
	dir := t.TempDir()
	menu := filepath.Join(dir, "menu.csv")
	os.WriteFile(menu, []byte("0.1\n0.5\n0.9\n"), 0o644)
	write := func(extra string) string {
		path := filepath.Join(dir, "frost.toml")
		os.WriteFile(path, []byte(`version = 1
outcomes = ["frost", "clear"]
mode = "generator"
preset = "quadratic"
formula = "1 - sum(p^2)"

[budget]
floor = 0
cap = 100
unit = 1
menu = "`+menu+`"
`+extra), 0o644)
		return path
	}
	out, errs, code := tableRun(t, "--design", write(""), "--format", "csv")
	if code != exitOK || !strings.Contains(out, "0.5,0.5,70,70") {
		t.Errorf("menu from the design: exit %d, %s\n%s", code, errs, out)
	}
	out, errs, code = tableRun(t, "--design", write("clamp = 0.2\n"), "--format", "csv")
	if code != exitOK || !strings.Contains(out, "0.5,0.5,66,66") {
		t.Errorf("clamp from the design: exit %d, %s\n%s", code, errs, out)
	}
	// Both a menu file and a step in one design is refused, naming both.
	_, errs, code = tableRun(t, "--design", write("step = 0.1\n"), "--format", "csv")
	if code == exitOK || !strings.Contains(errs, "menu") || !strings.Contains(errs, "step") {
		t.Errorf("menu and step: exit %d, %q", code, errs)
	}
	// The --step flag replaces the design's menu file.
	out, errs, code = tableRun(t, "--design", write(""), "--step", "0.5", "--format", "csv")
	if code != exitOK || !strings.Contains(out, "0.5,0.5,") || strings.Contains(out, "0.9,0.1") {
		t.Errorf("--step over a design menu: exit %d, %s\n%s", code, errs, out)
	}
}
