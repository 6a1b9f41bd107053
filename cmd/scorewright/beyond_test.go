package main

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"scorewright/generator/design"
)

func TestEvalEmphasis(t *testing.T) {
	cases := []struct {
		args      []string
		yes, no   float64
		warnings  int
		tolerance float64
	}{
		// Schervish (1989); check-values.md: -ln 0.3 = 1.203973, -ln 0.7 = 0.356675.
		{[]string{"--emphasis", "1/(c*(1-c))"}, 1.203973, 0.356675, 2, 5e-7},
		// Buja, Stuetzle & Shen (2005), a = b = -1/2: 2 sqrt((1-q)/q) and 2 sqrt(q/(1-q)).
		{[]string{"--preset", "beta", "--param", "a=-0.5", "--param", "b=-0.5"}, 2 * math.Sqrt(0.7/0.3), 2 * math.Sqrt(0.3/0.7), 2, 1e-9},
		// Same paper, a = b = 1: (1-q)^2/2 and q^2/2.
		{[]string{"--preset", "beta"}, 0.245, 0.045, 0, 1e-12},
	}
	for _, tc := range cases {
		args := append([]string{"eval", "--outcomes", "frost,clear", "--report", "0.3", "--json"}, tc.args...)
		code, out, errs := runCmd(t, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d, %s", tc.args, code, errs)
		}
		var got struct {
			Effort []float64 `json:"effort"`
			Notes  []string  `json:"notes"`
		}
		if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Fatalf("%v: %v\n%s", tc.args, err, out)
		}
		if math.Abs(got.Effort[0]-tc.yes) > tc.tolerance || math.Abs(got.Effort[1]-tc.no) > tc.tolerance {
			t.Errorf("%v: efforts %v, want %v, %v", tc.args, got.Effort, tc.yes, tc.no)
		}
		if len(got.Notes) != tc.warnings {
			t.Errorf("%v: notes %q, want %d", tc.args, got.Notes, tc.warnings)
		}
	}
}

func TestEmphasisRefused(t *testing.T) {
	for _, tc := range []struct{ weight, says string }{
		{"c - 0.5", "negative"},
		{"c^(-3)", "not integrable near c = 0"},
		{"q", `unknown name "q"`},
	} {
		code, _, errs := runCmd(t, "eval", "--outcomes", "2", "--report", "0.3", "--emphasis", tc.weight)
		if code != exitUsage || !strings.Contains(errs, tc.says) {
			t.Errorf("%s: exit %d, stderr %q; want 2 and %q", tc.weight, code, errs, tc.says)
		}
	}
}

func TestEvalPoint(t *testing.T) {
	// Squared error: D(y, x) = (y - x)^2; the belief 100, 150, 200 equally
	// likely has mean 150 (derived by hand).
	code, out, errs := runCmd(t, "eval", "--interval", "0,500", "--preset", "squared-error", "--report", "120", "--belief", "100,150,200", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		Effort []float64 `json:"effort"`
		Mean   float64   `json:"mean"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Effort) != 3 || got.Effort[0] != 400 || got.Effort[2] != 6400 || got.Mean != 150 {
		t.Errorf("got %+v", got)
	}
	for _, bad := range [][]string{
		{"--interval", "0,500", "--preset", "log", "--report", "1"},
		{"--interval", "0,500", "--generator", "-x^2", "--report", "600"},
		{"--interval", "5,1", "--generator", "-x^2", "--report", "2"},
		{"--interval", "0,5", "--generator", "-x^2", "--report", "2", "--belief", "1:0.5,2"},
	} {
		if code, _, _ := runCmd(t, append([]string{"eval"}, bad...)...); code != exitUsage {
			t.Errorf("%v: exit %d, want 2", bad, code)
		}
	}
}

// pointEnv returns an env writing into buffers.
func pointEnv() (*env, *bytes.Buffer) {
	var out bytes.Buffer
	return &env{stdin: strings.NewReader(""), stdout: &out, stderr: &out}, &out
}

func TestCheckAndAuditPoint(t *testing.T) {
	d := &design.Design{Version: 1, Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 500}}
	e, out := pointEnv()
	if err := checkDesign(e, d, &verifyFlags{resolution: 20, tolerance: 1e-9, asJSON: true}); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	var rep struct {
		Verdict string `json:"verdict"`
		Grid    struct {
			Resolution int `json:"resolution"`
		} `json:"grid"`
		Checks []struct {
			Name   string `json:"name"`
			Passed bool   `json:"passed"`
		} `json:"checks"`
		Gap *struct {
			Max float64 `json:"max"`
		} `json:"gap"`
		Identified *struct {
			Preset string  `json:"preset"`
			Scale  float64 `json:"scale"`
		} `json:"identified"`
	}
	if err := json.Unmarshal(out.Bytes(), &rep); err != nil || rep.Verdict != "strictly-proper" || rep.Grid.Resolution != 20 || len(rep.Checks) != 5 {
		t.Errorf("check: %v %+v", err, rep)
	}
	d.Formula = "x^2"
	e, out = pointEnv()
	if err := checkDesign(e, d, &verifyFlags{resolution: 10, tolerance: 1e-9}); err != errFailed || !strings.Contains(out.String(), "verdict: improper") {
		t.Errorf("convex generator: %v\n%s", err, out)
	}

	// A dairy pays 40 - 0.01 (x - y)^2 for a milk-yield forecast: recognised
	// as squared error with scale 0.01.
	e, out = pointEnv()
	if err := auditDesign(e, pointPayout("40 - 0.01*(x - y)^2"), &verifyFlags{resolution: 20, tolerance: 1e-9, asJSON: true}); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	rep.Identified = nil
	if err := json.Unmarshal(out.Bytes(), &rep); err != nil || rep.Verdict != "strictly-proper" || rep.Identified == nil || rep.Identified.Preset != "squared-error" || math.Abs(rep.Identified.Scale-0.01) > 1e-9 {
		t.Errorf("audit: %v %+v", err, rep)
	}
	e, out = pointEnv()
	if err := auditDesign(e, pointPayout("40 - abs(x - y)"), &verifyFlags{resolution: 20, tolerance: 1e-9, asJSON: true}); err != errFailed {
		t.Errorf("absolute error: %v\n%s", err, out)
	}
	if err := auditDesign(e, pointPayout("40 - abs(x - q)"), &verifyFlags{resolution: 20, tolerance: 1e-9, asJSON: true}); err == nil || !strings.Contains(err.Error(), "payout formula") {
		t.Errorf("bad payout formula: %v", err)
	}
}

func TestTablePoint(t *testing.T) {
	d := &design.Design{Version: 1, Mode: design.ModePoint, Formula: "-x^2", Interval: []float64{0, 10}, Budget: design.Budget{Floor: 0, Cap: 100, Step: 1}}
	e, out := pointEnv()
	if err := tableOf(e, newFlags("table"), d, "csv", &tableFlags{}); err != nil {
		t.Fatal(err)
	}
	// pay = 100 - (y - x)^2 (derived by hand: the worst cell has D = 100).
	if !strings.Contains(out.String(), "\n3,91,96,99,100,99,96,91,84,75,64,51\n") || !strings.Contains(out.String(), "counsel") {
		t.Errorf("table:\n%s", out)
	}
	path := t.TempDir() + "/dairy.csv"
	if err := tableOf(e, newFlags("table"), d, "json", &tableFlags{out: path}); err != nil {
		t.Fatal(err)
	}
	if err := tableOf(e, newFlags("table"), d, "json", &tableFlags{out: path}); err == nil || !strings.Contains(err.Error(), "--force") {
		t.Errorf("overwrote without --force: %v", err)
	}
	if err := tableOf(e, newFlags("table"), d, "json", &tableFlags{out: path, force: true}); err != nil {
		t.Errorf("--force: %v", err)
	}
}

func TestPointCommands(t *testing.T) {
	cases := []struct {
		args []string
		code int
		says string
	}{
		{[]string{"check", "--interval", "0,500", "--generator", "-x^2", "--resolution", "10"}, 0, "verdict: strictly-proper"},
		{[]string{"check", "--interval", "0,10", "--generator", "x^2", "--resolution", "10"}, 1, "verdict: improper"},
		{[]string{"audit", "--interval", "0,60", "--payout", "40 - abs(x - y)", "--resolution", "10"}, 1, "the mean is not the best report"},
		{[]string{"audit", "--interval", "0,60", "--payout", "40 - (x - y)^2/90", "--resolution", "10", "--json"}, 0, `"preset": "squared-error"`},
		// A step in litres, not a probability.
		{[]string{"table", "--interval", "0,60", "--preset", "squared-error", "--floor", "0", "--cap", "40", "--step", "10", "--format", "csv"}, 0, "qualified counsel"},
		{[]string{"table", "--interval", "0,60", "--preset", "squared-error", "--floor", "0", "--cap", "40", "--step", "100"}, 2, "at most the interval's width"},
		{[]string{"table", "--interval", "0,60", "--preset", "squared-error", "--floor", "0", "--mean-pay", "30"}, 2, "--floor and --cap"},
	}
	for _, tc := range cases {
		code, out, errs := runCmd(t, tc.args...)
		if code != tc.code || !strings.Contains(out+errs, tc.says) {
			t.Errorf("%v: exit %d, want %d and %q in\n%s%s", tc.args, code, tc.code, tc.says, out, errs)
		}
	}
}

func TestDistort(t *testing.T) {
	var got struct {
		B      float64   `json:"B"`
		Report []float64 `json:"report"`
		Points float64   `json:"points"`
		Curve  []struct {
			Points float64 `json:"points"`
		} `json:"curve"`
		Largest struct {
			Points float64 `json:"points"`
		} `json:"largest"`
	}
	base := []string{"distort", "--outcomes", "frost,clear", "--preset", "log", "--floor", "0", "--cap", "10", "--step", "0.05", "--report-floor", "0.01", "--belief", "0.8", "--json"}
	// Risk-neutral: no distortion anywhere on the curve.
	code, out, errs := runCmd(t, append(base, "--utility", "linear")...)
	if code != 0 || json.Unmarshal([]byte(out), &got) != nil {
		t.Fatalf("exit %d: %s %s", code, errs, out)
	}
	if got.Points > 1e-5 || got.Largest.Points > 1e-5 || len(got.Curve) != 99 {
		t.Errorf("linear utility: %+v", got)
	}
	// CARA with the log rule: the report's odds are the belief's odds to
	// the power 1/(1 + aB) (derived by hand in contract/risk's tests).
	code, out, errs = runCmd(t, append(base, "--utility", "cara:0.3")...)
	if code != 0 || json.Unmarshal([]byte(out), &got) != nil {
		t.Fatalf("exit %d: %s %s", code, errs, out)
	}
	odds := math.Pow(4, 1/(1+0.3*got.B))
	if want := odds / (1 + odds); math.Abs(got.Report[0]-want) > 1e-7 {
		t.Errorf("CARA: report %v, want %v (B = %v)", got.Report, want, got.B)
	}
	for _, bad := range [][]string{
		{"--utility", "crra:2"}, // no wealth: final wealth can be 0
		{"--utility", "power:2"},
		{},
	} {
		if code, _, _ := runCmd(t, append(base, bad...)...); code != exitUsage {
			t.Errorf("%v: exit %d, want 2", bad, code)
		}
	}
}

func TestTableLottery(t *testing.T) {
	// Quadratic rule on the menu 0, 0.25, ..., 1 paid in [10, 50]:
	// pay = 50 - 20 L with L = 2 (1 - p_k)^2 (Brier 1950, binary form
	// doubled), so report 0.25 pays 50 - 40·0.5625 = 27.5 if frost
	// happens, a chance (27.5 - 10)/40 = 0.4375, drawn in whole
	// thousandths as 0.438 (halves away from zero; derived by hand).
	code, out, errs := runCmd(t, "table", "--outcomes", "frost,clear", "--preset", "quadratic", "--floor", "10", "--cap", "50", "--step", "0.25", "--lottery", "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"chance if frost", "0.25,0.75,0.438,0.938", "whole number from 1 to 1000", "Hossain & Okui 2013", "gambling"} {
		if !strings.Contains(out, want) {
			t.Errorf("lottery table lacks %q:\n%s", want, out)
		}
	}
	code, out, errs = runCmd(t, "table", "--interval", "0,60", "--preset", "squared-error", "--floor", "0", "--cap", "40", "--step", "20", "--lottery", "--format", "csv")
	if code != 0 || !strings.Contains(out, "\n0,1.000,0.990,0.960,") || !strings.Contains(out, "gambling") {
		t.Errorf("point lottery table: exit %d %s\n%s", code, errs, out)
	}
}

func TestCheckEmphasis(t *testing.T) {
	// The beta family with a = 2, b = 3 has w = c (1-c)^2 > 0 inside (0, 1)
	// and is integrable at both ends: a bounded, strictly proper rule
	// (Buja, Stuetzle & Shen 2005).
	code, out, errs := runCmd(t, "check", "--outcomes", "frost,clear", "--preset", "beta", "--param", "a=2", "--param", "b=3", "--resolution", "200")
	if code != 0 || !strings.Contains(out, "strictly-proper") {
		t.Errorf("exit %d: %s%s", code, out, errs)
	}
}

// TestDistortUnboundedOffersOnlyItsFlags: distort has no --clamp, so the
// log rule on a menu that reaches 0 is refused with the one way out it
// takes, --report-floor, on one line.
func TestDistortUnboundedOffersOnlyItsFlags(t *testing.T) {
	code, _, errs := runCmd(t, "distort", "--outcomes", "frost,clear", "--preset", "log", "--floor", "0", "--cap", "100", "--step", "0.05", "--utility", "crra:2", "--wealth", "10")
	if code != 2 || !strings.Contains(errs, "--report-floor") || strings.Contains(errs, "clamp") || strings.Count(errs, "\n") != 1 {
		t.Errorf("exit %d, stderr %q", code, errs)
	}
}

// pointPayout is the design `audit --interval 0,60 --payout src` audits.
func pointPayout(src string) *design.Design {
	return &design.Design{Version: 1, Mode: design.ModePointPayout, Interval: []float64{0, 60}, Formula: src}
}
