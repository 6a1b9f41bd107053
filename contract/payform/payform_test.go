package payform

import (
	"math"
	"strings"
	"testing"

	"scorewright/generator/bregman"
)

func compile(t *testing.T, src string, n int, params map[string]float64) *bregman.Rule {
	t.Helper()
	// csum needs ordered outcomes.
	f, err := bregman.NewFormula(src, bregman.Options{Outcomes: n, Params: params, Ordered: strings.Contains(src, "csum")})
	if err != nil {
		t.Fatal(err)
	}
	return &bregman.Rule{Gen: f, Labels: []string{"exceeds", "holds", "c", "d"}[:n]}
}

// The quadratic rule scaled to pay 75..150 on two outcomes pays
// 150 − 75·(1 − p)² (derived by hand: the effort is 2(1 − p)², B = 37.5).
func TestQuadraticBinaryText(t *testing.T) {
	f, ok := Find(compile(t, "1 - sum(p^2)", 2, nil), 150, 37.5)
	if !ok {
		t.Fatal("quadratic rule not recognised")
	}
	want := `pay if "exceeds" = 150 − 75·(1 − p)²`
	if f.Lines[0] != want {
		t.Fatalf("got %q, want %q", f.Lines[0], want)
	}
	// At p = 0.1 the pay is 150 − 75·0.81 = 89.25 (derived by hand).
	if got := f.Pay([]float64{0.1, 0.9}, 0); math.Abs(got-89.25) > 1e-12 {
		t.Fatalf("pay at 0.1 = %v, want 89.25", got)
	}
}

// The log rule pays A + B·ln p (Good 1952): at p = e^-1 exactly A − B.
func TestLogText(t *testing.T) {
	f, ok := Find(compile(t, "# log\n-sum(p*ln(p))", 3, nil), 10, 2)
	if !ok {
		t.Fatal("log rule not recognised")
	}
	if f.Lines[0] != "pay if outcome k happens = 10 + 2·ln p_k" {
		t.Fatalf("got %q", f.Lines[0])
	}
	p := []float64{math.Exp(-1), 0.5, 0.5 - math.Exp(-1)}
	if got := f.Pay(p, 0); math.Abs(got-8) > 1e-12 {
		t.Fatalf("pay %v, want 8", got)
	}
}

// Each family's closed form agrees with the engine's Bregman effort,
// computed from the formula's exact derivatives, at reports other than
// the probes; and a formula of no family gets no closed form.
func TestFamiliesAgainstEngine(t *testing.T) {
	cases := []struct {
		src, family string
		n           int
	}{
		{"1 - sum(p^2)", "quadratic", 4},
		{"-sum(p*ln(p))", "logarithmic", 2},
		{"-sqrt(sum(p^2))", "spherical", 3},
		{"g = 3\n(1 - sum(p^g)) / (g - 1)", "power, g = 3", 3},
		{"g = 1.5\n(1 - sum(p^g)) / (g - 1)", "power, g = 1.5", 2},
		{"a = 3\n-sum(p^a)^(1/a)", "pseudospherical, a = 3", 4},
		{"csum(c*(1-c))", "ranked probability", 4},
		{"csum(c*(1-c))", "ranked probability", 3},
	}
	for _, c := range cases {
		rule := compile(t, c.src, c.n, nil)
		f, ok := Find(rule, 100, 7)
		if !ok || f.Family != c.family {
			t.Fatalf("%q: found %v %q, want %q", c.src, ok, f.Family, c.family)
		}
		sc := rule.NewScorer()
		eff := make([]float64, c.n)
		for _, p := range [][]float64{{0.05, 0.15, 0.3, 0.5}, {0.7, 0.1, 0.1, 0.1}, {0.25, 0.25, 0.25, 0.25}} {
			q := append([]float64(nil), p[:c.n]...)
			s := 0.0
			for _, x := range q {
				s += x
			}
			for i := range q {
				q[i] /= s
			}
			sc.Efforts(eff, q)
			for k := range c.n {
				want := 100 - 7*eff[k]
				if got := f.Pay(q, k); math.Abs(got-want) > 1e-9*(1+math.Abs(want)) {
					t.Errorf("%s at %v, outcome %d: closed form %v, engine %v", c.family, q, k, got, want)
				}
			}
		}
	}
	for _, src := range []string{"1 - sum(p^2) + 0.1*p1*p2", "-sum(p^2)^(1/3)"} {
		if f, ok := Find(compile(t, src, 3, nil), 1, 1); ok {
			t.Errorf("%q taken for %s", src, f.Family)
		}
	}
}

// A parameter overridden in the design is the one the text states.
func TestParameterOverride(t *testing.T) {
	f, ok := Find(compile(t, "g = 3\n(1 - sum(p^g)) / (g - 1)", 2, map[string]float64{"g": 4}), 1, 1)
	if !ok || f.Family != "power, g = 4" || !strings.Contains(f.Lines[0], "p^3") {
		t.Fatalf("got %v %+v", ok, f)
	}
}

// The ranked probability rule over four ordered bands, fitted A = 100,
// B = 80/3 as a 20..100 budget fits it (largest effort 3), states its pay
// in cumulative probabilities. By hand: report (0.2, 0.3, 0.3, 0.2) has
// C = (0.2, 0.5, 0.8); if the lowest band happens the effort is
// 0.8² + 0.5² + 0.2² = 0.93, and the pay 100 − 80/3·0.93 = 75.2.
func TestRankedText(t *testing.T) {
	rule := compile(t, "csum(c*(1-c))", 4, nil)
	f, ok := Find(rule, 100, 80.0/3)
	if !ok || f.Family != "ranked probability" {
		t.Fatalf("ranked rule not recognised: %v %+v", ok, f)
	}
	if want := "pay if outcome k happens = 100 − 26.66666667·Σ (C_j − [k ≤ j])²"; f.Lines[0] != want {
		t.Errorf("got %q, want %q", f.Lines[0], want)
	}
	if !strings.Contains(f.Where, "C_j = p_1 + ... + p_j") || !strings.HasSuffix(f.Where, "Σ runs over j = 1 to 3") {
		t.Errorf("where %q does not say what C_j is", f.Where)
	}
	if got := f.Pay([]float64{0.2, 0.3, 0.3, 0.2}, 0); math.Abs(got-75.2) > 1e-12 {
		t.Errorf("pay %v, want 75.2", got)
	}
	// The quadratic rule is not taken for the ranked one, nor the
	// reverse, at n = 2 where the two differ by a factor 2.
	if f, ok := Find(compile(t, "csum(c*(1-c))", 2, nil), 1, 1); !ok || f.Family != "ranked probability" || f.Lines[0] != `pay if "exceeds" = 1 − (1 − p)²` {
		t.Errorf("binary ranked: %v %+v", ok, f)
	}
}
