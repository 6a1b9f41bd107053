package payform

import (
	"math"
	"testing"

	"scorewright/generator/point"
)

func pointGen(t *testing.T, src string, lo, hi float64) *point.Generator {
	t.Helper()
	g, err := point.New(src, lo, hi, point.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// phi = -x² on [0, 4] gives D(y, x) = (y − x)² (derived by hand:
// -x² - 2x(y - x) + y²), so A = 100, B = 6.25 pays 100 − 6.25·(y − x)²;
// phi = 1 + 2x − 3x² has phi” = −6, D = 3(y − x)², and pays 100 − 18.75·(y − x)².
// The pay is checked against D written out from phi at a few reports and
// outcomes, not through the formula's own coefficient.
func TestPointQuadratic(t *testing.T) {
	for _, c := range []struct {
		src  string
		phi  func(x float64) float64
		dphi func(x float64) float64
		want string
	}{
		{"-x^2", func(x float64) float64 { return -x * x }, func(x float64) float64 { return -2 * x }, "pay = 100 − 6.25·(y − x)²"},
		{"1 + 2*x - 3*x^2", func(x float64) float64 { return 1 + 2*x - 3*x*x }, func(x float64) float64 { return 2 - 6*x }, "pay = 100 − 18.75·(y − x)²"},
	} {
		f, ok := FindPoint(pointGen(t, c.src, 0, 4), 100, 6.25)
		if !ok {
			t.Fatalf("%s: no closed form", c.src)
		}
		if f.Lines[0] != c.want {
			t.Errorf("%s: %q, want %q", c.src, f.Lines[0], c.want)
		}
		for _, x := range []float64{0, 0.5, 2.25, 4} {
			for _, y := range []float64{0, 1.2, 4} {
				d := c.phi(x) + c.dphi(x)*(y-x) - c.phi(y)
				if got, want := f.PayAt(x, y), 100-6.25*d; math.Abs(got-want) > 1e-9*(1+math.Abs(want)) {
					t.Errorf("%s: pay(%v, %v) = %v, want %v", c.src, x, y, got, want)
				}
			}
		}
	}
}

// A generator whose curvature varies (-x⁴, ln x) has no quadratic closed
// form, and none is claimed; nor is one for a convex phi.
func TestPointNotQuadratic(t *testing.T) {
	for _, src := range []string{"-x^4", "ln(x)", "x^2"} {
		if f, ok := FindPoint(pointGen(t, src, 0.5, 4), 100, 6.25); ok {
			t.Errorf("%s: claimed %q", src, f.Lines)
		}
	}
	if _, ok := FindPoint(nil, 1, 1); ok {
		t.Error("a nil generator has a formula")
	}
}
