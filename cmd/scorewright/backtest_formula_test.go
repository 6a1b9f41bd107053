package main

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// Without --step or --menu every forecast is paid by the exact formula at
// the forecast as written, and the output says so. Quadratic rule, floor
// 0, cap 10: the effort spans [0, 2] (a certain forecast, right or wrong),
// so pay = 10 - 5·effort; the first row (Tern gives "late" 0.141659, the
// crossing is on time) has effort 2·0.141659² and pays 10 - 10·0.141659²
// (derived by hand), not the pay of a nearby menu item.
func TestBacktestPaysByFormulaWithoutMenu(t *testing.T) {
	dir := t.TempDir()
	payOut := filepath.Join(dir, "pay.csv")
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb}
	args := []string{"--outcomes", "late,on time", "--preset", "quadratic", "--floor", "0", "--cap", "10",
		"--history", "../../testdata/histories/ferry-departures.csv", "--pay-out", payOut}
	if code := exitCode(e, "backtest", runBacktest(e, args)); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	if !strings.Contains(out.String(), "every forecast is paid by the exact formula at the forecast as written") ||
		!strings.Contains(out.String(), "menu: none: reports are paid by the exact formula") {
		t.Errorf("output does not say the forecasts are paid by the formula:\n%s", out.String())
	}
	recs := readRecords(t, payOut)
	pay, _ := strconv.ParseFloat(recs[1][4], 64)
	if want := 10 - 10*0.141659*0.141659; math.Abs(pay-want) > 1e-9 || recs[1][1] != "Tern" || recs[1][6] != "true" {
		t.Errorf("first row %v: pay %.12g, want %.12g by the formula, on menu true (there is no menu)", recs[1], pay, want)
	}
}

// Many forecasters: the report details the best and worst ten and says
// how to get every one; --forecasters-out writes all of them.
func TestBacktestManyForecasters(t *testing.T) {
	dir := t.TempDir()
	hist := filepath.Join(dir, "many.csv")
	var b strings.Builder
	b.WriteString("forecaster,question,outcome,frost,clear\n")
	for i := range 50 {
		for q := range 3 {
			fmt.Fprintf(&b, "F%02d,n%d,%s,%g,%g\n", i, q, []string{"frost", "clear"}[q%2], 0.02*float64(i), 1-0.02*float64(i))
		}
	}
	if err := os.WriteFile(hist, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	args := append(append([]string{}, frostRule...), "--history", hist)
	code, out, stderr := runBacktestCmd(t, args...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, "50 forecasters: listed are the 10 best and 10 worst by mean pay under rule A; --forecasters-out FILE.csv writes every one") {
		t.Errorf("no note about the forecasters left out:\n%s", out)
	}
	if strings.Count(out, "\n  F") > 3*20 {
		t.Errorf("report lists more than the 20 forecasters it should")
	}
	all := filepath.Join(dir, "all.csv")
	if code, _, stderr := runBacktestCmd(t, append(args, "--forecasters-out", all)...); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if recs := readRecords(t, all); len(recs) != 51 || recs[1][0] != "F00" || recs[50][0] != "F49" {
		t.Errorf("forecasters file: %d records", len(recs))
	}
}
