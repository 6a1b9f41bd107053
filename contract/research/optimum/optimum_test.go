package optimum

import (
	"context"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"scorewright/contract/budget"
	"scorewright/contract/research"
	"scorewright/generator/bregman"
	"scorewright/generator/design"
)

func lbeta(a, b float64) float64 {
	la, _ := math.Lgamma(a)
	lb, _ := math.Lgamma(b)
	lab, _ := math.Lgamma(a + b)
	return la + lb - lab
}

// betaMAD is E|q - μ| for q ~ Beta(a, b): 2 a^a b^b / (B(a, b) (a+b)^(a+b+1))
// (the Beta distribution's mean absolute deviation around the mean,
// Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions vol.
// 2, ch. 25), in logarithms.
func betaMAD(a, b float64) float64 {
	return math.Exp(math.Log(2) + a*math.Log(a) + b*math.Log(b) - lbeta(a, b) - (a+b+1)*math.Log(a+b))
}

// For one binary question the best rule for research with payments in
// [floor, cap] is V-shaped with its kink at the base rate (Hartline, Li,
// Shan & Wu, "Optimization of Scoring Rules", EC 2022). Its value, derived
// by hand: G has slopes s_R > 0 > s_L on the two sides of q0, the gain is
// E[(q-q0)+]·(s_R - s_L) = (MAD/2)(s_R - s_L), and the payment bounds
// allow s_R - s_L up to (cap - floor)/max(q0, 1 - q0).
func TestVShapedOptimum(t *testing.T) {
	for _, c := range []struct{ q0, kappa, floor, cap float64 }{
		{0.3, 20, 0, 100}, {0.5, 2, 10, 50}, {0.82, 7.5, -5, 5}, {0.1, 0.8, 0, 1}, {0.37, 60, 100, 250},
	} {
		p, err := research.Dirichlet([]float64{c.q0, 1 - c.q0}, c.kappa, research.Quadrature{})
		if err != nil {
			t.Fatal(err)
		}
		r, err := Solve(context.Background(), p, c.floor, c.cap, Settings{Grid: 40})
		if err != nil {
			t.Fatal(err)
		}
		R := c.cap - c.floor
		want := betaMAD(c.kappa*c.q0, c.kappa*(1-c.q0)) / 2 * R / math.Max(c.q0, 1-c.q0)
		if math.Abs(r.Gain-want) > 1e-7*R {
			t.Errorf("%+v: gain %.12g, want %.12g", c, r.Gain, want)
		}
		// V-shaped: G is linear on each side of q0 and bends at q0 only.
		if len(r.Pieces) != 2 {
			t.Fatalf("%+v: %d pieces, want 2: %v", c, len(r.Pieces), r.Pieces)
		}
		for i := 1; i+1 < len(r.Points); i++ {
			x0, x1, x2 := r.Points[i-1][0], r.Points[i][0], r.Points[i+1][0]
			bend := (r.Values[i+1]-r.Values[i])/(x2-x1) - (r.Values[i]-r.Values[i-1])/(x1-x0)
			if math.Abs(x1-c.q0) > 1e-12 && math.Abs(bend) > 1e-5*R {
				t.Errorf("%+v: G bends by %g at %g, away from the base rate", c, bend, x1)
			}
			if math.Abs(x1-c.q0) < 1e-12 && !(bend > 0.1*R) {
				t.Errorf("%+v: G bends by only %g at the base rate", c, bend)
			}
		}
	}
}

// fit fits a formula to [floor, cap] on a step menu.
func fit(t *testing.T, src string, n int, floor, cap, step float64) *budget.Fit {
	t.Helper()
	f, err := bregman.NewFormula(src, bregman.Options{Outcomes: n})
	if err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	m, err := budget.StepMenu(n, step, 0)
	if err != nil {
		t.Fatal(err)
	}
	ft, err := budget.FitRule(&bregman.Rule{Gen: f}, m, design.Budget{Floor: floor, Cap: cap, Step: step})
	if err != nil {
		t.Fatal(err)
	}
	return ft
}

// presets whose payments over all reports stay in the budget they are
// fitted to on a menu that holds the vertices (no report floor needed).
var bounded = []string{"1 - sum(p^2)", "-sqrt(sum(p^2))", "(1 - sum(p^3)) / 2", "-sum(p^4)^(1/4)"}

// The program's optimum is never below any bounded preset's gain at the
// same budget: a property over random base rates, concentrations and
// budgets, for n = 2 and 3 (the presets are feasible points of the
// program up to the grid, and the optimum is checked on its own rule).
func TestOptimumBeatsPresets(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 2))
	for trial := 0; trial < 12; trial++ {
		n := 2 + trial%2
		q0 := make([]float64, n)
		var s float64
		for k := range q0 {
			q0[k] = 0.05 + rng.Float64()
			s += q0[k]
		}
		for k := range q0 {
			q0[k] /= s
		}
		kappa := math.Exp(rng.Float64()*6 - 1)
		floor := math.Round(rng.Float64()*100) - 50
		cap := floor + 1 + math.Round(rng.Float64()*200)
		p, err := research.Dirichlet(q0, kappa, research.Quadrature{})
		if err != nil {
			t.Fatal(err)
		}
		// Coarse grids keep the test short; the property holds on any grid
		// that holds the vertices and the base rate.
		grid := 40
		if n == 3 {
			grid = 6
		}
		r, err := Solve(context.Background(), p, floor, cap, Settings{Grid: grid})
		if err != nil {
			t.Fatal(err)
		}
		step := 0.05
		if n == 3 {
			step = 0.1
		}
		for _, src := range bounded {
			g, err := research.Gains(context.Background(), p, []research.Rule{{Name: src, Fit: fit(t, src, n, floor, cap, step)}}, 1)
			if err != nil {
				t.Fatal(err)
			}
			if g[0].PerForecast > r.Gain+1e-7*(cap-floor) {
				t.Errorf("n %d q0 %v kappa %.3g budget [%g, %g]: %s gains %.10g, above the optimum %.10g", n, q0, kappa, floor, cap, src, g[0].PerForecast, r.Gain)
			}
		}
	}
}

// The optimum as a formula design: fitted to its own budget it pays what
// the program found (B = 1, the same gain), and the mix with the quadratic
// rule gains (1 - share)·optimum + share·quadratic.
func TestFormulaAndMix(t *testing.T) {
	for _, c := range []struct {
		q0   []float64
		step float64
	}{{[]float64{0.3, 0.7}, 0.05}, {[]float64{0.2, 0.3, 0.5}, 0.1}} {
		n := len(c.q0)
		p, err := research.Dirichlet(c.q0, 10, research.Quadrature{})
		if err != nil {
			t.Fatal(err)
		}
		r, err := Solve(context.Background(), p, 0, 100, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if !strings.HasPrefix(r.Formula(), "-max(") {
			t.Errorf("formula %q", r.Formula())
		}
		opt := fit(t, r.Formula(), n, 0, 100, c.step)
		quad := fit(t, "1 - sum(p^2)", n, 0, 100, c.step)
		mix := fit(t, r.Mix(0.2), n, 0, 100, c.step)
		if math.Abs(opt.B-1) > 1e-9 || math.Abs(mix.B-1) > 1e-9 {
			t.Errorf("n %d: B = %g (optimum), %g (mix), want 1", n, opt.B, mix.B)
		}
		g, err := research.Gains(context.Background(), p, []research.Rule{{Name: "opt", Fit: opt}, {Name: "quad", Fit: quad}, {Name: "mix", Fit: mix}}, 1)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(g[0].PerForecast-r.Gain) > 1e-9 {
			t.Errorf("n %d: fitted optimum gains %.12g, the program %.12g", n, g[0].PerForecast, r.Gain)
		}
		want := 0.8*g[0].PerForecast + 0.2*g[1].PerForecast
		if math.Abs(g[2].PerForecast-want) > 1e-9 {
			t.Errorf("n %d: mix gains %.12g, want %.12g", n, g[2].PerForecast, want)
		}
	}
}

func TestSolveErrors(t *testing.T) {
	p, _ := research.Dirichlet([]float64{0.3, 0.7}, 5, research.Quadrature{})
	if _, err := Solve(context.Background(), p, 10, 10, Settings{}); err == nil {
		t.Error("cap = floor accepted")
	}
	if _, err := Solve(context.Background(), p, 0, 10, Settings{Grid: 1}); err == nil {
		t.Error("grid 1 accepted")
	}
	flat, _ := research.Signal([]float64{0.3, 0.7}, [][]float64{{0.5, 0.5}, {0.5, 0.5}})
	if _, err := Solve(context.Background(), flat, 0, 10, Settings{}); err != ErrNoInformation {
		t.Errorf("uninformative signal: %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Solve(ctx, p, 0, 10, Settings{}); err != context.Canceled {
		t.Errorf("cancelled: %v", err)
	}
}

// The n = 2 program in slope form (four rows) and in the general form
// (one convexity row per interior node, as for n = 3) are two
// formulations of one linear program: their values agree.
func TestBinaryFormsAgree(t *testing.T) {
	for _, c := range []struct{ q0, kappa float64 }{{0.3, 20}, {0.62, 1.5}, {0.05, 40}} {
		p, err := research.Dirichlet([]float64{c.q0, 1 - c.q0}, c.kappa, research.Quadrature{})
		if err != nil {
			t.Fatal(err)
		}
		const K = 30
		m := binaryMesh(K, c.q0)
		obj, err := objective(m, p)
		if err != nil {
			t.Fatal(err)
		}
		rows, rhs, relax := constraints(m, K)
		yg, err := solveLP(obj, rows, rhs, relax)
		if err != nil {
			t.Fatal(err)
		}
		ys, err := solveBinary(m, obj, rows, rhs, relax)
		if err != nil {
			t.Fatal(err)
		}
		var vg, vs float64
		for i := range obj {
			vg += obj[i] * yg[i]
			vs += obj[i] * ys[i]
		}
		if math.Abs(vg-vs) > 1e-7 {
			t.Errorf("%+v: general form %.12g, slope form %.12g", c, vg, vs)
		}
	}
}
