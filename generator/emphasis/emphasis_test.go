package emphasis

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mathext"

	"scorewright/generator/bregman"
)

// qs are the reports the closed forms are compared at, from deep in the
// lower tail (below the first knot) to deep in the upper one.
var qs = []float64{1e-22, 1e-12, 1e-6, 0.001, 0.01, 0.1, 0.25, 0.3, 0.5, 0.7, 0.77, 0.9, 0.99, 0.999, 1 - 1e-6, 1 - 1e-12}

func TestClosedForms(t *testing.T) {
	// a, b for the beta integrals; reference ∫_q^1 c^(a-1)(1-c)^b dc =
	// B(a, b+1)(1 - I_q(a, b+1)) and ∫_0^q c^a (1-c)^(b-1) dc =
	// B(a+1, b) I_q(a+1, b), with I the regularised incomplete beta function
	// of gonum's mathext (reference library).
	betaYes := func(a, b float64) func(q float64) float64 {
		// 1 - I_q(a, b) = I_{1-q}(b, a) avoids cancellation near q = 1.
		return func(q float64) float64 { return math.Exp(lbeta(a, b+1)) * mathext.RegIncBeta(b+1, a, 1-q) }
	}
	betaNo := func(a, b float64) func(q float64) float64 {
		return func(q float64) float64 { return math.Exp(lbeta(a+1, b)) * mathext.RegIncBeta(a+1, b, q) }
	}
	cases := []struct {
		name, src string
		yes, no   func(q float64) float64
		tol       float64 // relative
		qs        []float64
	}{
		// Buja, Stuetzle & Shen (2005), a = b = 1: half squared error (1-q)^2/2 and q^2/2.
		{"constant", "1", func(q float64) float64 { return (1 - q) * (1 - q) / 2 }, func(q float64) float64 { return q * q / 2 }, 1e-11, qs},
		// Schervish (1989): w = 1/(c(1-c)) gives the log rule -ln q, -ln(1-q).
		{"log", "1/(c*(1-c))", func(q float64) float64 { return -math.Log(q) }, func(q float64) float64 { return -math.Log1p(-q) }, 1e-9, qs},
		// Buja, Stuetzle & Shen (2005), a = b = -1/2: boosting loss 2 sqrt((1-q)/q).
		{"boosting", "c^(-1.5)*(1-c)^(-1.5)", func(q float64) float64 { return 2 * math.Sqrt((1-q)/q) }, func(q float64) float64 { return 2 * math.Sqrt(q/(1-q)) }, 1e-9, qs},
		// Beta family a = 2, b = 3 and a = 0.5, b = 0.7 against mathext.RegIncBeta.
		{"beta 2,3", "c*(1-c)^2", betaYes(2, 3), betaNo(2, 3), 1e-11, qs[3:14]},
		{"beta .5,.7", "c^(-0.5)*(1-c)^(-0.3)", betaYes(0.5, 0.7), betaNo(0.5, 0.7), 1e-9, qs[3:14]},
	}
	for _, tc := range cases {
		g, err := New(tc.src, Options{})
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		ev := g.NewBinary()
		for _, q := range tc.qs {
			yes, no := ev.Losses(q)
			if want := tc.yes(q); !close(yes, want, tc.tol) {
				t.Errorf("%s: L(%g, yes) = %.15g, want %.15g (rel %.2g)", tc.name, q, yes, want, rel(yes, want))
			}
			if want := tc.no(q); !close(no, want, tc.tol) {
				t.Errorf("%s: L(%g, no) = %.15g, want %.15g (rel %.2g)", tc.name, q, no, want, rel(no, want))
			}
		}
	}
}

func lbeta(a, b float64) float64 {
	la, _ := math.Lgamma(a)
	lb, _ := math.Lgamma(b)
	lab, _ := math.Lgamma(a + b)
	return la + lb - lab
}

func rel(got, want float64) float64 { return math.Abs(got-want) / math.Max(math.Abs(want), 1e-300) }

func close(got, want, tol float64) bool {
	if got == want {
		return true
	}
	return math.Abs(got-want) <= tol*math.Max(math.Abs(want), 1e-300)
}

func TestThroughBregman(t *testing.T) {
	// Schervish (1989); check-values.md: at q = 0.3 the log integrals are
	// -ln 0.3 = 1.203973 and -ln 0.7 = 0.356675.
	g, err := New("1/(c*(1-c))", Options{})
	if err != nil {
		t.Fatal(err)
	}
	rule := &bregman.Rule{Gen: g}
	s := rule.NewScorer()
	eff := make([]float64, 2)
	h := s.Efforts(eff, []float64{0.3, 0.7})
	if math.Abs(eff[0]-1.203973) > 5e-7 || math.Abs(eff[1]-0.356675) > 5e-7 {
		t.Errorf("efforts %v, want 1.203973, 0.356675", eff)
	}
	// Entropy of the log rule is -0.3 ln 0.3 - 0.7 ln 0.7 (derived by hand).
	if want := -0.3*math.Log(0.3) - 0.7*math.Log(0.7); math.Abs(h-want) > 1e-10 {
		t.Errorf("H = %v, want %v", h, want)
	}
	_, dh, w := s.Binary(0.3)
	if want := math.Log(0.7 / 0.3); math.Abs(dh-want) > 1e-10 {
		t.Errorf("H' = %v, want %v", dh, want)
	}
	if want := 1 / (0.3 * 0.7); math.Abs(w-want) > 1e-12 {
		t.Errorf("w = %v, want %v", w, want)
	}
	// The Hessian agrees with finite differences of the gradient (test-only
	// independent check) in the direction (1, -1).
	hess := make([]float64, 4)
	grad := make([]float64, 2)
	ev := g.NewEvaluator()
	ev.Hessian(hess, grad, []float64{0.3, 0.7})
	const step = 1e-5
	gp, gm := make([]float64, 2), make([]float64, 2)
	ev.Gradient(gp, []float64{0.3 + step, 0.7 - step})
	ev.Gradient(gm, []float64{0.3 - step, 0.7 + step})
	for k := 0; k < 2; k++ {
		fd := (gp[k] - gm[k]) / (2 * step)
		an := hess[2*k] - hess[2*k+1]
		if math.Abs(fd-an) > 1e-5*math.Max(1, math.Abs(an)) {
			t.Errorf("row %d: Hessian·(1,-1) = %v, finite difference %v", k, an, fd)
		}
	}
	// Certain and correct costs zero; certain and wrong is infinite.
	h = s.Efforts(eff, []float64{1, 0})
	if eff[0] != 0 || !math.IsInf(eff[1], 1) || h != 0 {
		t.Errorf("at p = 1: H = %v, efforts %v, want 0 and (0, +Inf)", h, eff)
	}
	s.Efforts(eff, []float64{0, 1})
	if !math.IsInf(eff[0], 1) || eff[1] != 0 {
		t.Errorf("at p = 0: efforts %v, want (+Inf, 0)", eff)
	}
}

func TestEnds(t *testing.T) {
	cases := []struct {
		src           string
		atZero, atOne bool
		err           string
	}{
		{"1", false, false, ""},                      // quadratic: bounded
		{"1/(c*(1-c))", true, true, ""},              // log: unbounded both ends
		{"c^(-1)", true, false, ""},                  // beta a = 0, b = 1
		{"c^(-1.5)*(1-c)^(-1.5)", true, true, ""},    // a = b = -1/2
		{"c^(-2.5)", false, false, "near c = 0"},     // c·w ~ c^-1.5: every no-effort infinite
		{"(1-c)^(-2.5)", false, false, "near c = 1"}, // (1-c)·w ~ (1-c)^-1.5
		{"c^(-0.5)*(1-c)^(-0.5)", false, false, ""},  // arcsine weight: bounded
		{"exp(-(c-0.3)^2/0.01)", false, false, ""},   // a bump: bounded
		{"if(c < 0.5, 0, 1/(1-c))", false, true, ""}, // c·w ~ (1-c)^-1: unbounded at 1 only
	}
	for _, tc := range cases {
		g, err := New(tc.src, Options{})
		if tc.err != "" {
			if err == nil || !strings.Contains(err.Error(), tc.err) {
				t.Errorf("%s: error %v, want one mentioning %q", tc.src, err, tc.err)
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", tc.src, err)
			continue
		}
		d := g.Diagnostics()
		if d.UnboundedAtZero() != tc.atZero || d.UnboundedAtOne() != tc.atOne {
			t.Errorf("%s: unbounded at 0: %v, at 1: %v; want %v, %v", tc.src, d.UnboundedAtZero(), d.UnboundedAtOne(), tc.atZero, tc.atOne)
		}
		if len(d.Warnings()) != btoi(tc.atZero)+btoi(tc.atOne) {
			t.Errorf("%s: warnings %q", tc.src, d.Warnings())
		}
	}
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}

func TestNegativeWeight(t *testing.T) {
	g, err := New("c - 0.5", Options{Grid: 1000})
	if err != nil {
		t.Fatal(err)
	}
	d := g.Diagnostics()
	if len(d.Negative) != 1 || d.Negative[0].Hi >= 0.5 || d.Negative[0].Hi < 0.49 || d.Negative[0].Lo > 1e-15 {
		t.Fatalf("negative spans %v, want one from near 0 to just below 0.5", d.Negative)
	}
	if err := d.Problem(); err == nil || !strings.Contains(err.Error(), "negative") {
		t.Errorf("Problem() = %v", err)
	}
	ok, _ := New("1", Options{})
	if err := ok.Diagnostics().Problem(); err != nil {
		t.Errorf("constant weight: %v", err)
	}
	nan, _ := New("ln(c - 0.5)", Options{})
	if err := nan.Diagnostics().Problem(); err == nil || !strings.Contains(err.Error(), "not finite") {
		t.Errorf("ln(c-0.5): Problem() = %v", err)
	}
}

func TestParams(t *testing.T) {
	// The beta preset's formula with a = b = 0 is the log rule (Buja,
	// Stuetzle & Shen 2005).
	g, err := New("a = 1\nb = 1\nc^(a-1) * (1-c)^(b-1)", Options{Params: map[string]float64{"a": 0, "b": 0}})
	if err != nil {
		t.Fatal(err)
	}
	yes, no := g.NewBinary().Losses(0.3)
	if math.Abs(yes-1.203973) > 5e-7 || math.Abs(no-0.356675) > 5e-7 {
		t.Errorf("beta(0,0) at 0.3: %v, %v", yes, no)
	}
	if _, err := New("c^", Options{}); err == nil {
		t.Error("syntax error not reported")
	}
	if _, err := New("p", Options{}); err == nil {
		t.Error("unknown name p not reported")
	}
}

func BenchmarkLosses(b *testing.B) {
	g, err := New("c^(-1.5)*(1-c)^(-1.5)", Options{})
	if err != nil {
		b.Fatal(err)
	}
	ev := g.NewBinary()
	b.ReportAllocs()
	var s float64
	for i := 0; i < b.N; i++ {
		y, n := ev.Losses(float64(i%997+1) / 999)
		s += y + n
	}
	_ = s
}

func BenchmarkNew(b *testing.B) {
	for i := 0; i < b.N; i++ {
		if _, err := New("exp(-(c-0.3)^2/0.01)", Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
