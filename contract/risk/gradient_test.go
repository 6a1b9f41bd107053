package risk

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// The slope G (a positive multiple of the gradient of expected utility)
// agrees with central differences of the certainty equivalent (gonum
// diff/fd, an independent check used only in tests): along every direction
// e_0 - e_j of the simplex the ratio of the numerical derivative to
// G_0 - G_j is the same positive number.
func TestSlopeAgainstFiniteDifferences(t *testing.T) {
	for _, tc := range []struct {
		src string
		q   []float64
		u   Utility
	}{
		{logGen, []float64{0.8, 0.2}, Utility{Kind: CARA, Coef: 1}},
		{quadGen, []float64{0.05, 0.95}, Utility{Kind: CARA, Coef: 0.05}},
		{logGen, []float64{0.6, 0.3, 0.1}, Utility{Kind: CRRA, Coef: 2}},
		{quadGen, []float64{0.2, 0.5, 0.3}, Utility{Kind: CRRA, Coef: -1.5}},
		{quadGen, []float64{0.2, 0.5, 0.2, 0.1}, Utility{Kind: CARA, Coef: -0.2}},
	} {
		s, _ := NewSolver(rule(t, tc.src, len(tc.q)), Contract{A: 100, B: 2}, tc.u, 1)
		copy(s.q, tc.q)
		n := len(tc.q)
		p := make([]float64, n)
		for i := range p {
			p[i] = float64(i+2) / float64(n*(n+3)/2)
		}
		if _, ok := s.slope(p); !ok {
			t.Fatalf("%s: no slope", tc.src)
		}
		g := append([]float64(nil), s.g...)
		ratio := math.NaN()
		for j := 1; j < n; j++ {
			along := func(x []float64) float64 {
				r := append([]float64(nil), p...)
				r[0] += x[0]
				r[j] -= x[0]
				return s.value(r)
			}
			num := fd.Gradient(nil, along, []float64{0}, &fd.Settings{Formula: fd.Central, Step: 1e-5})[0]
			r := num / (g[0] - g[j])
			if !(r > 0) {
				t.Errorf("%s %v: direction %d: slope %v, numerical %v", tc.src, tc.q, j, g[0]-g[j], num)
			}
			if j > 1 && math.Abs(r-ratio) > 1e-6*ratio {
				t.Errorf("%s %v: ratios %v and %v differ", tc.src, tc.q, ratio, r)
			}
			ratio = r
		}
	}
}
