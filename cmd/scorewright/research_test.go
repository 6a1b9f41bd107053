package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"scorewright/generator/design"
)

func researchJSONRun(t *testing.T, args ...string) researchJSON {
	t.Helper()
	code, out, errOut := runCmd(t, append([]string{"research", "--json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var j researchJSON
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	return j
}

func ruleNamed(t *testing.T, j researchJSON, name string) researchRuleJSON {
	t.Helper()
	for _, r := range j.Rules {
		if r.Name == name {
			return r
		}
	}
	t.Fatalf("no rule %q in %v", name, j.Rules)
	return researchRuleJSON{}
}

// The quadratic rule on [0, 100] has B = 50, and under a Beta posterior
// with mean 0.3 and kappa 20 research is worth 50·2·0.3·0.7/21 = 1 per
// forecast (derived by hand from the Beta variance); 120 forecasts a season
// make 120. The best rule is V-shaped with gain (MAD/2)·100/0.7.
func TestResearchCommand(t *testing.T) {
	j := researchJSONRun(t, "--outcomes", "frost,clear", "--base-rate", "0.3,0.7", "--kappa", "20",
		"--floor", "0", "--cap", "100", "--step", "0.05", "--compare", "quadratic", "--forecasts", "120", "--cost", "0.5")
	q := ruleNamed(t, j, "quadratic")
	if math.Abs(float64(q.Gain)-1) > 1e-10 || math.Abs(float64(q.Season.Gain)-120) > 1e-8 || q.Steps == nil {
		t.Errorf("quadratic: %+v", q)
	}
	best := ruleNamed(t, j, "best for research")
	if j.Optimum == nil || len(j.Optimum.Pieces) != 2 || !strings.HasPrefix(best.Verdict, "proper") {
		t.Fatalf("optimum: %+v, verdict %q", j.Optimum, best.Verdict)
	}
	a, b := 6.0, 14.0
	la, _ := math.Lgamma(a)
	lb, _ := math.Lgamma(b)
	lab, _ := math.Lgamma(a + b)
	mad := math.Exp(math.Ln2 + a*math.Log(a) + b*math.Log(b) - (la + lb - lab) - (a+b+1)*math.Log(a+b))
	if want := mad / 2 * 100 / 0.7; math.Abs(float64(best.Gain)-want) > 1e-6 {
		t.Errorf("best gain %g, want %g", best.Gain, want)
	}
	if mix := ruleNamed(t, j, "best + 10% quadratic"); !strings.HasPrefix(mix.Verdict, "strictly-proper") || !(mix.Gain < best.Gain) {
		t.Errorf("mix: %+v", mix)
	}
}

// The best rule written as a design opens as one: the table command fits
// it to the same budget.
func TestResearchWritesDesign(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "best.toml")
	args := []string{"research", "--outcomes", "3", "--base-rate", "0.2,0.3,0.5", "--kappa", "8", "--floor", "0", "--cap", "50", "--step", "0.1", "--compare", "none", "--out", out}
	if code, _, errOut := runCmd(t, args...); code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	d, err := design.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(d.Title, "optimised for research") || !strings.HasPrefix(d.Formula, "-max(") {
		t.Errorf("design %+v", d)
	}
	// The best rule ties (reports on one side of a bend pay the same in
	// expectation), so its table fails the menu re-check; the mix with
	// the quadratic rule is strictly proper and its table passes.
	if code, _, errOut := runCmd(t, "table", "--design", out); code != 1 || !strings.Contains(errOut, "re-check") {
		t.Errorf("table of the best rule: exit %d: %s", code, errOut)
	}
	// No overwrite without --force.
	if code, _, errOut := runCmd(t, args...); code != 2 || !strings.Contains(errOut, "--force") {
		t.Errorf("second write: exit %d: %s", code, errOut)
	}
	if code, _, errOut := runCmd(t, append(args, "--force", "--write-mix", "--mix", "0.3")...); code != 0 {
		t.Errorf("forced mix: exit %d: %s", code, errOut)
	}
	if code, _, errOut := runCmd(t, "table", "--design", out); code != 0 {
		t.Errorf("table of the mix: exit %d: %s", code, errOut)
	}
}

func TestResearchModels(t *testing.T) {
	hist := filepath.Join(t.TempDir(), "h.csv")
	if err := os.WriteFile(hist, []byte("forecaster,question,outcome,frost,clear\nann,q1,frost,0.2,0.8\nann,q2,clear,0.6,0.4\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	// Posteriors 0.2 and 0.6 around their mean 0.4: quadratic E[D] =
	// 2·0.2² = 0.08, gain 50·0.08 = 4 on [0, 100] (derived by hand).
	j := researchJSONRun(t, "--outcomes", "frost,clear", "--model", "history", "--history", hist, "--floor", "0", "--cap", "100", "--step", "0.05", "--compare", "quadratic", "--no-optimum")
	if q := ruleNamed(t, j, "quadratic"); math.Abs(float64(q.Gain)-4) > 1e-12 || j.Optimum != nil {
		t.Errorf("history: %+v", q)
	}
	// A binary signal of accuracy 0.8 from 1/2: posteriors 0.8 and 0.2,
	// E[D] = 2·0.3² = 0.18, gain 9 (Bayes' rule, by hand).
	j = researchJSONRun(t, "--outcomes", "2", "--model", "signal", "--accuracy", "0.8", "--floor", "0", "--cap", "100", "--step", "0.05", "--compare", "quadratic")
	if q := ruleNamed(t, j, "quadratic"); math.Abs(float64(q.Gain)-9) > 1e-12 {
		t.Errorf("signal: %+v", q)
	}
}

func TestResearchErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--floor", "0", "--cap", "10", "--step", "0.1"}, "--outcomes is required"},
		{[]string{"--outcomes", "2", "--floor", "0", "--cap", "10"}, "--step"},
		{[]string{"--outcomes", "2", "--floor", "0", "--mean-pay", "5", "--step", "0.1"}, "--cap"},
		{[]string{"--outcomes", "2", "--floor", "0", "--cap", "10", "--step", "0.1", "--model", "signal"}, "--accuracy"},
		{[]string{"--outcomes", "2", "--floor", "0", "--cap", "10", "--step", "0.1", "--model", "guess"}, "--model"},
		{[]string{"--outcomes", "2", "--floor", "0", "--cap", "10", "--step", "0.1", "--kappa", "-1"}, "kappa"},
		{[]string{"--outcomes", "3", "--floor", "0", "--cap", "10", "--step", "0.1", "--cost", "1"}, "yes/no"},
		{[]string{"--outcomes", "2", "--floor", "0", "--cap", "10", "--step", "0.1", "--mix", "1"}, "--mix"},
		{[]string{"--outcomes", "2", "--floor", "0", "--cap", "10", "--step", "0.1", "--grid", "100000"}, "--grid"},
		{[]string{"--outcomes", "2", "--preset", "log", "--floor", "0", "--cap", "10", "--step", "0.1"}, "--report-floor"},
		{[]string{"--outcomes", "2", "--floor", "0", "--cap", "10", "--step", "0.1", "--model", "history", "--history", "/nonexistent.csv"}, "--history"},
	} {
		code, _, errOut := runCmd(t, append([]string{"research"}, c.args...)...)
		if code != 2 || !strings.Contains(errOut, c.want) || strings.Count(strings.TrimSpace(errOut), "\n") > 0 {
			t.Errorf("%v: exit %d, stderr %q, want one line with %q", c.args, code, errOut, c.want)
		}
	}
}

// A base rate beyond the menu's last item (0.999 on a 1 %-floored menu):
// the best rule's piece beyond 0.99 is still fitted inside the budget
// (B = 1), and its gain is the V-shaped value (MAD/2)·50/0.999, derived by
// hand as in TestResearchCommand.
func TestResearchBaseRateBeyondMenu(t *testing.T) {
	j := researchJSONRun(t, "--outcomes", "2", "--base-rate", "0.999,0.001", "--kappa", "3", "--floor", "-20", "--cap", "30",
		"--step", "0.05", "--report-floor", "0.01", "--compare", "none")
	best := ruleNamed(t, j, "best for research")
	a, b := 3*0.999, 3*0.001
	la, _ := math.Lgamma(a)
	lb, _ := math.Lgamma(b)
	lab, _ := math.Lgamma(a + b)
	mad := math.Exp(math.Ln2 + a*math.Log(a) + b*math.Log(b) - (la + lb - lab) - (a+b+1)*math.Log(a+b))
	if want := mad / 2 * 50 / 0.999; math.Abs(float64(best.B)-1) > 1e-9 || math.Abs(float64(best.Gain)-want) > 1e-6 {
		t.Errorf("best: B %g, gain %g; want B 1, gain %g", best.B, best.Gain, want)
	}
}

// research --design takes the design's contract base rate as the belief
// before research, as the annex prices the contract at it; --base-rate
// still overrides it.
func TestResearchTakesTheContractBaseRate(t *testing.T) {
	path := filepath.Join(t.TempDir(), "d.toml")
	src := "version = 1\noutcomes = [\"ice\", \"open\"]\nmode = \"generator\"\nformula = \"1 - sum(p^2)\"\n\n[budget]\nfloor = 0\ncap = 100\nstep = 0.1\n\n[contract]\nbase_rate = [0.3, 0.7]\n"
	if err := os.WriteFile(path, []byte(src), 0o600); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		extra []string
		want  float64
	}{{nil, 0.3}, {[]string{"--base-rate", "0.4,0.6"}, 0.4}} {
		args := append([]string{"research", "--design", path, "--kappa", "20", "--json"}, c.extra...)
		code, out, stderr := runCmd(t, args...)
		if code != 0 {
			t.Fatalf("%v: exit %d, stderr %s", c.extra, code, stderr)
		}
		var got struct {
			BaseRate []float64 `json:"base_rate"`
		}
		if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Fatal(err)
		}
		if len(got.BaseRate) != 2 || math.Abs(got.BaseRate[0]-c.want) > 1e-12 {
			t.Errorf("%v: base rate %v, want (%g, %g)", c.extra, got.BaseRate, c.want, 1-c.want)
		}
	}
}

// research --design on a design whose budget names a menu file (and no
// step) compares the rules on that menu, as table --design fits on it,
// instead of asking for --step; --step still asks for the step menu. By
// hand, quadratic rule on [5, 45], menu 0.25, 0.75: the loss sum (p_i -
// [i = k])^2 runs from 1/8 to 9/8, so B = 40; on the step-1/2 menu from 0
// to 2, so B = 20.
func TestResearchUsesTheDesignsMenuFile(t *testing.T) {
	path := writeMenuDesign(t, "0.25\n0.75\n", "floor = 5\ncap = 45\n")
	code, out, stderr := runCmd(t, "research", "--design", path, "--kappa", "8", "--compare", "none", "--no-optimum")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(out, "on 2 reports listed in m.csv (the design's menu file)") {
		t.Errorf("the design's menu is not named:\n%s", out)
	}
	for _, c := range []struct {
		args []string
		b    float64
	}{{nil, 40}, {[]string{"--step", "0.5"}, 20}} {
		j := researchJSONRun(t, append([]string{"--design", path, "--kappa", "8", "--compare", "none", "--no-optimum"}, c.args...)...)
		if len(j.Rules) != 1 || math.Abs(float64(j.Rules[0].B)-c.b) > 1e-9 {
			t.Errorf("%v: rules %+v, want B = %g", c.args, j.Rules, c.b)
		}
	}
}

// The season totals count the contract's forecasts when --forecasts is
// not given (12 here), one without a contract, and --forecasts when it is;
// a season's gain is that many forecasts' gain (derived by hand: the
// totals are per-forecast figures times the count).
func TestResearchSeasonIsTheContracts(t *testing.T) {
	dir := t.TempDir()
	base := "version = 1\noutcomes = [\"wet\", \"dry\"]\nmode = \"generator\"\nformula = \"1 - sum(p^2)\"\n\n[budget]\nfloor = 5\ncap = 45\nstep = 0.25\n"
	for _, c := range []struct {
		contract string
		args     []string
		want     int
	}{
		{"\n[contract]\nforecasts = 12\n", nil, 12},
		{"", nil, 1},
		{"\n[contract]\nforecasts = 12\n", []string{"--forecasts", "5"}, 5},
	} {
		path := filepath.Join(dir, "d.toml")
		if err := os.WriteFile(path, []byte(base+c.contract), 0o600); err != nil {
			t.Fatal(err)
		}
		j := researchJSONRun(t, append([]string{"--design", path, "--kappa", "8", "--compare", "quadratic", "--no-optimum"}, c.args...)...)
		r := ruleNamed(t, j, "quadratic")
		if r.Season.Forecasts != c.want || math.Abs(float64(r.Season.Gain)-float64(c.want)*float64(r.Gain)) > 1e-9*math.Abs(float64(r.Season.Gain)) {
			t.Errorf("%q %v: season %+v, gain per forecast %v; want %d forecasts", c.contract, c.args, r.Season, r.Gain, c.want)
		}
	}
}
