package formula

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// Exact derivatives agree with gonum's central finite differences (an
// independent reference) for every operation of the language.
func TestDerivativesAgainstFiniteDifferences(t *testing.T) {
	cases := []struct {
		src   string
		scope Scope
	}{
		{"-sum(p*ln(p))", Scope{Outcomes: 3}},
		{"1 - sum(p^2)", Scope{Outcomes: 4}},
		{"-sqrt(sum(p^2))", Scope{Outcomes: 3}},
		{"a = 2.5\n-sum(p^a)^(1/a)", Scope{Outcomes: 3}},
		{"csum(c*(1-c))", Scope{Outcomes: 4, Ordered: true}},
		{"p1/p2 + p2/p3 - p3/(p1+p2)", Scope{Outcomes: 3}},
		{"p1^p2 + 2^p3 + exp(p1*p2) + log2(p3) + log10(p1)", Scope{Outcomes: 3}},
		{"abs(p1 - 0.7) + min(p1, p2)*max(p2, p3)", Scope{Outcomes: 3}},
		{"if(p1 < 0.5, p1^3, 1 - p2^2) + (p1 >= p2) * p3 + (p2 < 2)*p1", Scope{Outcomes: 3}},
		{"sum(w*p*(1-p))", Scope{Outcomes: 3, Weights: []float64{1, 2, 0.5}}},
		// Fused sum of x ln x over lanes that are themselves x ln x:
		// each keeps its own logarithms for the backward sweep.
		{"sum(((p+2)*ln(p+2))*ln((p+2)*ln(p+2)))", Scope{Outcomes: 3}},
		{"sum(p*ln(p)) + sum(p^2) - sum((p*ln(p))^2)", Scope{Outcomes: 4}},
		{"-x^2 + sqrt(x)", Scope{Vars: []string{"x"}}},
		{"expm1(p1*p2) + log1p(p3 - p1) + sum(expm1(-p)*log1p(p))", Scope{Outcomes: 3}},
		{"sum((p - hit)^2) + p[y]*i0", Scope{Outcomes: 3, Payout: true, Outcome: 2, Params: map[string]float64{"i0": 0.5}}},
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for _, c := range cases {
		src := c.src
		if c.scope.Params != nil {
			src = "i0 = 1\n" + src
		}
		prog, err := CompileString(src, c.scope)
		if err != nil {
			t.Fatalf("%q: %v", c.src, err)
		}
		m := prog.NewMachine()
		nv := prog.NumVars()
		f := func(x []float64) float64 { return prog.NewMachine().Value(x) }
		for trial := 0; trial < 20; trial++ {
			x := make([]float64, nv)
			for i := range x {
				// Interior points away from kinks of abs/min/max/if.
				x[i] = 0.15 + 0.8*rng.Float64()
			}
			if nearKink(x) {
				continue
			}
			grad := make([]float64, nv)
			hess := make([]float64, nv*nv)
			m.Gradient(grad, x)
			wantG := fd.Gradient(nil, f, x, &fd.Settings{Formula: fd.Central})
			for i := range grad {
				if !close(grad[i], wantG[i], 1e-6) {
					t.Errorf("%q at %v: d/d%s = %v, finite differences %v", c.src, x, prog.varNames[i], grad[i], wantG[i])
				}
			}
			g2 := make([]float64, nv)
			m.Hessian(hess, g2, x)
			for i := range grad {
				if !close(g2[i], grad[i], 1e-12) {
					t.Errorf("%q: forward gradient %v, reverse %v", c.src, g2, grad)
				}
			}
			wantH := mat.NewSymDense(nv, nil)
			fd.Hessian(wantH, f, x, &fd.Settings{Formula: fd.Central})
			for i := 0; i < nv; i++ {
				for j := 0; j < nv; j++ {
					if !close(hess[i*nv+j], wantH.At(i, j), 2e-3) {
						t.Errorf("%q at %v: H[%d][%d] = %v, finite differences %v", c.src, x, i, j, hess[i*nv+j], wantH.At(i, j))
					}
				}
			}
		}
	}
}

// nearKink reports points where abs, min, max, comparisons or if() in the
// cases above switch branch; finite differences straddling a kink are not a
// reference for anything.
func nearKink(x []float64) bool {
	for i, a := range x {
		if math.Abs(a-0.5) < 0.02 || math.Abs(a-0.7) < 0.02 {
			return true
		}
		for _, b := range x[i+1:] {
			if math.Abs(a-b) < 0.02 {
				return true
			}
		}
	}
	return false
}

// close compares with a tolerance relative to the size of the values.
func close(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
}

// Domain trouble is data: NaN and ±Inf come out as values (IEEE 754), with
// the documented 0·Inf = 0 convention.
func TestNonFinite(t *testing.T) {
	cases := []struct {
		src  string
		at   []float64
		want float64
		why  string
	}{
		{"ln(p1)", []float64{0, 1}, math.Inf(-1), "ln 0 = -Inf"},
		{"ln(p1 - 1)", []float64{0.5, 0.5}, math.NaN(), "ln of a negative number is NaN"},
		{"p1*ln(p1)", []float64{0, 1}, 0, "0·ln 0 = 0 by the entropy convention"},
		{"ln(p1)*p1", []float64{0, 1}, 0, "the convention is symmetric"},
		{"p1/p1", []float64{0, 1}, math.NaN(), "0/0 stays NaN"},
		{"(p1 - 1)/p1", []float64{0, 1}, math.Inf(-1), "-1/0 = -Inf"},
		{"if(p1 > 0, ln(p1), 7)", []float64{0, 1}, 7, "the branch not taken does not leak"},
		{"if(ln(p1 - 1) > 0, 1, 2)", []float64{0.5, 0.5}, math.NaN(), "a NaN condition gives NaN, not a branch"},
		{"min(p1, ln(p1 - 1))", []float64{0.5, 0.5}, math.NaN(), "min with NaN is NaN"},
	}
	for _, c := range cases {
		prog, err := CompileString(c.src, Scope{Outcomes: 2})
		if err != nil {
			t.Fatal(err)
		}
		got := prog.NewMachine().Value(c.at)
		if !sameFloat(got, c.want) {
			t.Errorf("%s at %v = %v, want %v (%s)", c.src, c.at, got, c.want, c.why)
		}
	}
}

// The gradient of the log generator at the boundary: +Inf for the outcome
// with probability 0 (d/dp of -p ln p is -ln p - 1), finite elsewhere, and
// no NaN from the ln branch's 0 · (1/0) (derived by hand).
func TestGradientAtBoundary(t *testing.T) {
	prog, err := CompileString("-sum(p*ln(p))", Scope{Outcomes: 3})
	if err != nil {
		t.Fatal(err)
	}
	g := make([]float64, 3)
	prog.NewMachine().Gradient(g, []float64{0, 0.5, 0.5})
	want := []float64{math.Inf(1), -math.Log(0.5) - 1, -math.Log(0.5) - 1}
	for i := range g {
		if !sameFloat(g[i], want[i]) && !close(g[i], want[i], 1e-15) {
			t.Errorf("g[%d] = %v, want %v", i, g[i], want[i])
		}
	}
	// The untaken branch of if() must not put NaN into the gradient.
	prog, _ = CompileString("if(p1 > 0, p1*ln(p1), 0) + p2", Scope{Outcomes: 2})
	prog.NewMachine().Gradient(g[:2], []float64{0, 1})
	if g[0] != 0 || g[1] != 1 {
		t.Errorf("gradient through if at p1 = 0: %v, want [0 1]", g[:2])
	}
}

// A huge exponent: k(k-1) overflows to +Inf while p^(k-2) underflows to
// 0; the second derivative's limit is 0 (derived by hand: p^k k² -> 0 for
// p < 1), not NaN.
func TestHugeExponentHessian(t *testing.T) {
	prog, err := CompileString("p1^1e300", Scope{Outcomes: 2})
	if err != nil {
		t.Fatal(err)
	}
	g, h := make([]float64, 2), make([]float64, 4)
	prog.NewMachine().Hessian(h, g, []float64{0.5, 0.5})
	for _, x := range append(g, h...) {
		if x != 0 {
			t.Errorf("gradient %v Hessian %v, want zeros", g, h)
			break
		}
	}
}

func TestConstantFoldingAndSharing(t *testing.T) {
	// sum(p^2) over 3 outcomes: 3 loads, 3 squares, 2 adds; the constant
	// 1 - ... and (2 - 1) fold away. Shared subexpressions are computed once.
	prog, err := CompileString("(2 - 1) * sum(p^2) + sum(p^2)", Scope{Outcomes: 3})
	if err != nil {
		t.Fatal(err)
	}
	if got := prog.Len(); got != 2 {
		t.Errorf("program has %d instructions, want 2 (one sum of squares shared by both sums, one addition; variables and constants are cells, not instructions)", got)
	}
	prog, _ = CompileString("g = 2\nh = g*pi\nh/pi + n", Scope{Outcomes: 3})
	if !prog.IsConstant() || prog.Constant() != 5 {
		t.Errorf("constant formula not folded: constant=%v value=%v", prog.IsConstant(), prog.Constant())
	}
}

func TestPayoutScope(t *testing.T) {
	// 10 - 5*sum((p - hit)^2) at p = (0.5, 0.3, 0.2), outcome 1:
	// (0.5-1)^2 + 0.3^2 + 0.2^2 = 0.38, so 10 - 1.9 = 8.1 (derived by hand).
	prog, err := CompileString("10 - 5*sum((p - hit)^2)", Scope{Outcomes: 3, Payout: true, Outcome: 1})
	if err != nil {
		t.Fatal(err)
	}
	if got := prog.NewMachine().Value([]float64{0.5, 0.3, 0.2}); !close(got, 8.1, 1e-14) {
		t.Errorf("payout = %v, want 8.1", got)
	}
	// csum with hitc: outcome 2 of 3, cumulative (0.5, 0.8), indicators
	// (0, 1): 0.25 + 0.04 = 0.29 (derived by hand).
	prog, err = CompileString("csum((c - hitc)^2)", Scope{Outcomes: 3, Payout: true, Outcome: 2, Ordered: true})
	if err != nil {
		t.Fatal(err)
	}
	if got := prog.NewMachine().Value([]float64{0.5, 0.3, 0.2}); !close(got, 0.29, 1e-14) {
		t.Errorf("ranked payout = %v, want 0.29", got)
	}
	prog, _ = CompileString("p[y] + p[3]", Scope{Outcomes: 3, Payout: true, Outcome: 2})
	if got := prog.NewMachine().Value([]float64{0.5, 0.3, 0.2}); !close(got, 0.5, 1e-15) {
		t.Errorf("p[y] + p[3] = %v, want 0.5", got)
	}
}

// expm1 and log1p keep the digits that exp(x) - 1 and ln(1 + x) lose for
// small x: the values below are the Taylor series, derived by hand
// (e^x - 1 = x + x²/2 + x³/6 + ..., ln(1 + x) = x - x²/2 + x³/3 - ...),
// exact to double precision at x = 1e-10, where the plain forms keep only
// about six digits.
func TestExpm1Log1pPrecision(t *testing.T) {
	x := 1e-10
	cases := []struct {
		src        string
		want, d, h float64
	}{
		{"expm1(x)", x + x*x/2 + x*x*x/6, 1 + x + x*x/2, 1 + x},
		{"log1p(x)", x - x*x/2 + x*x*x/3, 1 / (1 + x), -1 / ((1 + x) * (1 + x))},
	}
	for _, c := range cases {
		prog, err := CompileString(c.src, Scope{Vars: []string{"x"}})
		if err != nil {
			t.Fatal(err)
		}
		grad, hess := make([]float64, 1), make([]float64, 1)
		v := prog.NewMachine().Hessian(hess, grad, []float64{x})
		if math.Abs(v-c.want) > 1e-16*math.Abs(c.want) {
			t.Errorf("%s at %g = %.17g, want %.17g", c.src, x, v, c.want)
		}
		if math.Abs(grad[0]-c.d) > 1e-15 || math.Abs(hess[0]-c.h) > 1e-15 {
			t.Errorf("%s at %g: derivatives %.17g, %.17g, want %.17g, %.17g", c.src, x, grad[0], hess[0], c.d, c.h)
		}
	}
	// The derivatives of expm1 are e^x itself, not expm1(x) + 1, which
	// cancels to nothing where e^x is tiny: at x = -40, e^x = 4.2e-18.
	prog, _ := CompileString("expm1(x)", Scope{Vars: []string{"x"}})
	grad, hess := make([]float64, 1), make([]float64, 1)
	prog.NewMachine().Hessian(hess, grad, []float64{-40})
	if want := math.Exp(-40); math.Abs(grad[0]-want) > 1e-15*want || math.Abs(hess[0]-want) > 1e-15*want {
		t.Errorf("expm1 at -40: derivatives %g, %g, want %g", grad[0], hess[0], want)
	}
	// The unknown-function message lists the two.
	_, err := CompileString("expm2(x)", Scope{Vars: []string{"x"}})
	if err == nil || !strings.Contains(err.Error(), "expm1") || !strings.Contains(err.Error(), "log1p") {
		t.Errorf("unknown function message %v does not list expm1 and log1p", err)
	}
}

// The switching quantities of a piecewise formula change sign exactly at
// its break points, read off by hand: c = 0.3 (the comparison), 0.5 (abs)
// and 0.7 (min(c, 0.7)).
func TestSwitches(t *testing.T) {
	prog, err := CompileString("if(c < 0.3, 0, 1) + abs(c - 0.5) + min(c, 0.7)", Scope{Vars: []string{"c"}})
	if err != nil {
		t.Fatal(err)
	}
	if prog.Switches() != 3 {
		t.Fatalf("%d switching quantities, want 3", prog.Switches())
	}
	m := prog.NewMachine()
	sw := make([]float64, 3)
	for _, c := range []float64{0.1, 0.4, 0.6, 0.9} {
		m.Switches(sw, []float64{c})
		want := map[float64]bool{c - 0.3: true, c - 0.5: true, c - 0.7: true}
		for _, s := range sw {
			if !want[s] {
				t.Errorf("at c = %g switching quantities %v, want c - 0.3, c - 0.5, c - 0.7 in some order", c, sw)
				break
			}
		}
	}
}
