package risk

import (
	"math"
	"testing"
)

// quadPay is the quadratic rule on [0, 100] for n = 2, written out by hand:
// effort L(r, yes) = 2(1-r)^2, L(r, no) = 2r^2 for 1 - sum(p^2), and the fit
// A = 100, B = 50 (the efforts span [0, 2]), so pay is 100 - 100(1-r)^2 if
// the event happens and 100 - 100 r^2 if not.
func quadPay(r float64) (yes, no float64) { return 100 - 100*(1-r)*(1-r), 100 - 100*r*r }

// bruteBinary maximises expected utility eu(yes, no) over reports r in
// [lo, hi] on a grid of the given step: an independent search that shares
// nothing with the solver.
func bruteBinary(lo, hi, step float64, pays func(float64) (float64, float64), eu func(yes, no float64) float64) float64 {
	best, at := math.Inf(-1), lo
	for i := 0; ; i++ {
		r := lo + float64(i)*step
		if r > hi {
			break
		}
		if v := eu(pays(r)); v > best {
			best, at = v, r
		}
	}
	if v := eu(pays(hi)); v > best {
		at = hi
	}
	return at
}

// The case of the issue: quadratic rule on [0, 100], CARA 0.01, belief
// 0.3. Best report 0.361273 (to six digits), checked here against a brute
// force over a grid of step 1e-6 and the first-order condition derived by
// hand: dEU/dr ∝ q (1-r) e^(-a x_yes) - (1-q) r e^(-a x_no) = 0.
func TestQuadraticCARAIssueCase(t *testing.T) {
	const a, q = 0.01, 0.3
	s, err := NewSolver(rule(t, quadGen, 2), Contract{A: 100, B: 50}, Utility{Kind: CARA, Coef: a}, 0)
	if err != nil {
		t.Fatal(err)
	}
	r, err := s.Best([]float64{q, 1 - q})
	if err != nil {
		t.Fatal(err)
	}
	p := r.Report[0]
	brute := bruteBinary(0, 1, 1e-6, quadPay, func(y, n float64) float64 { return -q*math.Exp(-a*y) - (1-q)*math.Exp(-a*n) })
	if math.Abs(p-brute) > 1.5e-6 || math.Abs(p-0.361273) > 5e-7 {
		t.Errorf("best report %.9f, brute force %.9f, want 0.361273", p, brute)
	}
	y, n := quadPay(p)
	lhs, rhs := q*(1-p)*math.Exp(-a*y), (1-q)*p*math.Exp(-a*n)
	if math.Abs(lhs-rhs) > 1e-12*lhs {
		t.Errorf("first-order condition: %v vs %v (report %v, %s)", lhs, rhs, p, r.Status)
	}
}

// CRRA 2 under a log rule with a report floor, on every belief of the
// curve: no belief fails, and each best report meets the first-order
// condition derived by hand in TestCRRAFirstOrderCondition (or sits on the
// floor with the gradient pointing out of the range).
func TestCRRALogRuleWithFloorCurve(t *testing.T) {
	const f, W = 0.01, 20.0
	B := 10 / (math.Log(0.99) - math.Log(f)) // cap 10, floor 0 on a menu from 0.01 to 0.99
	A := -B * math.Log(f)
	s, err := NewSolver(rule(t, logGen, 2), Contract{A: A, B: B, ReportFloor: f}, Utility{Kind: CRRA, Coef: 2}, W)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range BinaryBeliefs(0.01, f) {
		r, err := s.Best(q)
		if err != nil {
			t.Fatalf("belief %v: %v", q, err)
		}
		p := r.Report[0]
		xy, xn := W+A+B*math.Log(p), W+A+B*math.Log(1-p)
		d := q[0]*(1-p)/(xy*xy) - q[1]*p/(xn*xn) // ∝ dEU/dp, u' = x^-2
		scale := q[0]*(1-p)/(xy*xy) + q[1]*p/(xn*xn)
		switch {
		case p == f && d <= 0, p == 1-f && d >= 0:
		case math.Abs(d) > 1e-12*scale:
			t.Errorf("belief %v: report %v, first-order residual %g", q, p, d/scale)
		}
	}
	// One belief against a brute force.
	q := 0.28
	brute := bruteBinary(f, 1-f, 1e-6, func(r float64) (float64, float64) { return A + B*math.Log(r), A + B*math.Log(1-r) },
		func(y, n float64) float64 { return -q/(W+y) - (1-q)/(W+n) })
	r, _ := s.Best([]float64{q, 1 - q})
	if math.Abs(r.Report[0]-brute) > 1.5e-6 {
		t.Errorf("belief 0.28: report %v, brute force %v", r.Report[0], brute)
	}
}

// Risk seeking (issue cases cara:-1 and cara:-1e6): under the quadratic
// rule on [0, 100] a forecaster with belief 0.3 and a strongly convex
// utility stakes everything on the likelier outcome: report 0, paid 100
// with probability 0.7, expected pay 70 (derived by hand: the certainty
// equivalent is at most the largest payment, 100 only at a corner, and
// of the two corners the one with the likelier outcome is worth more).
// The menu pick on the table agrees.
func TestRiskSeekingCorner(t *testing.T) {
	menu := make([][]float64, 21)
	for i := range menu {
		y, n := quadPay(float64(i) / 20)
		menu[i] = []float64{y, n}
	}
	for _, u := range []Utility{{CARA, -1}, {CARA, -1e6}, {CRRA, -3}} {
		s, err := NewSolver(rule(t, quadGen, 2), Contract{A: 100, B: 50}, u, 0)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []float64{0.3, 0.7} {
			r, err := s.Best([]float64{q, 1 - q})
			if err != nil {
				t.Fatalf("%v belief %v: %v", u, q, err)
			}
			want := 0.0
			if q > 0.5 {
				want = 1
			}
			pick := float64(s.BestOf([]float64{q, 1 - q}, menu)) / 20
			if r.Report[0] != want || pick != want || math.Abs(r.ExpectedPay-100*math.Max(q, 1-q)) > 1e-9 {
				t.Errorf("%v belief %v: report %v, menu pick %v, expected pay %v; want %v, %v, %v", u, q, r.Report, pick, r.ExpectedPay, want, want, 100*math.Max(q, 1-q))
			}
		}
	}
}

// Mild risk seeking: reports move away from 1/2, past the belief, and
// the menu pick never moves the other way (it may stay at the belief when
// the shift is under half a menu step). Checked against a brute force for
// CRRA -1 (u = x^2/2) with wealth 100.
func TestRiskSeekingDirection(t *testing.T) {
	menu := make([][]float64, 21)
	for i := range menu {
		y, n := quadPay(float64(i) / 20)
		menu[i] = []float64{y, n}
	}
	for _, u := range []Utility{{CRRA, -1}, {CARA, -0.01}} {
		s, err := NewSolver(rule(t, quadGen, 2), Contract{A: 100, B: 50}, u, 100)
		if err != nil {
			t.Fatal(err)
		}
		for i := 1; i < 20; i++ {
			q := float64(i) / 20
			r, err := s.Best([]float64{q, 1 - q})
			if err != nil {
				t.Fatal(err)
			}
			p, pick := r.Report[0], float64(s.BestOf([]float64{q, 1 - q}, menu))/20
			if q != 0.5 && !(math.Abs(p-0.5) > math.Abs(q-0.5)) {
				t.Errorf("%v belief %v: report %v is not further from 1/2", u, q, p)
			}
			if (pick-q)*(p-q) < 0 {
				t.Errorf("%v belief %v: report %v but menu pick %v", u, q, p, pick)
			}
			if u.Kind == CRRA && q != 0.5 {
				brute := bruteBinary(0, 1, 1e-5, quadPay, func(y, n float64) float64 { return q*(100+y)*(100+y) + (1-q)*(100+n)*(100+n) })
				if math.Abs(p-brute) > 2e-5 {
					t.Errorf("CRRA -1 belief %v: report %v, brute force %v", q, p, brute)
				}
			}
		}
	}
}

// CRRA below 1 is defined at zero wealth: u(x) = 2 sqrt(x) for R = 1/2,
// u(0) = 0. With no initial wealth and a zero floor the solver runs, and
// its report matches a brute force; R = 2 at zero wealth and any R at a
// negative wealth are refused.
func TestCRRABelowOneAtZeroWealth(t *testing.T) {
	s, err := NewSolver(rule(t, quadGen, 2), Contract{A: 100, B: 50, MinPay: 0}, Utility{Kind: CRRA, Coef: 0.5}, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []float64{0.05, 0.3, 0.8} {
		r, err := s.Best([]float64{q, 1 - q})
		if err != nil {
			t.Fatal(err)
		}
		brute := bruteBinary(0, 1, 1e-6, quadPay, func(y, n float64) float64 { return q*math.Sqrt(y) + (1-q)*math.Sqrt(n) })
		if math.Abs(r.Report[0]-brute) > 1.5e-6 {
			t.Errorf("belief %v: report %v, brute force %v", q, r.Report[0], brute)
		}
	}
	if _, err := NewSolver(rule(t, quadGen, 2), Contract{A: 100, B: 50}, Utility{Kind: CRRA, Coef: 2}, 0); err == nil {
		t.Error("CRRA 2 at zero wealth accepted")
	}
	if _, err := NewSolver(rule(t, quadGen, 2), Contract{A: 100, B: 50}, Utility{Kind: CRRA, Coef: -1}, -1); err == nil {
		t.Error("CRRA -1 at negative wealth accepted")
	}
}

// Three outcomes against a brute force over a simplex grid of step 1/300
// (45,451 reports, expected utility computed directly): the solver's
// report is at least as good as every grid report and within a grid step
// of the grid's best, for a risk-averse and a risk-seeking forecaster.
func TestThreeOutcomesBruteForce(t *testing.T) {
	sq := func(p []float64, k int) float64 { // quadratic effort by hand
		var s float64
		for i, x := range p {
			e := x
			if i == k {
				e = 1 - x
			}
			s += e * e
		}
		return s
	}
	q := []float64{0.2, 0.3, 0.5}
	for _, tc := range []struct {
		u  Utility
		eu func(x float64) float64
	}{
		{Utility{CRRA, 2}, func(x float64) float64 { return -1 / x }},
		{Utility{CARA, -0.05}, func(x float64) float64 { return math.Exp(0.05 * x) }},
	} {
		const W, A, B = 10.0, 100.0, 50.0
		s, err := NewSolver(rule(t, quadGen, 3), Contract{A: A, B: B}, tc.u, W)
		if err != nil {
			t.Fatal(err)
		}
		r, err := s.Best(q)
		if err != nil {
			t.Fatal(err)
		}
		eu := func(p []float64) float64 {
			var v float64
			for k, qk := range q {
				v += qk * tc.eu(W+A-B*sq(p, k))
			}
			return v
		}
		const K = 300
		best, at := math.Inf(-1), []float64(nil)
		for i := 0; i <= K; i++ {
			for j := 0; i+j <= K; j++ {
				p := []float64{float64(i) / K, float64(j) / K, float64(K-i-j) / K}
				if v := eu(p); v > best {
					best, at = v, p
				}
			}
		}
		if got := eu(r.Report); got < best-1e-12*math.Abs(best) {
			t.Errorf("%v: report %v worth %v, grid best %v at %v", tc.u, r.Report, got, best, at)
		}
		for k := range at {
			if math.Abs(at[k]-r.Report[k]) > 1.0/K {
				t.Errorf("%v: report %v, grid best %v", tc.u, r.Report, at)
				break
			}
		}
	}
}

// Certainty equivalents against closed forms derived by hand: CARA with a
// huge negative coefficient is the largest wealth plus ln(q)/|a| of its
// outcome; a tiny coefficient gives mean - a·variance/2 (Arrow–Pratt, from
// memory); CRRA 1/2 is (sum q sqrt x)^2, CRRA 1 the geometric mean, CRRA 2
// the harmonic mean, with zero wealth worth 0 from R = 1 on.
func TestCertaintyEquivalents(t *testing.T) {
	x, q := []float64{10, 40, 25}, []float64{0.5, 0.2, 0.3}
	mean := 0.5*10 + 0.2*40 + 0.3*25
	vari := 0.5*(10-mean)*(10-mean) + 0.2*(40-mean)*(40-mean) + 0.3*(25-mean)*(25-mean)
	for _, c := range []struct {
		u    Utility
		want float64
		tol  float64
	}{
		{Utility{CARA, -1e6}, 40 + math.Log(0.2)/1e6, 1e-13},
		{Utility{CARA, 1e-9}, mean - 1e-9*vari/2, 1e-13},
		{Utility{CARA, -1e-9}, mean + 1e-9*vari/2, 1e-13},
		{Utility{CRRA, 0.5}, math.Pow(0.5*math.Sqrt(10)+0.2*math.Sqrt(40)+0.3*5, 2), 1e-13},
		{Utility{CRRA, 1}, math.Exp(0.5*math.Log(10) + 0.2*math.Log(40) + 0.3*math.Log(25)), 1e-13},
		{Utility{CRRA, 2}, 1 / (0.5/10 + 0.2/40 + 0.3/25), 1e-13},
		{Utility{CRRA, -1e4}, 40 * math.Exp(math.Log(0.2)/(1+1e4)), 1e-12},
		{Utility{Linear, 0}, mean, 1e-15},
	} {
		if got := c.u.certainty(x, q); math.Abs(got-c.want) > c.tol*math.Abs(c.want) {
			t.Errorf("%v: certainty equivalent %.17g, want %.17g", c.u, got, c.want)
		}
	}
	if got := (Utility{CRRA, 2}).certainty([]float64{0, 5}, []float64{0.5, 0.5}); got != 0 {
		t.Errorf("CRRA 2 with a zero wealth: %v, want 0", got)
	}
	if got := (Utility{CRRA, 0.5}).certainty([]float64{0, 16}, []float64{0.5, 0.5}); math.Abs(got-4) > 1e-14 {
		t.Errorf("CRRA 1/2 with a zero wealth: %v, want (0.5·4)^2 = 4", got)
	}
}
