package num

import (
	"math"
	"testing"
)

// The search closes in on the maximiser of a parabola, -(x - 0.3)^2 on
// [0, 1] (maximum at 0.3, derived by hand), shrinking the bracket by
// 1/φ a step, and stops after the steps it is given.
func TestGoldenMax(t *testing.T) {
	calls := 0
	f := func(x float64) float64 { calls++; return -(x - 0.3) * (x - 0.3) }
	g := GoldenMax(f, 0, 1, 200, func(a, b float64) bool { return b-a > 1e-10 })
	if x := (g.A + g.B) / 2; math.Abs(x-0.3) > 1e-9 || g.B-g.A > 1e-10 || !(g.A <= g.C && g.C <= g.D && g.D <= g.B) {
		t.Fatalf("state %+v", g)
	}
	// 0.618^k <= 1e-10 first at k = 48; two evaluations to start.
	if calls != 2+48 {
		t.Errorf("%d evaluations, want 50", calls)
	}
	g = GoldenMax(f, 0, 1, 3, func(a, b float64) bool { return true })
	if w := g.B - g.A; math.Abs(w-math.Pow(goldenRatio, 3)) > 1e-12 {
		t.Errorf("three steps leave a bracket of %g, want 0.618^3", w)
	}
}
