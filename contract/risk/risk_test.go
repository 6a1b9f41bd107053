package risk

import (
	"context"
	"math"
	"strconv"
	"testing"

	"scorewright/generator/bregman"
	"scorewright/generator/bregman/bregmantest"
	"scorewright/generator/emphasis"
)

func rule(t *testing.T, src string, n int) *bregman.Rule {
	return bregmantest.Rule(t, src, bregman.Options{Outcomes: n})
}

const (
	logGen  = "-sum(p*ln(p))"
	quadGen = "1 - sum(p^2)"
)

func TestLinearUtilityIsTruthful(t *testing.T) {
	// A risk-neutral forecaster maximises expected pay, which a proper rule
	// maximises at the belief (Gneiting & Raftery 2007, JASA 102:359-378).
	for _, tc := range []struct {
		src string
		q   []float64
		u   Utility
	}{
		{logGen, []float64{0.8, 0.2}, Utility{Kind: Linear}},
		{quadGen, []float64{0.15, 0.85}, Utility{Kind: Linear}},
		{logGen, []float64{0.5, 0.3, 0.2}, Utility{Kind: CARA, Coef: 0}},
		{quadGen, []float64{0.1, 0.6, 0.2, 0.1}, Utility{Kind: CRRA, Coef: 0}},
	} {
		s, err := NewSolver(rule(t, tc.src, len(tc.q)), Contract{A: 10, B: 2}, tc.u, 0)
		if err != nil {
			t.Fatal(err)
		}
		r, err := s.Best(tc.q)
		if err != nil {
			t.Fatal(err)
		}
		if r.Size > 1e-5 {
			t.Errorf("%s %v: report %v, distortion %g points", tc.src, tc.q, r.Report, r.Size)
		}
	}
}

func TestCARALogRule(t *testing.T) {
	// Derived by hand: with the log rule, pay_k = A + B ln p_k, and CARA
	// utility -exp(-a x)/a, expected utility is -exp(-aA)/a sum_k q_k
	// p_k^(-aB). Maximising over the simplex with a Lagrange multiplier,
	// q_k aB p_k^(-aB-1) = lambda, so p_k ∝ q_k^(1/(1+aB)): the report is the
	// belief raised to 1/(1+aB) and renormalised (for n = 2, the log-odds
	// shrink by the factor 1 + aB).
	cases := []struct {
		q    []float64
		a, b float64
	}{
		{[]float64{0.8, 0.2}, 1, 1},              // p = 2/3
		{[]float64{0.6, 0.3, 0.1}, 0.5, 2},       // p ∝ sqrt(q)
		{[]float64{0.05, 0.95}, 0.2, 3},          //
		{[]float64{0.7, 0.1, 0.1, 0.1}, -0.3, 1}, // risk-seeking: more extreme
	}
	for _, tc := range cases {
		s, err := NewSolver(rule(t, logGen, len(tc.q)), Contract{A: 10, B: tc.b}, Utility{Kind: CARA, Coef: tc.a}, 0)
		if err != nil {
			t.Fatal(err)
		}
		r, err := s.Best(tc.q)
		if err != nil {
			t.Fatal(err)
		}
		want := make([]float64, len(tc.q))
		var sum float64
		for i, q := range tc.q {
			want[i] = math.Pow(q, 1/(1+tc.a*tc.b))
			sum += want[i]
		}
		for i := range want {
			want[i] /= sum
			if math.Abs(r.Report[i]-want[i]) > 1e-7 {
				t.Errorf("q %v a %g B %g: report %v, want %v (status %s)", tc.q, tc.a, tc.b, r.Report, want, r.Status)
				break
			}
		}
	}
	if p := 2.0 / 3; math.Abs(p-math.Pow(0.8, 0.5)/(math.Pow(0.8, 0.5)+math.Pow(0.2, 0.5))) > 1e-15 {
		t.Fatal("hand value")
	}
}

func TestCRRAFirstOrderCondition(t *testing.T) {
	// Derived by hand for n = 2: with pay_k = A - B L_k and the generator's
	// weight w = -h'', dEU/dp = B w [q (1-p) u'(x_yes) - (1-q) p u'(x_no)],
	// so at the best interior report q (1-p) x_yes^-R = (1-q) p x_no^-R.
	// For the log rule x_yes = W + A + B ln p and x_no = W + A + B ln(1-p).
	const W, A, B, R = 5.0, 20, 4, 3
	s, err := NewSolver(rule(t, logGen, 2), Contract{A: A, B: B, MinPay: 1, ReportFloor: 0.01}, Utility{Kind: CRRA, Coef: R}, W)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []float64{0.2, 0.5, 0.7, 0.9} {
		r, err := s.Best([]float64{q, 1 - q})
		if err != nil {
			t.Fatal(err)
		}
		p := r.Report[0]
		xy, xn := W+A+B*math.Log(p), W+A+B*math.Log(1-p)
		lhs, rhs := q*(1-p)*math.Pow(xy, -R), (1-q)*p*math.Pow(xn, -R)
		if math.Abs(lhs-rhs) > 1e-9*math.Abs(lhs) {
			t.Errorf("q = %g: p = %v, FOC sides %v %v", q, p, lhs, rhs)
		}
		// Risk aversion shades toward 1/2.
		if q != 0.5 && !(math.Abs(p-0.5) < math.Abs(q-0.5)) || q == 0.5 && math.Abs(p-0.5) > 1e-9 {
			t.Errorf("q = %g: report %v not shaded toward 1/2", q, p)
		}
		if r.ExpectedPay > r.TruthfulPay+1e-12 {
			t.Errorf("q = %g: shaded report earns more in expectation (%v > %v)", q, r.ExpectedPay, r.TruthfulPay)
		}
	}
}

func TestCurveAndErrors(t *testing.T) {
	s, err := NewSolver(rule(t, quadGen, 2), Contract{A: 100, B: 50}, Utility{Kind: CARA, Coef: 0.05}, 0)
	if err != nil {
		t.Fatal(err)
	}
	c, err := s.Distortion(context.Background(), BinaryBeliefs(0.05, 0), nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Points) != 19 || c.Largest.Size <= 0 {
		t.Fatalf("curve of %d points, largest %v", len(c.Points), c.Largest)
	}
	// Symmetric rule and utility: distortion at q and 1 - q match.
	if d := math.Abs(c.Points[2].Size - c.Points[16].Size); d > 1e-6 {
		t.Errorf("asymmetric curve: %v vs %v", c.Points[2].Size, c.Points[16].Size)
	}
	b, toward := DirectionBeliefs(3, 4)
	if len(b) != 9 || toward[8] != 2 || math.Abs(b[8][2]-(0.25/3+0.75)) > 1e-15 {
		t.Errorf("directions %v %v", b, toward)
	}
	if _, err := NewSolver(rule(t, logGen, 2), Contract{A: 0, B: 1}, Utility{Kind: CRRA, Coef: 2}, 0); err == nil {
		t.Error("CRRA with no positive wealth accepted")
	}
	if _, err := NewSolver(rule(t, logGen, 2), Contract{A: 0, B: 0}, Utility{Kind: Linear}, 0); err == nil {
		t.Error("B = 0 accepted")
	}
	for _, bad := range []string{"crra", "crra:x", "log:2", "cara:NaN"} {
		if _, err := ParseUtility(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
	if u, err := ParseUtility("CRRA: 2.5"); err != nil || u.Kind != CRRA || u.Coef != 2.5 {
		t.Errorf("crra: 2.5 -> %v %v", u, err)
	}
}

func BenchmarkBest(b *testing.B) {
	for _, n := range []int{2, 4, 8} {
		f, _ := bregman.NewFormula(logGen, bregman.Options{Outcomes: n})
		s, _ := NewSolver(&bregman.Rule{Gen: f}, Contract{A: 10, B: 1}, Utility{Kind: CRRA, Coef: 2}, 20)
		q := make([]float64, n)
		for i := range q {
			q[i] = float64(i+1) / float64(n*(n+1)/2)
		}
		b.Run("n="+string(rune('0'+n)), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := s.Best(q); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func TestBestOfMenu(t *testing.T) {
	menu := make([][]float64, 21)
	for i := range menu {
		p := float64(i) / 20
		menu[i] = []float64{p, 1 - p}
	}
	menu = menu[1:20] // the log rule is infinite at 0 and 1
	q := []float64{0.8, 0.2}
	payRows := func(c Contract) [][]float64 {
		sc := rule(t, logGen, 2).NewScorer()
		rows := make([][]float64, len(menu))
		for i, p := range menu {
			rows[i] = make([]float64, 2)
			sc.Efforts(rows[i], p)
			for k := range rows[i] {
				rows[i][k] = c.A - c.B*rows[i][k]
			}
		}
		return rows
	}
	// Risk-neutral: the belief itself is on the menu and is best (proper rule).
	lin, _ := NewSolver(rule(t, logGen, 2), Contract{A: 10, B: 1}, Utility{Kind: Linear}, 0)
	if i := lin.BestOf(q, payRows(Contract{A: 10, B: 1})); menu[i][0] != 0.8 {
		t.Errorf("linear: menu pick %v", menu[i])
	}
	// CARA a·B = 1: the continuous best is 2/3 (TestCARALogRule); the menu
	// pick is a neighbour of it.
	cara, _ := NewSolver(rule(t, logGen, 2), Contract{A: 10, B: 1}, Utility{Kind: CARA, Coef: 1}, 0)
	if i := cara.BestOf(q, payRows(Contract{A: 10, B: 1})); math.Abs(menu[i][0]-2.0/3) > 0.05 {
		t.Errorf("CARA: menu pick %v, want a neighbour of 2/3", menu[i])
	}
}

// An emphasis-designed log rule (w = 1/(c(1-c)), Schervish 1989) gives the
// same CARA report as the log generator: odds shrink by the power
// 1/(1 + aB) (derived by hand in TestCARALogRule). This runs the solver
// through the emphasis generator's homogeneous Hessian.
func TestCARAEmphasisLogRule(t *testing.T) {
	g, err := emphasis.New("1/(c*(1-c))", emphasis.Options{})
	if err != nil {
		t.Fatal(err)
	}
	s, err := NewSolver(&bregman.Rule{Gen: g}, Contract{A: 10, B: 2, ReportFloor: 0.001}, Utility{Kind: CARA, Coef: 0.25}, 0)
	if err != nil {
		t.Fatal(err)
	}
	r, err := s.Best([]float64{0.9, 0.1})
	if err != nil {
		t.Fatal(err)
	}
	odds := math.Pow(9, 1/(1+0.25*2))
	if want := odds / (1 + odds); math.Abs(r.Report[0]-want) > 1e-7 {
		t.Errorf("report %v, want %v (status %s)", r.Report, want, r.Status)
	}
}

// TestBinaryBeliefsAreDecimals: the curve's beliefs are the floats nearest
// the decimals they stand for (k/100 is correctly rounded by IEEE
// division), so JSON shows 0.06, and q + (1 - q) stays a belief.
func TestBinaryBeliefsAreDecimals(t *testing.T) {
	for _, c := range []struct{ step, floor float64 }{{0.01, 0}, {0.05, 0.01}, {0.01, 0.02}} {
		bs := BinaryBeliefs(c.step, c.floor)
		for _, q := range bs {
			if s := strconv.FormatFloat(q[0], 'g', -1, 64); len(s) > 4 {
				t.Errorf("step %g floor %g: belief %s is not a short decimal", c.step, c.floor, s)
			}
		}
	}
	if bs := BinaryBeliefs(0.01, 0); len(bs) != 99 || bs[5][0] != 0.06 || bs[98][0] != 0.99 {
		t.Errorf("step 0.01: %d beliefs, [5] = %v, last %v", len(bs), bs[5], bs[len(bs)-1])
	}
}
