package research

import (
	"context"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mathext"

	"scorewright/contract/budget"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

func fitted(t *testing.T, src string, n int, b design.Budget) *budget.Fit {
	t.Helper()
	f, err := bregman.NewFormula(src, bregman.Options{Outcomes: n})
	if err != nil {
		t.Fatal(err)
	}
	m, err := budget.StepMenu(n, b.Step, b.ReportFloor)
	if err != nil {
		t.Fatal(err)
	}
	fit, err := budget.FitRule(&bregman.Rule{Gen: f}, m, b)
	if err != nil {
		t.Fatal(err)
	}
	return fit
}

func gainFor(t *testing.T, p *Posterior, fit *budget.Fit) Gain {
	t.Helper()
	g, err := Gains(context.Background(), p, []Rule{{Name: "r", Fit: fit}}, 120)
	if err != nil {
		t.Fatal(err)
	}
	return g[0]
}

// The quadratic preset for n = 2 is H = 1 - p^2 - (1-p)^2 = 2p(1-p), so
// D(q, q0) = 2(q - q0)^2 and E[D] = 2·Var(q) = 2·q0(1-q0)/(kappa+1) for a
// Beta(kappa q0, kappa (1 - q0)) posterior (derived by hand from the Beta
// variance αβ/((α+β)²(α+β+1))). Fitted to [0, 100] on a 0.05 menu, L spans
// [0, 2], so B = 50 and the gain is 100·q0(1-q0)/(kappa+1).
func TestQuadraticBeta(t *testing.T) {
	fit := fitted(t, "1 - sum(p^2)", 2, design.Budget{Floor: 0, Cap: 100, Step: 0.05})
	for _, c := range []struct{ q0, kappa float64 }{{0.3, 20}, {0.5, 1}, {0.07, 3.5}, {0.9, 250}, {0.2, 0.1}} {
		p, err := Dirichlet([]float64{c.q0, 1 - c.q0}, c.kappa, Quadrature{})
		if err != nil {
			t.Fatal(err)
		}
		g := gainFor(t, p, fit)
		wantD := 2 * c.q0 * (1 - c.q0) / (c.kappa + 1)
		if math.Abs(g.Divergence-wantD) > 1e-12 {
			t.Errorf("q0 %g kappa %g: E[D] = %.15g, want %.15g", c.q0, c.kappa, g.Divergence, wantD)
		}
		if want := 50 * wantD; math.Abs(g.PerForecast-want) > 1e-10*100 {
			t.Errorf("q0 %g kappa %g: gain %.15g, want %.15g", c.q0, c.kappa, g.PerForecast, want)
		}
		if math.Abs(g.Season.Gain-120*g.PerForecast) > 1e-9 {
			t.Errorf("season gain %g, want 120 × %g", g.Season.Gain, g.PerForecast)
		}
	}
}

// For n = 3 the quadratic rule's D is the squared distance and E[D] =
// Σ Var(q_k) = (1 - Σ q0_k²)/(kappa + 1) (derived by hand from the
// Dirichlet variances q0_k(1 - q0_k)/(kappa + 1)).
func TestQuadraticDirichlet(t *testing.T) {
	fit := fitted(t, "1 - sum(p^2)", 3, design.Budget{Floor: 0, Cap: 100, Step: 0.1})
	for _, c := range []struct {
		q0    []float64
		kappa float64
	}{{[]float64{0.2, 0.3, 0.5}, 10}, {[]float64{0.6, 0.3, 0.1}, 2}, {[]float64{1. / 3, 1. / 3, 1. / 3}, 0.5}} {
		p, err := Dirichlet(c.q0, c.kappa, Quadrature{})
		if err != nil {
			t.Fatal(err)
		}
		s := 0.0
		for _, v := range c.q0 {
			s += v * v
		}
		want := (1 - s) / (c.kappa + 1)
		g := gainFor(t, p, fit)
		if math.Abs(g.Divergence-want) > 1e-9 {
			t.Errorf("%v kappa %g: E[D] = %.15g, want %.15g", c.q0, c.kappa, g.Divergence, want)
		}
	}
}

// Log rule: D is the Kullback–Leibler divergence and E[D] = E[Σ q ln q] -
// Σ q0 ln q0, with E[q ln q] = q0·(ψ(α+1) - ψ(α+β+1)) for q ~ Beta(α, β)
// (Beta moments, Johnson, Kotz & Balakrishnan, Continuous Univariate
// Distributions vol. 2, ch. 25), ψ from gonum mathext.Digamma; each
// marginal of a Dirichlet(κ q0) is Beta(κ q0_k, κ(1 - q0_k)).
func TestLogDirichlet(t *testing.T) {
	for _, c := range []struct {
		q0    []float64
		kappa float64
	}{{[]float64{0.3, 0.7}, 20}, {[]float64{0.05, 0.95}, 4}, {[]float64{0.5, 0.5}, 0.3}, {[]float64{0.2, 0.3, 0.5}, 10}, {[]float64{0.7, 0.2, 0.1}, 1.5}} {
		n := len(c.q0)
		fit := fitted(t, "-sum(p*ln(p))", n, design.Budget{Floor: 0, Cap: 100, Step: 0.1, ReportFloor: 0.01})
		p, err := Dirichlet(c.q0, c.kappa, Quadrature{})
		if err != nil {
			t.Fatal(err)
		}
		want := 0.0
		for _, q := range c.q0 {
			want += q*(mathext.Digamma(c.kappa*q+1)-mathext.Digamma(c.kappa+1)) - q*math.Log(q)
		}
		g := gainFor(t, p, fit)
		tol := 1e-9
		if n == 3 {
			tol = 1e-7
		}
		if math.Abs(g.Divergence-want) > tol*math.Max(1, want) {
			t.Errorf("%v kappa %g: E[KL] = %.12g, want %.12g", c.q0, c.kappa, g.Divergence, want)
		}
		// Without a clamp the gain is B·E[D] (the identity in the package
		// comment), here against the closed form.
		if math.Abs(g.PerForecast-fit.B*want) > 10*tol*math.Max(1, fit.B*want) {
			t.Errorf("%v kappa %g: gain %.12g, want B·E[D] = %.12g", c.q0, c.kappa, g.PerForecast, fit.B*want)
		}
	}
}

// A signal's posteriors average to the base rate exactly, and with a
// binary signal of accuracy a from base rate 1/2 the posteriors are a and
// 1 - a with chance 1/2 each (Bayes' rule, derived by hand): under the
// quadratic rule E[D] = 2(a - 1/2)^2.
func TestSignal(t *testing.T) {
	q0 := []float64{0.25, 0.35, 0.4}
	p, err := Signal(q0, [][]float64{{0.7, 0.2, 0.1}, {0.1, 0.8, 0.1}, {0.3, 0.3, 0.4}})
	if err != nil {
		t.Fatal(err)
	}
	for k := range q0 {
		m := p.Expect(func(q []float64) float64 { return q[k] })
		if math.Abs(m-q0[k]) > 1e-15 {
			t.Errorf("mean posterior %d = %.17g, want %g", k, m, q0[k])
		}
	}
	c, _ := Accuracy(2, 0.8)
	p, err = Signal([]float64{0.5, 0.5}, c)
	if err != nil {
		t.Fatal(err)
	}
	g := gainFor(t, p, fitted(t, "1 - sum(p^2)", 2, design.Budget{Floor: 0, Cap: 100, Step: 0.05}))
	if want := 2 * 0.3 * 0.3; math.Abs(g.Divergence-want) > 1e-15 {
		t.Errorf("E[D] = %g, want %g", g.Divergence, want)
	}
	if _, err := Signal(q0, [][]float64{{0.5, 0.6}, {0.5, 0.5}, {1, 0}}); err == nil || !strings.Contains(err.Error(), "row 1") {
		t.Errorf("bad row: %v", err)
	}
}

func TestHistory(t *testing.T) {
	src := "forecaster,question,outcome,frost,clear\nann,q1,frost,0.2,0.8\nann,q2,clear,0.6,0.4\nbo,q1,frost,x,0.5\n"
	p, skipped, err := History(strings.NewReader(src), []string{"frost", "clear"})
	if err != nil {
		t.Fatal(err)
	}
	if len(skipped) != 1 || len(p.Beliefs) != 2 || math.Abs(p.Prior[0]-0.4) > 1e-15 {
		t.Fatalf("skipped %v, beliefs %v, prior %v", skipped, p.Beliefs, p.Prior)
	}
	// Two posteriors 0.2 and 0.6 around 0.4: quadratic E[D] = 2·0.2² (by hand).
	g := gainFor(t, p, fitted(t, "1 - sum(p^2)", 2, design.Budget{Floor: 0, Cap: 100, Step: 0.05}))
	if math.Abs(g.Divergence-0.08) > 1e-15 {
		t.Errorf("E[D] = %g, want 0.08", g.Divergence)
	}
}

func TestDirichletErrors(t *testing.T) {
	for _, c := range []struct {
		q0    []float64
		kappa float64
		want  string
	}{{[]float64{0.5, 0.5}, 0, "kappa"}, {[]float64{0, 1}, 3, "probability 0"}, {[]float64{0.5, 0.6}, 3, "base rate"}, {[]float64{0.2, 0.2, 0.2, 0.2, 0.2}, 3, "at most"}} {
		if _, err := Dirichlet(c.q0, c.kappa, Quadrature{}); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v %g: %v, want %q", c.q0, c.kappa, err, c.want)
		}
	}
}
