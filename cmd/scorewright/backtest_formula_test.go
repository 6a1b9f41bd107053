package main

import (
	"bytes"
	"encoding/json"
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
	// The JSON's reliability curves: the 20 listed, or with --all-curves
	// all 50 (and the SVG figure draws as many).
	for _, c := range []struct {
		extra []string
		want  int
	}{{nil, 20}, {[]string{"--all-curves"}, 50}} {
		fig := filepath.Join(dir, fmt.Sprintf("fig%d.svg", c.want))
		code, out, stderr := runBacktestCmd(t, append(append(args, "--json", "--figure", fig), c.extra...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var rep struct {
			Reliability []struct{ Forecaster string }
		}
		if err := json.Unmarshal([]byte(out), &rep); err != nil {
			t.Fatal(err)
		}
		if len(rep.Reliability) != c.want || rep.Reliability[0].Forecaster != "F00" {
			t.Errorf("%v: %d curves in the JSON, want %d", c.extra, len(rep.Reliability), c.want)
		}
		svg, _ := os.ReadFile(fig)
		if n := strings.Count(string(svg), ">F"); n < c.want {
			t.Errorf("%v: the figure names %d forecasters, want %d", c.extra, n, c.want)
		}
	}
}

// With no menu nothing is off it: the report has no off-menu column of
// zeros, and its budget and totals speak of the budget, not of a menu or
// a table; --forecasters-out has no off-menu column either. On a menu
// (--step) the column and the table's words are back.
func TestBacktestWithoutMenuSaysNoMenu(t *testing.T) {
	dir := t.TempDir()
	base := []string{"--outcomes", "late,on time", "--preset", "quadratic", "--floor", "0", "--cap", "10",
		"--history", "../../testdata/histories/ferry-departures.csv"}
	run := func(name string, extra ...string) (string, []string) {
		all := filepath.Join(dir, name)
		code, out, stderr := runBacktestCmd(t, append(append(base, "--forecasters-out", all), extra...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		return out, readRecords(t, all)[0]
	}
	out, head := run("formula.csv")
	for _, bad := range []string{"off menu", "over the menu", "table's"} {
		if strings.Contains(out, bad) {
			t.Errorf("the report without a menu says %q:\n%s", bad, out)
		}
	}
	if strings.Contains(strings.Join(head, ","), "off menu") {
		t.Errorf("--forecasters-out without a menu has an off-menu column: %q", head)
	}
	if !strings.Contains(out, "every payment within the budget's range") {
		t.Errorf("the totals do not speak of the budget:\n%s", out)
	}
	out, head = run("menu.csv", "--step", "0.1")
	if !strings.Contains(out, "off menu") || !strings.Contains(out, "over the menu") || !strings.Contains(strings.Join(head, ","), "off menu A") {
		t.Errorf("on a menu the off-menu column and the menu's words are missing:\n%s\n%q", out, head)
	}
}
