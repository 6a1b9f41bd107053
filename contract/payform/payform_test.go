package payform

import (
	"math"
	"strings"
	"testing"

	"scorewright/generator/bregman"
)

func compile(t *testing.T, src string, n int, params map[string]float64) *bregman.Rule {
	t.Helper()
	f, err := bregman.NewFormula(src, bregman.Options{Outcomes: n, Params: params})
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
