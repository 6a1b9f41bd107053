package presets

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"

	"scorewright/generator/bregman"
)

// rule compiles a preset for n outcomes, failing the test on error.
func rule(t testing.TB, name string, n int, params map[string]float64, weights []float64) *bregman.Rule {
	t.Helper()
	p, err := Lookup(name)
	if err != nil {
		t.Fatal(err)
	}
	f, err := bregman.NewFormula(p.Formula, bregman.Options{Outcomes: n, Ordered: p.Ordered, Params: params, Weights: weights})
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	return &bregman.Rule{Gen: f, Ordered: p.Ordered}
}

// simplexPoint draws from the flat Dirichlet distribution, pushed a little
// into the interior so logarithms stay moderate.
func simplexPoint(rng *rand.Rand, n int) []float64 {
	p := make([]float64, n)
	for i := range p {
		p[i] = rng.ExpFloat64() + 0.02
	}
	floats.Scale(1/floats.Sum(p), p)
	return p
}

func near(a, b, tol float64) bool {
	return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b))
}

// Log generator: D(q, p) is the Kullback–Leibler divergence, checked
// against gonum's stat.KullbackLeibler; Phi(q, p) against stat.CrossEntropy;
// H against stat.Entropy; L(p, k) = -ln p_k (Good 1952).
func TestLogAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for n := 2; n <= 12; n++ {
		r := rule(t, "log", n, nil, nil)
		s := r.NewScorer()
		eff := make([]float64, n)
		for trial := 0; trial < 50; trial++ {
			q, p := simplexPoint(rng, n), simplexPoint(rng, n)
			if got, want := s.Divergence(q, p), stat.KullbackLeibler(q, p); !near(got, want, 1e-12) {
				t.Errorf("n=%d D(q,p) = %v, stat.KullbackLeibler = %v", n, got, want)
			}
			if got, want := s.Expected(q, p), stat.CrossEntropy(q, p); !near(got, want, 1e-12) {
				t.Errorf("n=%d Phi(q,p) = %v, stat.CrossEntropy = %v", n, got, want)
			}
			if got, want := s.Entropy(q), stat.Entropy(q); !near(got, want, 1e-12) {
				t.Errorf("n=%d H(q) = %v, stat.Entropy = %v", n, got, want)
			}
			s.Efforts(eff, p)
			for k := range eff {
				if want := -math.Log(p[k]); !near(eff[k], want, 1e-12) {
					t.Errorf("n=%d L(p,%d) = %v, want -ln p_k = %v", n, k, eff[k], want)
				}
			}
		}
	}
}

// Kullback (1959), Example 2.1: P = (0.36, 0.48, 0.16) against the uniform Q.
func TestKullbackExample(t *testing.T) {
	s := rule(t, "log", 3, nil, nil).NewScorer()
	P := []float64{0.36, 0.48, 0.16}
	Q := []float64{1.0 / 3, 1.0 / 3, 1.0 / 3}
	cases := []struct {
		q, p []float64
		want float64
	}{
		{P, Q, 0.0852996}, // KL(P||Q), Kullback (1959) Example 2.1
		{Q, P, 0.0974551}, // KL(Q||P), same example
	}
	// The published figures carry 7 decimals; gonum's stat.KullbackLeibler
	// gives 0.09745501 for the second, one unit off in the last place, so
	// the tolerance is one unit of the 7th decimal.
	for _, c := range cases {
		if got := s.Divergence(c.q, c.p); math.Abs(got-c.want) > 1e-7 {
			t.Errorf("D(%v, %v) = %.8f, want %.7f", c.q, c.p, got, c.want)
		}
	}
}

// On the boundary the log rule is infinite for the outcome ruled out and
// finite for the others (Good 1952: L = -ln p_k).
func TestLogBoundary(t *testing.T) {
	s := rule(t, "log", 3, nil, nil).NewScorer()
	eff := make([]float64, 3)
	s.Efforts(eff, []float64{0, 0.25, 0.75})
	if !math.IsInf(eff[0], 1) || !near(eff[1], -math.Log(0.25), 1e-14) || !near(eff[2], -math.Log(0.75), 1e-14) {
		t.Errorf("efforts at (0, 0.25, 0.75) = %v, want [+Inf %v %v]", eff, -math.Log(0.25), -math.Log(0.75))
	}
	// A belief that also rules the outcome out pays nothing for it: the
	// expected effort is the cross-entropy over the other outcomes.
	if got, want := s.Expected([]float64{0, 0.5, 0.5}, []float64{0, 0.25, 0.75}), stat.CrossEntropy([]float64{0, 0.5, 0.5}, []float64{0, 0.25, 0.75}); !near(got, want, 1e-14) {
		t.Errorf("Phi = %v, stat.CrossEntropy = %v", got, want)
	}
}

// Quadratic generator: L is Brier's (1950) multi-category score
// sum_i (p_i - o_i)^2 and D is the squared Euclidean distance.
func TestQuadraticIsBrier(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for n := 2; n <= 12; n++ {
		s := rule(t, "quadratic", n, nil, nil).NewScorer()
		eff := make([]float64, n)
		for trial := 0; trial < 30; trial++ {
			q, p := simplexPoint(rng, n), simplexPoint(rng, n)
			s.Efforts(eff, p)
			for k := range eff {
				var brier float64
				for i, pi := range p {
					o := 0.0
					if i == k {
						o = 1
					}
					brier += (pi - o) * (pi - o)
				}
				if !near(eff[k], brier, 1e-12) {
					t.Errorf("n=%d L(p,%d) = %v, Brier %v", n, k, eff[k], brier)
				}
			}
			d := floats.Distance(q, p, 2)
			if got := s.Divergence(q, p); !near(got, d*d, 1e-12) {
				t.Errorf("n=%d D = %v, squared distance %v", n, got, d*d)
			}
		}
	}
	// Brier (1950) binary values in the multi-category form (twice the
	// common (f - o)^2 form): 0.70 and the event happens -> 2 * 0.09.
	s := rule(t, "quadratic", 2, nil, nil).NewScorer()
	eff := make([]float64, 2)
	s.Efforts(eff, []float64{0.7, 0.3})
	if !near(eff[0], 0.18, 1e-14) || !near(eff[1], 0.98, 1e-14) {
		t.Errorf("Brier at 0.7: %v, want [0.18 0.98]", eff)
	}
}

// The convex-combination identity H(sum w_j p_j) = sum w_j H(p_j) +
// sum w_j D(p_j, pbar) (domain.md), for every generator preset; for the
// log generator with two distributions and equal weights the correction
// is gonum's stat.JensenShannon.
func TestConvexCombination(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 17))
	for _, name := range []string{"log", "quadratic", "spherical", "pseudospherical", "power", "ranked"} {
		for _, n := range []int{2, 3, 5} {
			s := rule(t, name, n, nil, nil).NewScorer()
			for trial := 0; trial < 10; trial++ {
				m := 2 + rng.IntN(3)
				w := simplexPoint(rng, m)
				pbar := make([]float64, n)
				ps := make([][]float64, m)
				for j := range ps {
					ps[j] = simplexPoint(rng, n)
					floats.AddScaled(pbar, w[j], ps[j])
				}
				var rhs float64
				for j := range ps {
					rhs += w[j] * (s.Entropy(ps[j]) + s.Divergence(ps[j], pbar))
				}
				if lhs := s.Entropy(pbar); !near(lhs, rhs, 1e-11) {
					t.Errorf("%s n=%d: H(pbar) = %v, sum w (H + D) = %v", name, n, lhs, rhs)
				}
			}
		}
	}
	s := rule(t, "log", 3, nil, nil).NewScorer()
	cases := []struct{ x, y []float64 }{
		{[]float64{0.5, 0.5, 0}, []float64{0, 0.5, 0.5}}, // 0.5 ln 2 (check-values.md, recomputed with gonum)
		{[]float64{0.2, 0.3, 0.5}, []float64{0.6, 0.1, 0.3}},
	}
	for _, c := range cases {
		m := []float64{(c.x[0] + c.y[0]) / 2, (c.x[1] + c.y[1]) / 2, (c.x[2] + c.y[2]) / 2}
		corr := s.Entropy(m) - s.Entropy(c.x)/2 - s.Entropy(c.y)/2
		if want := stat.JensenShannon(c.x, c.y); !near(corr, want, 1e-13) {
			t.Errorf("JS(%v, %v) = %v, stat.JensenShannon = %v", c.x, c.y, corr, want)
		}
	}
}

// Spherical, pseudospherical and power rules against the closed forms of
// Gneiting & Raftery (2007), JASA 102:359-378, Section 3, in effort
// orientation (effort = -score for the spherical family; power:
// L = (1 - S) / (g - 1) with S = g p_k^(g-1) - (g-1) sum p^g).
func TestClosedForms(t *testing.T) {
	rng := rand.New(rand.NewPCG(19, 23))
	pnorm := func(p []float64, a float64) float64 {
		var s float64
		for _, x := range p {
			s += math.Pow(x, a)
		}
		return math.Pow(s, 1/a)
	}
	cases := []struct {
		name   string
		params map[string]float64
		effort func(p []float64, k int) float64
	}{
		{"spherical", nil, func(p []float64, k int) float64 { return -p[k] / pnorm(p, 2) }},
		{"pseudospherical", map[string]float64{"a": 1.5}, func(p []float64, k int) float64 { return -math.Pow(p[k]/pnorm(p, 1.5), 0.5) }},
		{"pseudospherical", map[string]float64{"a": 4}, func(p []float64, k int) float64 { return -math.Pow(p[k]/pnorm(p, 4), 3) }},
		{"power", map[string]float64{"g": 3}, func(p []float64, k int) float64 {
			return (1 - (3*p[k]*p[k] - 2*math.Pow(pnorm(p, 3), 3))) / 2
		}},
		{"power", map[string]float64{"g": 1.5}, func(p []float64, k int) float64 {
			return (1 - (1.5*math.Sqrt(p[k]) - 0.5*math.Pow(pnorm(p, 1.5), 1.5))) / 0.5
		}},
	}
	for _, c := range cases {
		for _, n := range []int{2, 3, 7} {
			s := rule(t, c.name, n, c.params, nil).NewScorer()
			eff := make([]float64, n)
			for trial := 0; trial < 20; trial++ {
				p := simplexPoint(rng, n)
				s.Efforts(eff, p)
				for k := range eff {
					if want := c.effort(p, k); !near(eff[k], want, 1e-12) {
						t.Errorf("%s %v n=%d L(p,%d) = %v, closed form %v", c.name, c.params, n, k, eff[k], want)
					}
				}
			}
		}
	}
	// Published values at p = (0.5, 0.2, 0.3), outcome 3 (check-values.md,
	// from Gneiting & Raftery 2007 Sec. 3, recomputed).
	p := []float64{0.5, 0.2, 0.3}
	eff := make([]float64, 3)
	rule(t, "spherical", 3, nil, nil).NewScorer().Efforts(eff, p)
	if !near(-eff[2], 0.4866642634, 1e-9) {
		t.Errorf("spherical score = %v, want 0.4866642634", -eff[2])
	}
	rule(t, "power", 3, map[string]float64{"g": 3}, nil).NewScorer().Efforts(eff, p)
	if !near(eff[2], 0.525, 1e-12) {
		t.Errorf("power-3 effort = %v, want 0.525", eff[2])
	}
}

// Exact gradients and Hessians of every generator preset agree with
// gonum's diff/fd central differences at random interior points.
func TestPresetDerivatives(t *testing.T) {
	rng := rand.New(rand.NewPCG(37, 41))
	for _, p := range All() {
		if p.Kind != KindGenerator {
			continue
		}
		for _, n := range []int{2, 3, 6} {
			var w []float64
			if p.Weighted {
				w = make([]float64, n)
				for i := range w {
					w[i] = 0.5 + float64(i)
				}
			}
			r := rule(t, p.Name, n, nil, w)
			s := r.NewScorer()
			ev := r.Gen.NewEvaluator()
			f := func(x []float64) float64 { return ev.Value(x) }
			grad := make([]float64, n)
			hess := make([]float64, n*n)
			for trial := 0; trial < 10; trial++ {
				x := simplexPoint(rng, n)
				for i := range x {
					x[i] = 0.1 + 0.8*x[i]
				}
				s.Gradient(grad, x)
				want := fd.Gradient(nil, f, x, &fd.Settings{Formula: fd.Central})
				for i := range grad {
					if !near(grad[i], want[i], 1e-6) {
						t.Errorf("%s n=%d d/dp%d = %v, finite differences %v", p.Name, n, i+1, grad[i], want[i])
					}
				}
				s.Hessian(hess, x)
				wantH := mat.NewSymDense(n, nil)
				fd.Hessian(wantH, f, x, nil)
				for i := 0; i < n; i++ {
					for j := 0; j < n; j++ {
						if !near(hess[i*n+j], wantH.At(i, j), 2e-3) {
							t.Errorf("%s n=%d H[%d][%d] = %v, finite differences %v", p.Name, n, i, j, hess[i*n+j], wantH.At(i, j))
						}
					}
				}
			}
		}
	}
}
