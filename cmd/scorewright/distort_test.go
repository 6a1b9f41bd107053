package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

type distortOut struct {
	Report     []float64 `json:"report"`
	MenuReport []float64 `json:"menu_report"`
	Expected   float64   `json:"expected_pay"`
	Pay        string    `json:"pay"`
	Curve      []struct {
		Belief []float64 `json:"belief"`
		Report []float64 `json:"report"`
	} `json:"curve"`
	Failed []struct {
		Why string `json:"why"`
	} `json:"failed"`
}

func distortJSONOf(t *testing.T, args ...string) distortOut {
	t.Helper()
	code, out, errs := runCmd(t, append([]string{"distort", "--json"}, args...)...)
	var got distortOut
	if code != 0 || json.Unmarshal([]byte(out), &got) != nil {
		t.Fatalf("%v: exit %d: %s %s", args, code, errs, out)
	}
	return got
}

// The case: quadratic rule on [0, 100], CARA 0.01, belief 0.3:
// best report 0.361273 (brute force and the first-order condition in
// contract/risk's TestQuadraticCARAIssueCase), where the optimiser once
// stopped with exit 2.
func TestDistortQuadraticCARA(t *testing.T) {
	got := distortJSONOf(t, "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.01", "--utility", "cara:0.01", "--belief", "0.3")
	if math.Abs(got.Report[0]-0.361273) > 5e-7 || got.MenuReport[0] != 0.36 || len(got.Failed) != 0 || len(got.Curve) != 99 {
		t.Errorf("report %v, menu pick %v, %d failed, %d curve points", got.Report, got.MenuReport, len(got.Failed), len(got.Curve))
	}
}

// Risk-seeking CARA (cara:-1, cara:-1e6) once printed a best report of
// (0.5, 0.5) beside a menu pick of (0, 1) with exit 0. A forecaster this
// risk-seeking stakes all on the likelier outcome (derived by hand in
// contract/risk's TestRiskSeekingCorner): report (0, 1) for belief 0.3,
// expected pay 70, and the menu pick is the same item; along the whole
// curve report and menu pick lie on the same side of the belief.
func TestDistortRiskSeekingCARA(t *testing.T) {
	for _, u := range []string{"cara:-1", "cara:-1e6", "cara:-0.02", "crra:-1"} {
		got := distortJSONOf(t, "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.05", "--utility", u, "--belief", "0.3", "--wealth", "100")
		if u == "cara:-1" || u == "cara:-1e6" {
			if got.Report[0] != 0 || got.MenuReport[0] != 0 || math.Abs(got.Expected-70) > 1e-9 {
				t.Errorf("%s: report %v, menu pick %v, expected pay %v; want (0, 1), (0, 1), 70", u, got.Report, got.MenuReport, got.Expected)
			}
		}
		if got.Report[0] > 0.3 || got.MenuReport[0] > 0.3 {
			t.Errorf("%s: belief 0.3, report %v, menu pick %v: risk seeking moves away from 1/2", u, got.Report, got.MenuReport)
		}
		for _, p := range got.Curve {
			q, r := p.Belief[0], p.Report[0]
			if q != 0.5 && (r-0.5)*(q-0.5) < 0 {
				t.Errorf("%s: belief %v, report %v on the other side of 1/2", u, q, r)
			}
		}
	}
}

// Without --step there is no menu: reports are paid by the exact formula,
// the output says so, and there is no menu pick (issue 13).
func TestDistortWithoutStep(t *testing.T) {
	got := distortJSONOf(t, "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--utility", "cara:0.01", "--belief", "0.3")
	if math.Abs(got.Report[0]-0.361273) > 5e-7 || got.MenuReport != nil || !strings.Contains(got.Pay, "exact formula") {
		t.Errorf("report %v, menu pick %v, pay %q", got.Report, got.MenuReport, got.Pay)
	}
	code, out, errs := runCmd(t, "distort", "--outcomes", "3", "--preset", "log", "--floor", "0", "--cap", "10", "--report-floor", "0.01", "--utility", "crra:2", "--wealth", "5")
	if code != 0 || !strings.Contains(out, "no menu") || strings.Contains(out, "; menu pick") {
		t.Errorf("n = 3 without a step: exit %d %s\n%s", code, errs, out)
	}
}

// CRRA below 1 is defined at zero wealth (u(0) = 0): crra:0.5 with no
// initial wealth and a zero floor runs; crra:2 there is refused (exit 2).
func TestDistortCRRAAtZeroWealth(t *testing.T) {
	got := distortJSONOf(t, "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--step", "0.05", "--utility", "crra:0.5", "--belief", "0.3")
	if !(got.Report[0] > 0.3 && got.Report[0] < 0.5) {
		t.Errorf("crra:0.5 at zero wealth: report %v, want shaded toward 1/2", got.Report)
	}
	if code, _, _ := runCmd(t, "distort", "--outcomes", "2", "--preset", "quadratic", "--floor", "0", "--cap", "100", "--utility", "crra:2"); code != exitUsage {
		t.Errorf("crra:2 at zero wealth: exit %d, want 2", code)
	}
}
