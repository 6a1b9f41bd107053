package point

import (
	"math"
	"testing"
)

func TestDivergenceClosedForms(t *testing.T) {
	cases := []struct {
		name, src string
		lo, hi    float64
		want      func(y, x float64) float64
		tol       float64
	}{
		// Squared error (Gneiting 2011, JASA 106:746-762).
		{"squared", "-x^2", -5, 5, func(y, x float64) float64 { return (y - x) * (y - x) }, 1e-12},
		// QLIKE, Patton (2011) J. Econometrics 160:246-256, b = -2: y/x - ln(y/x) - 1.
		{"qlike", "ln(x)", 0.1, 10, func(y, x float64) float64 { return y/x - math.Log(y/x) - 1 }, 1e-12},
		// Patton (2011) family with b = 1: (y^3 - x^3)/6 - x^2/2 (y - x).
		{"patton", "b = 1\n-x^(b+2) / ((b+1)*(b+2))", 0, 4, func(y, x float64) float64 { return (y*y*y-x*x*x)/6 - x*x/2*(y-x) }, 1e-12},
		// Exponential Bregman family, Patton (2020) JBES 38:796-809, a = 0.5:
		// (2/a^2)(e^{ay} - e^{ax}) - (2/a) e^{ax} (y - x).
		{"exponential", "a = 0.5\n-2*exp(a*x) / a^2", -3, 3, func(y, x float64) float64 {
			a := 0.5
			return 2/(a*a)*(math.Exp(a*y)-math.Exp(a*x)) - 2/a*math.Exp(a*x)*(y-x)
		}, 1e-12},
	}
	for _, tc := range cases {
		g, err := New(tc.src, tc.lo, tc.hi, Options{})
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		ev := g.NewEvaluator()
		for i := 0; i <= 8; i++ {
			for j := 0; j <= 8; j++ {
				x := tc.lo + (tc.hi-tc.lo)*float64(i)/8
				y := tc.lo + (tc.hi-tc.lo)*float64(j)/8
				got, want := ev.Divergence(y, x), tc.want(y, x)
				if math.Abs(got-want) > tc.tol*math.Max(1, math.Abs(want)) {
					t.Errorf("%s: D(%g, %g) = %.15g, want %.15g", tc.name, y, x, got, want)
				}
			}
		}
	}
}

func TestDerivativesAgainstFiniteDifferences(t *testing.T) {
	// Central differences are an independent check of the exact derivatives.
	g, err := New("ln(x) - x^3/7 + exp(-x)", 0.5, 3, Options{})
	if err != nil {
		t.Fatal(err)
	}
	ev := g.NewEvaluator()
	for _, x := range []float64{0.6, 1, 1.7, 2.9} {
		_, d1, d2 := ev.Derivatives(x)
		const h = 1e-4
		f := ev.Phi
		fd1 := (f(x+h) - f(x-h)) / (2 * h)
		fd2 := (f(x+h) - 2*f(x) + f(x-h)) / (h * h)
		if math.Abs(d1-fd1) > 1e-7 || math.Abs(d2-fd2) > 1e-4 {
			t.Errorf("x = %g: phi' %v (fd %v), phi'' %v (fd %v)", x, d1, fd1, d2, fd2)
		}
	}
}

func TestMeanIsBest(t *testing.T) {
	// E D(Y, x) = D(m, x) + phi(m) - E phi(Y) (derived by hand from the
	// definition), so with squared error the expected effort at report x
	// is (x - m)^2 + Var(Y).
	g, _ := New("-x^2", 0, 10, Options{})
	ev := g.NewEvaluator()
	ys, ws := []float64{1, 4, 9}, []float64{0.5, 0.3, 0.2}
	m := Mean(ys, ws)
	if math.Abs(m-3.5) > 1e-15 {
		t.Fatalf("mean %v", m)
	}
	vr := 0.5*2.5*2.5 + 0.3*0.5*0.5 + 0.2*5.5*5.5
	for _, x := range []float64{0, 2, 3.5, 5, 10} {
		if got, want := ev.Expected(x, ys, ws), (x-m)*(x-m)+vr; math.Abs(got-want) > 1e-12 {
			t.Errorf("E D(Y, %g) = %v, want %v", x, got, want)
		}
	}
}
