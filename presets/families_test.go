package presets

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"scorewright/generator/emphasis"
	"scorewright/generator/point"
)

// The power rule near its log limit keeps full precision. With d = g - 1
// and p^d = exp(d ln p), derived by hand from the Taylor series:
//
//	H = -sum p expm1(d ln p)/d = -sum p ln p - (d/2) sum p ln²p + O(d²)
//	L(p, k) = [1 + d sum p^g - g p_k^d]/d = -ln p_k + d (S1 - ln p_k - ln²p_k/2) + O(d²)
//
// with S1 = sum p ln p. At d = 1e-10 the O(d²) terms are below 1e-19, so
// the series is the reference to double precision; the plain form
// (1 - sum p^g)/(g - 1) gets about six digits there. g = 1 is the log rule
// (Good 1952) exactly.
func TestPowerNearLogLimit(t *testing.T) {
	p := []float64{0.2, 0.3, 0.5}
	var s1, s2 float64
	for _, x := range p {
		l := math.Log(x)
		s1 += x * l
		s2 += x * l * l
	}
	for _, d := range []float64{1e-10, -1e-10, 1e-13} {
		s := rule(t, "power", 3, map[string]float64{"g": 1 + d}, nil).NewScorer()
		eff := make([]float64, 3)
		h := s.Efforts(eff, p)
		if want := -s1 - d/2*s2; math.Abs(h-want) > 4e-16*math.Abs(want) {
			t.Errorf("g = 1%+g: H = %.17g, series %.17g (relative error %.2g)", d, h, want, math.Abs(h-want)/want)
		}
		for k, x := range p {
			l := math.Log(x)
			if want := -l + d*(s1-l-l*l/2); math.Abs(eff[k]-want) > 4e-15*math.Abs(want) {
				t.Errorf("g = 1%+g: L(p, %d) = %.17g, series %.17g", d, k+1, eff[k], want)
			}
		}
	}
	s := rule(t, "power", 3, map[string]float64{"g": 1}, nil).NewScorer()
	eff := make([]float64, 3)
	s.Efforts(eff, p)
	for k, x := range p {
		if math.Abs(eff[k]+math.Log(x)) > 1e-15 {
			t.Errorf("g = 1: L(p, %d) = %v, want -ln %v", k+1, eff[k], x)
		}
	}
}

// Ranked probability rule against Epstein's (1969) normalised values,
// RPS = L / (n - 1).
func TestRankedProbability(t *testing.T) {
	s := rule(t, "ranked", 3, nil, nil).NewScorer()
	cases := []struct {
		p       []float64
		outcome int
		rps     float64
	}{
		{[]float64{0.9, 0.1, 0}, 0, 0.005},                            // Epstein (1969), recomputed in check-values.md
		{[]float64{0.5, 0.25, 0.25}, 0, 0.15625},                      // same
		{[]float64{0.6, 0.3, 0.1}, 1, 0.185},                          // same
		{[]float64{1.0 / 3, 1.0 / 3, 1.0 / 3}, 2, 0.2777777777777778}, // ((1/3)^2 + (2/3)^2)/2, derived by hand
	}
	eff := make([]float64, 3)
	for _, c := range cases {
		s.Efforts(eff, c.p)
		if got := eff[c.outcome] / 2; !near(got, c.rps, 1e-12) {
			t.Errorf("RPS(%v, outcome %d) = %v, want %v", c.p, c.outcome+1, got, c.rps)
		}
	}
}

// Weighted quadratic: L(p, k) = sum_i w_i (p_i - [i = k])^2 (derived by hand
// from the generator sum w p (1 - p)).
func TestWeightedQuadratic(t *testing.T) {
	w := []float64{1, 2, 0.5, 3}
	s := rule(t, "weighted-quadratic", 4, nil, w).NewScorer()
	rng := rand.New(rand.NewPCG(29, 31))
	eff := make([]float64, 4)
	for trial := 0; trial < 20; trial++ {
		p := simplexPoint(rng, 4)
		s.Efforts(eff, p)
		for k := range eff {
			var want float64
			for i := range p {
				o := 0.0
				if i == k {
					o = 1
				}
				want += w[i] * (p[i] - o) * (p[i] - o)
			}
			if !near(eff[k], want, 1e-12) {
				t.Errorf("L(p,%d) = %v, want %v", k, eff[k], want)
			}
		}
	}
}

// Binary extras: the emphasis weight -H”(p) is 4 for the quadratic
// generator 1 - p^2 - (1-p)^2 = 2p(1-p) and 1/(p(1-p)) for the log
// generator (derived by hand); H' is the difference of the two partials.
func TestBinaryEmphasis(t *testing.T) {
	q := rule(t, "quadratic", 2, nil, nil).NewScorer()
	l := rule(t, "log", 2, nil, nil).NewScorer()
	for _, p := range []float64{0.1, 0.3, 0.5, 0.8} {
		h, dh, w := q.Binary(p)
		if !near(h, 2*p*(1-p), 1e-14) || !near(dh, 2-4*p, 1e-14) || !near(w, 4, 1e-14) {
			t.Errorf("quadratic at %v: h=%v h'=%v w=%v", p, h, dh, w)
		}
		_, dh, w = l.Binary(p)
		if !near(dh, math.Log((1-p)/p), 1e-13) || !near(w, 1/(p*(1-p)), 1e-12) {
			t.Errorf("log at %v: h'=%v w=%v", p, dh, w)
		}
	}
}

// What moving a report is worth: Phi(q, r) - Phi(q, p) = D(q, r) - D(q, p)
// (domain.md, "useful identities"), for every generator preset.
func TestValueOfMovingAReport(t *testing.T) {
	rng := rand.New(rand.NewPCG(43, 47))
	for _, name := range []string{"log", "quadratic", "spherical", "pseudospherical", "power", "ranked"} {
		s := rule(t, name, 4, nil, nil).NewScorer()
		for trial := 0; trial < 20; trial++ {
			q, r, p := simplexPoint(rng, 4), simplexPoint(rng, 4), simplexPoint(rng, 4)
			lhs := s.Expected(q, r) - s.Expected(q, p)
			rhs := s.Divergence(q, r) - s.Divergence(q, p)
			if !near(lhs, rhs, 1e-12) {
				t.Errorf("%s: %v != %v", name, lhs, rhs)
			}
		}
	}
}

// The presets that are not generators over outcomes run through the same
// exact derivatives: point presets' phi'(x) and phi”(x), and the beta
// emphasis rule's formal gradient and Hessian, agree with gonum's diff/fd
// central differences.
func TestOtherPresetDerivatives(t *testing.T) {
	for _, p := range All() {
		if p.Kind != KindPoint {
			continue
		}
		g, err := point.New(p.Formula, 1, 10, point.Options{})
		if err != nil {
			t.Fatalf("%s: %v", p.Name, err)
		}
		ev := g.NewEvaluator()
		phi := func(x float64) float64 { return ev.Phi(x) }
		for _, x := range []float64{1.5, 3, 7.25, 9} {
			_, d1, d2 := ev.Derivatives(x)
			if want := fd.Derivative(phi, x, &fd.Settings{Formula: fd.Central}); !near(d1, want, 1e-6) {
				t.Errorf("%s at %v: phi' = %v, finite differences %v", p.Name, x, d1, want)
			}
			if want := fd.Derivative(phi, x, &fd.Settings{Formula: fd.Central2nd}); !near(d2, want, 1e-4) {
				t.Errorf("%s at %v: phi'' = %v, finite differences %v", p.Name, x, d2, want)
			}
		}
	}
	beta, _ := Lookup("beta")
	for _, params := range []map[string]float64{{"a": 1, "b": 1}, {"a": 0.5, "b": 3}} {
		g, err := emphasis.New(beta.Formula, emphasis.Options{Params: params})
		if err != nil {
			t.Fatal(err)
		}
		ev := g.NewEvaluator()
		f := func(x []float64) float64 { return ev.Value(x) }
		grad, hess := make([]float64, 2), make([]float64, 4)
		for _, q := range []float64{0.2, 0.45, 0.8} {
			x := []float64{q, 1 - q}
			ev.Hessian(hess, grad, x)
			wantG := fd.Gradient(nil, f, x, &fd.Settings{Formula: fd.Central})
			wantH := mat.NewSymDense(2, nil)
			fd.Hessian(wantH, f, x, nil)
			for i := 0; i < 2; i++ {
				if !near(grad[i], wantG[i], 1e-6) {
					t.Errorf("beta %v at %v: d/dp%d = %v, finite differences %v", params, x, i+1, grad[i], wantG[i])
				}
				for j := 0; j < 2; j++ {
					if !near(hess[i*2+j], wantH.At(i, j), 2e-3) {
						t.Errorf("beta %v at %v: H[%d][%d] = %v, finite differences %v", params, x, i, j, hess[i*2+j], wantH.At(i, j))
					}
				}
			}
		}
	}
}

// Patton's (2011, J. Econometrics 160:246-256, eq. 5) homogeneous family
// of Bregman losses for a positive quantity, against his closed forms:
//
//	b ∉ {-1, -2}: L = (y^(b+2) - x^(b+2))/((b+1)(b+2)) - x^(b+1)(y - x)/(b+1)
//	b = -1:       L = x - y + y ln(y/x)
//	b = -2:       L = y/x - ln(y/x) - 1   (QLIKE)
//
// The limits are the preset's own, not 0/0; near them (b = -1 ± 1e-9,
// -2 ± 1e-9) the loss differs from the limit by O(1e-9) (its derivative in
// b is bounded on the interval), which the plain form, cancelling terms of
// size 1e9, could not show.
func TestPattonFamily(t *testing.T) {
	p, _ := Lookup("patton")
	general := func(b float64) func(y, x float64) float64 {
		return func(y, x float64) float64 {
			return (math.Pow(y, b+2)-math.Pow(x, b+2))/((b+1)*(b+2)) - math.Pow(x, b+1)*(y-x)/(b+1)
		}
	}
	limM1 := func(y, x float64) float64 { return x - y + y*math.Log(y/x) }
	limM2 := func(y, x float64) float64 { return y/x - math.Log(y/x) - 1 }
	cases := []struct {
		b    float64
		want func(y, x float64) float64
		tol  float64
	}{
		{1, general(1), 1e-12}, {0, general(0), 1e-12}, {0.5, general(0.5), 1e-12}, {-1.3, general(-1.3), 1e-11}, {-3, general(-3), 1e-11},
		{-1, limM1, 1e-13}, {-2, limM2, 1e-13},
		{-1 + 1e-9, limM1, 1e-8}, {-1 - 1e-9, limM1, 1e-8}, {-2 + 1e-9, limM2, 1e-8}, {-2 - 1e-9, limM2, 1e-8},
	}
	for _, c := range cases {
		g, err := point.New(p.Formula, 0.5, 4, point.Options{Params: map[string]float64{"b": c.b}})
		if err != nil {
			t.Fatal(err)
		}
		ev := g.NewEvaluator()
		for _, y := range []float64{0.5, 1, 2.5, 4} {
			for _, x := range []float64{0.5, 0.9, 2, 3.7} {
				if got, want := ev.Divergence(y, x), c.want(y, x); math.Abs(got-want) > c.tol*(1+math.Abs(want)) {
					t.Errorf("b = %g: L(y = %g, x = %g) = %.15g, Patton %.15g", c.b, y, x, got, want)
				}
			}
		}
	}
}
