package point

import (
	"math"
	"testing"
)

// At an end of the interval the slope is the limit from the interior,
// not the formula's formal derivative there: exp(ln(x)) is x, whose slope
// at 0 is 1, while the machine's 0·Inf = 0 convention reads
// exp(ln x)·(1/x) at x = 0 as 0; exp(0.5·ln(x)) is sqrt(x), whose slope
// tends to +Inf at 0 (formally 0 again). Calling either slope 0 made
// reporting 0 cheap: sqrt(x) on [0, 10] came out improper with D(10, 0) =
// -sqrt(10). Values derived by hand from the closed forms.
func TestEndSlopeIsTheInteriorLimit(t *testing.T) {
	cases := []struct {
		name, src string
		lo, hi    float64
		x         float64
		slope     float64
		// d is D(y, x) at y = the other end, from the closed form.
		y, d float64
	}{
		// phi = x - x^2: D(1, 0) = (1 - 0)^2 = 1.
		{"x as exp(ln x)", "-x^2 + exp(ln(x))", 0, 1, 0, 1, 1, 1},
		// phi = sqrt(x): slope +Inf at 0, so D(10, 0) = +Inf.
		{"sqrt as exp(0.5 ln x)", "exp(0.5*ln(x))", 0, 10, 0, math.Inf(1), 10, math.Inf(1)},
		// phi = sqrt(10 - x) at the upper end: slope -Inf, D(0, 10) = +Inf.
		{"sqrt at the upper end", "exp(0.5*ln(10 - x))", 0, 10, 10, math.Inf(-1), 0, math.Inf(1)},
		// phi = -x^2 + 3x (an ordinary formula): slope 3 - 2x at 0 is 3,
		// D(2, 0) = 4, the formal value kept.
		{"polynomial", "-x^2 + 3*x", 0, 2, 0, 3, 2, 4},
	}
	for _, c := range cases {
		g, err := New(c.src, c.lo, c.hi, Options{})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		ev := g.NewEvaluator()
		_, d1, _ := ev.Derivatives(c.x)
		if math.IsInf(c.slope, 0) && d1 != c.slope || !math.IsInf(c.slope, 0) && math.Abs(d1-c.slope) > 1e-9 {
			t.Errorf("%s: phi'(%g) = %v, want %v", c.name, c.x, d1, c.slope)
		}
		for _, got := range []float64{ev.Divergence(c.y, c.x), ev.Line(c.y, c.x) - ev.Phi(c.y), ev.Expected(c.x, []float64{c.y}, []float64{1})} {
			if math.IsInf(c.d, 0) && got != c.d || !math.IsInf(c.d, 0) && math.Abs(got-c.d) > 1e-9 {
				t.Errorf("%s: D(%g, %g) = %v, want %v", c.name, c.y, c.x, got, c.d)
			}
		}
		if e := ev.EndSlopeError(); !(e >= 0 && e < 1e-6) {
			t.Errorf("%s: end slope error %v, want a small estimate", c.name, e)
		}
	}
}
