package emphasis

import (
	"math"
	"testing"
)

// Weights that are not smooth, integrated to 1e-12 against closed forms
// derived by hand (Schervish 1989: L(p, yes) = ∫_p^1 (1-c) w dc,
// L(p, no) = ∫_0^p c w dc), piece by piece:
//
//	w = [c >= 0.3]:    yes = (1 - max(p, .3))²/2,  no = (max(p, .3)² - .09)/2
//	w = |c - 1/2|:     antiderivatives of c|c - 1/2| and (1-c)|c - 1/2|
//	w = min(c, 0.6):   c² below 0.6, 0.6c above
//
// At p = 0.5 the step weight's effort if "no" is ∫_0.3^0.5 c dc =
// (0.25 - 0.09)/2 = 0.08 exactly.
func TestPiecewiseWeights(t *testing.T) {
	// F integrates f from 0 to p for a function given by antiderivatives
	// left and right of a break b.
	piece := func(b float64, left, right func(float64) float64) func(float64) float64 {
		return func(p float64) float64 {
			if p <= b {
				return left(p) - left(0)
			}
			return left(b) - left(0) + right(p) - right(b)
		}
	}
	upper := func(f func(float64) float64) func(float64) float64 {
		return func(p float64) float64 { return f(1) - f(p) }
	}
	absNo := piece(0.5, func(c float64) float64 { return c*c/4 - c*c*c/3 }, func(c float64) float64 { return c*c*c/3 - c*c/4 })
	// (1-c)(1/2-c) = 1/2 - 3c/2 + c², and its negative above 1/2.
	absYes := upper(piece(0.5, func(c float64) float64 { return c/2 - 3*c*c/4 + c*c*c/3 }, func(c float64) float64 { return -(c/2 - 3*c*c/4 + c*c*c/3) }))
	minNo := piece(0.6, func(c float64) float64 { return c * c * c / 3 }, func(c float64) float64 { return 0.3 * c * c })
	minYes := upper(piece(0.6, func(c float64) float64 { return c*c/2 - c*c*c/3 }, func(c float64) float64 { return 0.6*c - 0.3*c*c }))
	cases := []struct {
		src     string
		yes, no func(float64) float64
	}{
		{"if(c < 0.3, 0, 1)",
			func(p float64) float64 { m := math.Max(p, 0.3); return (1 - m) * (1 - m) / 2 },
			func(p float64) float64 { m := math.Max(p, 0.3); return (m*m - 0.09) / 2 }},
		{"abs(c - 0.5)", absYes, absNo},
		{"min(c, 0.6)", minYes, minNo},
	}
	for _, tc := range cases {
		g, err := New(tc.src, Options{})
		if err != nil {
			t.Fatal(err)
		}
		ev := g.NewBinary()
		for i := 0; i <= 1000; i++ {
			p := float64(i) / 1000
			yes, no := ev.Losses(p)
			if want := tc.yes(p); math.Abs(yes-want) > 1e-12 {
				t.Errorf("%s: L(%g, yes) = %.16g, closed form %.16g", tc.src, p, yes, want)
			}
			if want := tc.no(p); math.Abs(no-want) > 1e-12 {
				t.Errorf("%s: L(%g, no) = %.16g, closed form %.16g", tc.src, p, no, want)
			}
		}
	}
	g, _ := New("if(c < 0.3, 0, 1)", Options{})
	if _, no := g.NewBinary().Losses(0.5); math.Abs(no-0.08) > 1e-15 {
		t.Errorf("step weight: effort if no at 0.5 = %.17g, want 0.08", no)
	}
}
