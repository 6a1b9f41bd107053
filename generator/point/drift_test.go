package point

import (
	"math"
	"testing"
)

// The divergence far from 0 keeps its digits: D(y, x) = (y - x)^2 exactly
// for squared error, and for phi = -x^4 it is (y - x)^2 (3x^2 + 2xy + y^2),
// derived by hand, at a location where the direct form cancels numbers
// near 1e24.
func TestDivergenceFarFromZero(t *testing.T) {
	cases := []struct {
		src  string
		d    func(y, x float64) float64
		x, y float64
	}{
		{"-x^2", func(y, x float64) float64 { return (y - x) * (y - x) }, 1e6 + 0.1, 1e6},
		{"-x^2", func(y, x float64) float64 { return (y - x) * (y - x) }, 1e9 + 0.5, 1e9 + 0.25},
		{"-x^4", func(y, x float64) float64 { return (y - x) * (y - x) * (3*x*x + 2*x*y + y*y) }, 1e6 + 0.1, 1e6},
	}
	for _, c := range cases {
		g, err := New(c.src, c.y-10, c.x+10, Options{})
		if err != nil {
			t.Fatal(err)
		}
		got, want := g.NewEvaluator().Divergence(c.y, c.x), c.d(c.y, c.x)
		if math.Abs(got-want) > 1e-9*want {
			t.Errorf("%s: D(%v, %v) = %.15g, want %.15g", c.src, c.y, c.x, got, want)
		}
	}
}
