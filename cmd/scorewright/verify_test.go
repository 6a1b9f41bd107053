package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// verifyJSON is the part of the check/audit JSON the contract fixes.
type verifyJSON struct {
	Verdict string `json:"verdict"`
	Grid    struct {
		Resolution int     `json:"resolution"`
		Points     int     `json:"points"`
		Tolerance  float64 `json:"tolerance"`
	} `json:"grid"`
	Checks []struct {
		Name   string          `json:"name"`
		Passed bool            `json:"passed"`
		Worst  json.RawMessage `json:"worst"`
		At     struct {
			Belief []float64 `json:"belief"`
			Report []float64 `json:"report"`
		} `json:"at"`
	} `json:"checks"`
	Gap *struct {
		Max        float64   `json:"max"`
		Belief     []float64 `json:"belief"`
		BestReport []float64 `json:"best_report"`
	} `json:"gap"`
	Identified *struct {
		Preset string             `json:"preset"`
		Scale  float64            `json:"scale"`
		Shift  float64            `json:"shift"`
		Params map[string]float64 `json:"params"`
	} `json:"identified"`
}

func TestCheckCommand(t *testing.T) {
	code, out, errs := runCmd(t, "check", "--outcomes", "below,near,above", "--preset", "quadratic", "--resolution", "30", "--json")
	if code != 0 {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var v verifyJSON
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	// C(32, 2) = 496 points at K = 30 (derived by hand).
	if v.Verdict != "strictly-proper" || v.Grid.Resolution != 30 || v.Grid.Points != 496 || v.Grid.Tolerance != 1e-9 {
		t.Errorf("verdict %s grid %+v", v.Verdict, v.Grid)
	}
	names := map[string]bool{}
	for _, c := range v.Checks {
		names[c.Name] = c.Passed
	}
	for _, n := range []string{"concavity", "properness", "nonnegativity", "affinity", "boundedness"} {
		if pass, ok := names[n]; !ok || !pass {
			t.Errorf("check %s: present %v, passed %v", n, ok, pass)
		}
	}
	if errs != "" {
		t.Errorf("stderr not clean when it is not a terminal: %q", errs)
	}

	// A generator concave on only part of (0, 1) (h'' = 2 - 48 (p - 1/2)^2,
	// positive near 1/2, derived by hand) fails with exit 1.
	code, out, _ = runCmd(t, "check", "--outcomes", "frost,clear", "--generator", "p^2 - 4*(p - 0.5)^4")
	if code != 1 || !strings.Contains(out, "verdict: improper") || !strings.Contains(out, "evidence, not a proof") {
		t.Errorf("exit %d:\n%s", code, out)
	}
	for _, want := range []string{"resolution 1000", "1001 points", "tolerance 1e-09"} {
		if !strings.Contains(out, want) {
			t.Errorf("human output lacks %q", want)
		}
	}
}

func TestAuditCommand(t *testing.T) {
	// Linear payout, n = 2: gap 1/8 at (3/4, 1/4), best report (1, 0)
	// (derived by hand: gap = t - t^2 - (1-t)^2 is largest at t = 3/4).
	code, out, errs := runCmd(t, "audit", "--outcomes", "2", "--payout", "p[y]", "--json")
	if code != 1 {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var v verifyJSON
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if v.Verdict != "improper" || v.Gap == nil || math.Abs(v.Gap.Max-0.125) > 1e-9 ||
		math.Abs(v.Gap.Belief[0]-0.75) > 1e-4 || math.Abs(v.Gap.BestReport[0]-1) > 1e-6 {
		t.Errorf("verdict %s gap %+v", v.Verdict, v.Gap)
	}
	if v.Identified != nil {
		t.Errorf("the linear rule identified as %+v", v.Identified)
	}
	// Scaled quadratic (Brier 1950 effort): pay = 10 - 5 L, so scale 5,
	// shift 10 — the example in the command-line contract.
	code, out, _ = runCmd(t, "audit", "--outcomes", "3", "--payout", "10 - 5*sum((p - hit)^2)", "--resolution", "40", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	v = verifyJSON{}
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatal(err)
	}
	if v.Verdict != "strictly-proper" || v.Identified == nil || v.Identified.Preset != "quadratic" ||
		math.Abs(v.Identified.Scale-5) > 1e-9 || math.Abs(v.Identified.Shift-10) > 1e-9 {
		t.Errorf("verdict %s identified %+v", v.Verdict, v.Identified)
	}
	if v.Identified != nil && v.Identified.Params != nil {
		t.Errorf("the quadratic rule has no fitted parameter: %+v", v.Identified)
	}
	// The power score of Gneiting & Raftery (2007, Sec. 3) at g = 1.5,
	// S = 1.5 p_y^0.5 - 0.5 sum p^1.5, is 1 + (g - 1) × the power
	// preset's score (its generator is divided by g - 1; derived by hand
	// in verify's TestIdentifyFittedParameter), so 2 S = 2 + 1 × score.
	const powerPay = "2*(1.5*p[y]^0.5 - 0.5*sum(p^1.5))"
	code, out, _ = runCmd(t, "audit", "--outcomes", "3", "--payout", powerPay, "--resolution", "30", "--json")
	v = verifyJSON{}
	if err := json.Unmarshal([]byte(out), &v); err != nil || code != 0 {
		t.Fatalf("exit %d, %v", code, err)
	}
	if id := v.Identified; id == nil || id.Preset != "power" || math.Abs(id.Params["g"]-1.5) > 1e-6 || math.Abs(id.Scale-1) > 1e-6 || math.Abs(id.Shift-2) > 1e-6 {
		t.Errorf("power 1.5: identified %+v", v.Identified)
	}
	code, out, _ = runCmd(t, "audit", "--outcomes", "3", "--payout", powerPay, "--resolution", "30")
	if want := `identified: pay = 2 + 1 × score of preset "power" with g = 1.5,`; code != 0 || !strings.Contains(out, want) {
		t.Errorf("exit %d, no %q in:\n%s", code, want, out)
	}
	code, out, _ = runCmd(t, "audit", "--outcomes", "frost,clear", "--payout", "p[y]^2", "--resolution", "100")
	if code != 1 || !strings.Contains(out, "exaggerates") || !strings.Contains(out, "caution:") {
		t.Errorf("exit %d:\n%s", code, out)
	}
}

func TestVerifyUsageErrors(t *testing.T) {
	cases := [][]string{
		{"audit", "--outcomes", "2"},
		{"audit", "--outcomes", "2", "--payout", "p[y] + q"},
		{"audit", "--payout", "p[y]"},
		{"audit", "--outcomes", "2", "--payout", "p[y]", "--resolution", "-3"},
		{"check", "--outcomes", "3", "--generator", "1 - sum(p^2", "--json"},
		{"check", "--outcomes", "3", "--preset", "quadratic", "--tolerance", "0"},
		{"check", "--outcomes", "3"},
	}
	for _, args := range cases {
		code, out, errs := runCmd(t, args...)
		if code != 2 || out != "" || strings.Count(errs, "\n") != 1 {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want exit 2 with one line on stderr", args, code, out, errs)
		}
	}
	_, _, errs := runCmd(t, "audit", "--outcomes", "2", "--payout", "p[y] + q")
	if !strings.Contains(errs, "1:8") || !strings.Contains(errs, `"q"`) {
		t.Errorf("formula error %q should give line:column and the name", errs)
	}
}

// A fitted shift that is zero within the fit's residual reads as 0: the
// log payout ln p_y is the log rule's score itself (Good 1952), shift 0,
// scale 1.
func TestAuditShiftShownAsZero(t *testing.T) {
	code, out, _ := runCmd(t, "audit", "--outcomes", "3", "--payout", "ln(p[y])")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	if !strings.Contains(out, `identified: pay = 0 + 1 × score of preset "log"`) {
		t.Errorf("identification line:\n%s", out)
	}
}
