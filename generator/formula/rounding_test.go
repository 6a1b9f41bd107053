package formula

import (
	"math"
	"testing"
)

// HessianRounding bounds what rounding does to the derivatives. The
// formulas below are affine or constant in closed form (derived by hand:
// p·(1/p - 1) = 1 - p, p·exp(-ln p) = 1), so their exact gradient and
// Hessian are known and the computed ones differ from them only by
// rounding; that difference must lie within the bound at every point, and
// the bound must stay a rounding-sized multiple of the terms (1/p²).
func TestHessianRoundingBoundsTheError(t *testing.T) {
	cases := []struct {
		src  string
		grad float64 // exact dH/dp1 (n = 2; p2 is not read)
	}{
		{"p1*(1/p1 - 1)", -1},
		{"p1*exp(-ln(p1))", 0},
		{"1e8*p1 - 1e8*p1 + p1", 1},
	}
	for _, c := range cases {
		prog, err := CompileString(c.src, Scope{Outcomes: 2})
		if err != nil {
			t.Fatal(err)
		}
		m := prog.NewMachine()
		hess, grad := make([]float64, 4), make([]float64, 2)
		herr, gerr := make([]float64, 4), make([]float64, 2)
		for _, p := range []float64{1e-6, 3.3e-4, 0.001, 0.017, 0.3, 0.5, 0.77, 0.999} {
			m.Hessian(hess, grad, []float64{p, 1 - p})
			m.HessianRounding(herr, gerr, []float64{p, 1 - p})
			if e := math.Abs(grad[0] - c.grad); e > gerr[0] {
				t.Errorf("%s at %g: gradient error %g above the bound %g", c.src, p, e, gerr[0])
			}
			if e := math.Abs(hess[0]); e > herr[0] {
				t.Errorf("%s at %g: Hessian error %g above the bound %g", c.src, p, e, herr[0])
			}
			if herr[0] > 1e-13/(p*p)+1e-13*1e8 || gerr[0] > 1e-13/p+1e-13*1e8 {
				t.Errorf("%s at %g: bounds %g, %g are not rounding-sized", c.src, p, gerr[0], herr[0])
			}
		}
		// The pass leaves the machine's ordinary derivatives as they were.
		m.Hessian(hess, grad, []float64{0.25, 0.75})
		if math.Abs(grad[0]-c.grad) > 1e-12 {
			t.Errorf("%s: gradient after HessianRounding %g, want %g", c.src, grad[0], c.grad)
		}
	}
}
