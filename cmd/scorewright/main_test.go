package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCmd runs the command line args and returns exit status, stdout, stderr.
func runCmd(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb})
	return code, out.String(), errb.String()
}

func TestEvalJSON(t *testing.T) {
	code, out, stderr := runCmd(t, "eval", "--outcomes", "3", "--preset", "log", "--report", "0.5,0.3,0.2", "--belief", "0.2,0.3,0.5", "--json")
	if code != 0 {
		t.Fatalf("exit %d, stderr %s", code, stderr)
	}
	var got struct {
		Entropy    float64   `json:"entropy"`
		Effort     []float64 `json:"effort"`
		Divergence float64   `json:"divergence"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	// Log rule: L = -ln p_k (Good 1952); D = KL(q||p), computed here.
	q, p := []float64{0.2, 0.3, 0.5}, []float64{0.5, 0.3, 0.2}
	var kl, h float64
	for i := range q {
		kl += q[i] * math.Log(q[i]/p[i])
		h -= p[i] * math.Log(p[i])
	}
	if math.Abs(got.Divergence-kl) > 1e-12 || math.Abs(got.Entropy-h) > 1e-12 {
		t.Errorf("divergence %v entropy %v, want %v %v", got.Divergence, got.Entropy, kl, h)
	}
	for k, l := range got.Effort {
		if math.Abs(l+math.Log(p[k])) > 1e-12 {
			t.Errorf("effort[%d] = %v, want %v", k, l, -math.Log(p[k]))
		}
	}
}

func TestEvalInfiniteIsReported(t *testing.T) {
	code, out, _ := runCmd(t, "eval", "--outcomes", "frost,clear", "--preset", "log", "--report", "0", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	if !strings.Contains(out, `"+Inf"`) || !strings.Contains(out, `outcome \"frost\" is +Inf`) {
		t.Errorf("infinite effort not reported as data:\n%s", out)
	}
}

// Usage errors: exit 2 and one line on stderr that names the problem.
func TestUsageErrors(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"nosuch"}, `unknown command "nosuch"`},
		{[]string{"eval", "--outcomes", "3", "--generator", "1 - sum(q^2)", "--report", "0.2,0.3,0.5"}, `generator formula 1:9: unknown name "q"`},
		{[]string{"eval", "--outcomes", "3", "--preset", "log", "--report", "0.2,0.3"}, "--report: 2 entries given for 3 outcomes"},
		{[]string{"eval", "--outcomes", "3", "--preset", "log", "--report", "0.2,0.3,0.6"}, "--report: entries sum to 1.1, not 1"},
		{[]string{"eval", "--outcomes", "3", "--preset", "nosuch", "--report", "0.2,0.3,0.5"}, `unknown preset "nosuch"`},
		{[]string{"eval", "--outcomes", "1", "--preset", "log", "--report", "1"}, "outcome count 1 is outside 2..12"},
		{[]string{"eval", "--outcomes", "3", "--preset", "log", "--generator", "1", "--report", "1,0,0"}, "exactly one of"},
		{[]string{"eval", "--outcomes", "3", "--preset", "power", "--param", "h=2", "--report", "0.2,0.3,0.5"}, `unknown parameter "h"; the formula sets: g`},
		{[]string{"eval", "--bogus"}, "unknown option --bogus"},
		{[]string{"eval", "--outcomes", "3", "--preset", "weighted-quadratic", "--report", "0.2,0.3,0.5"}, "needs --weights"},
		// QLIKE is infinite at y = 0 (Patton 2011): refused, with the reason.
		{[]string{"check", "--interval", "0,10", "--preset", "qlike"}, "not finite at the outcome y = 0 of [0, 10]"},
		{[]string{"check", "--interval", "0,10", "--preset", "patton", "--param", "b=-2"}, "not finite at the outcome y = 0"},
	}
	for _, c := range cases {
		code, _, stderr := runCmd(t, c.args...)
		if code != 2 {
			t.Errorf("%v: exit %d, want 2", c.args, code)
		}
		if !strings.Contains(stderr, c.want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%v: stderr %q, want one line containing %q", c.args, stderr, c.want)
		}
	}
}

func TestPresetsList(t *testing.T) {
	code, out, _ := runCmd(t, "presets", "--json")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	var got struct {
		Presets []struct{ Name, Formula, Source string }
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"log", "quadratic", "spherical", "pseudospherical", "power", "beta", "ranked", "weighted-quadratic"} {
		found := false
		for _, p := range got.Presets {
			if p.Name == want && p.Formula != "" && p.Source != "" {
				found = true
			}
		}
		if !found {
			t.Errorf("preset %q missing or without formula and source", want)
		}
	}
}

// writeMenuDesign writes, in a fresh folder, the menu file m.csv (one report's
// first probability a line) and a design d.toml of the quadratic rule over
// wet and dry whose budget (the lines given) names it; it returns the
// design's path.
func writeMenuDesign(t *testing.T, menu, budget string) string {
	t.Helper()
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "m.csv"), []byte(menu), 0o600); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "d.toml")
	src := "version = 1\noutcomes = [\"wet\", \"dry\"]\nmode = \"generator\"\nformula = \"1 - sum(p^2)\"\n\n[budget]\n" + budget + "menu = \"m.csv\"\n"
	if err := os.WriteFile(path, []byte(src), 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}
