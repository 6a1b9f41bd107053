package risk

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// The exact gradient of the objective agrees with central differences
// (gonum diff/fd, an independent check used only in tests).
func TestGradientAgainstFiniteDifferences(t *testing.T) {
	for _, tc := range []struct {
		src string
		q   []float64
		u   Utility
	}{
		{logGen, []float64{0.8, 0.2}, Utility{Kind: CARA, Coef: 1}},
		{quadGen, []float64{0.05, 0.95}, Utility{Kind: CARA, Coef: 0.05}},
		{logGen, []float64{0.6, 0.3, 0.1}, Utility{Kind: CRRA, Coef: 2}},
	} {
		s, _ := NewSolver(rule(t, tc.src, len(tc.q)), Contract{A: 100, B: 2}, tc.u, 1)
		copy(s.q, tc.q)
		s.ref = 100
		z := make([]float64, len(tc.q)-1)
		for i := range z {
			z[i] = 0.3 * float64(i+1)
		}
		g := make([]float64, len(z))
		s.gradient(g, z)
		fg := fd.Gradient(nil, s.objective, z, &fd.Settings{Formula: fd.Central})
		for i := range g {
			if math.Abs(g[i]-fg[i]) > 1e-6*math.Max(1, math.Abs(g[i])) {
				t.Errorf("%s %v: exact %v, finite differences %v", tc.src, tc.q, g, fg)
				break
			}
		}
	}
}
