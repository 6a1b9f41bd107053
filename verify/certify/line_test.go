package certify

import (
	"context"
	"math"
	"strings"
	"testing"
	"time"

	"scorewright/generator/formula"
	"scorewright/verify"
)

func lineProgram(t *testing.T, src, v string) *formula.Program {
	t.Helper()
	prog, err := formula.CompileString(src, formula.Scope{Vars: []string{v}})
	if err != nil {
		t.Fatal(err)
	}
	return prog
}

// emphasisRegret is D(q, r) = ∫_q^r w(c)(c - q) dc for a polynomial
// weight given by its coefficients (derived by hand: H” = -w, so D is
// the integral of the tangent's error; Schervish 1989).
func emphasisRegret(coef []float64, q, r float64) float64 {
	// ∫ c^k (c - q) dc = c^(k+2)/(k+2) - q c^(k+1)/(k+1).
	prim := func(c float64) float64 {
		var s float64
		for k, a := range coef {
			fk := float64(k)
			s += a * (math.Pow(c, fk+2)/(fk+2) - q*math.Pow(c, fk+1)/(fk+1))
		}
		return s
	}
	return prim(r) - prim(q)
}

// TestEmphasisCertified: a weight >= 0 gives a proper rule, strictly
// when it vanishes on no interval (Schervish 1989); brute force over
// beliefs and reports with the regret in closed form agrees. A weight
// negative on an interval is improper, and the witness's regret, from
// the closed form, is negative.
func TestEmphasisCertified(t *testing.T) {
	for _, c := range []struct {
		src  string
		coef []float64
		want verify.Verdict
	}{
		{"4*c*(1-c)", []float64{0, 4, -4}, verify.StrictlyProper},
		{"(c - 0.5)^2", []float64{0.25, -1, 1}, verify.StrictlyProper},
		{"1", []float64{1}, verify.StrictlyProper},
		{"c - 0.2", []float64{-0.2, 1}, verify.Improper},
	} {
		res, err := Emphasis(context.Background(), lineProgram(t, c.src, "c"), Settings{Deadline: time.Minute})
		if err != nil {
			t.Fatal(err)
		}
		if res.Verdict != c.want {
			t.Fatalf("%s: %s", c.src, res.Statement())
		}
		if w := res.Witness; w != nil {
			if d := emphasisRegret(c.coef, w.Belief[0], w.Report[0]); !(d < 0) || -d < w.Gain*(1-1e-9) {
				t.Errorf("%s: witness gain %g, closed-form regret %g", c.src, w.Gain, d)
			}
			continue
		}
		for i := 1; i < 40; i++ {
			for j := 1; j < 40; j++ {
				if d := emphasisRegret(c.coef, float64(i)/40, float64(j)/40); i != j && !(d > 0) {
					t.Fatalf("%s: regret %g at belief %d/40, report %d/40", c.src, d, i, j)
				}
			}
		}
	}
}

// A weight that is 0 below c = 0.3 (issue 10's case) is proper but not
// strictly: for a belief below 0.3 every report below 0.3 costs the same
// (derived by hand: the regret integrates w = 0). The certificate says
// proper and names a tie inside [0, 0.3].
func TestEmphasisStepTies(t *testing.T) {
	res, err := Emphasis(context.Background(), lineProgram(t, "if(c < 0.3, 0, 1)", "c"), Settings{Deadline: time.Minute})
	if err != nil {
		t.Fatal(err)
	}
	if res.Verdict != verify.Proper || !strings.Contains(res.Statement(), "ties") {
		t.Fatalf("%s", res.Statement())
	}
	t.Log(res.Statement())
}

// pointForm is a point generator phi with its derivative, by hand.
type pointForm struct{ phi, d1 func(x float64) float64 }

// divergence is D(y, x) = phi(x) + phi'(x)(y - x) - phi(y), the effort of
// report x when the mean is y (Savage 1971; Gneiting 2011).
func (f pointForm) divergence(y, x float64) float64 { return f.phi(x) + f.d1(x)*(y-x) - f.phi(y) }

// TestPointCertified checks the line certificate for point forecasts
// against the divergence in closed form, by brute force over means and
// reports: strictly proper ones never tie, the affine ones always tie
// (issue 10: an affine term never changes a Bregman rule, so -x^2 + 1e8 x
// is strictly proper and x, 3x + 2 are proper with every report tied),
// and the improper ones' witnesses gain.
func TestPointCertified(t *testing.T) {
	for _, c := range []struct {
		src    string
		lo, hi float64
		f      pointForm
		want   verify.Verdict
	}{
		{"-x^4", 0, 1, pointForm{func(x float64) float64 { return -x * x * x * x }, func(x float64) float64 { return -4 * x * x * x }}, verify.StrictlyProper},
		{"-x^2 + 1e8*x", 0, 1, pointForm{func(x float64) float64 { return -x*x + 1e8*x }, func(x float64) float64 { return -2*x + 1e8 }}, verify.StrictlyProper},
		{"x", 0, 1, pointForm{func(x float64) float64 { return x }, func(float64) float64 { return 1 }}, verify.Proper},
		{"3*x + 2", 0, 1, pointForm{func(x float64) float64 { return 3*x + 2 }, func(float64) float64 { return 3 }}, verify.Proper},
		{"-x*expm1(2*ln(x))/6", 0, 10, pointForm{func(x float64) float64 { return -x * (x*x - 1) / 6 }, func(x float64) float64 { return -(3*x*x - 1) / 6 }}, verify.StrictlyProper},
		{"min(-x^2, -2*x^2 + 0.2)", 0, 1, pointForm{func(x float64) float64 { return math.Min(-x*x, -2*x*x+0.2) }, func(x float64) float64 {
			if -x*x <= -2*x*x+0.2 {
				return -2 * x
			}
			return -4 * x
		}}, verify.StrictlyProper},
		{"x^3", 0, 1, pointForm{func(x float64) float64 { return x * x * x }, func(x float64) float64 { return 3 * x * x }}, verify.Improper},
		{"max(-x^2, -2*x^2 + 0.2)", 0, 1, pointForm{func(x float64) float64 { return math.Max(-x*x, -2*x*x+0.2) }, func(x float64) float64 {
			if -x*x >= -2*x*x+0.2 {
				return -2 * x
			}
			return -4 * x
		}}, verify.Improper},
	} {
		res, err := Point(context.Background(), lineProgram(t, c.src, "x"), c.lo, c.hi, Settings{Deadline: time.Minute})
		if err != nil {
			t.Fatal(err)
		}
		if res.Verdict != c.want {
			t.Fatalf("%s: %s", c.src, res.Statement())
		}
		if w := res.Witness; w != nil {
			if d := c.f.divergence(w.Belief[0], w.Report[0]); !(d < 0) || -d < w.Gain*(1-1e-9) {
				t.Errorf("%s: witness gain %g, closed-form divergence %g", c.src, w.Gain, d)
			}
			continue
		}
		for i := 0; i <= 50; i++ {
			for j := 0; j <= 50; j++ {
				y, x := c.lo+(c.hi-c.lo)*float64(i)/50, c.lo+(c.hi-c.lo)*float64(j)/50
				d := c.f.divergence(y, x)
				scale := 1e-12 * (1 + math.Abs(c.f.phi(x)) + math.Abs(c.f.d1(x)*(y-x)))
				switch {
				case c.want == verify.StrictlyProper && i != j && !(d > scale):
					t.Fatalf("%s: divergence %g at mean %g, report %g", c.src, d, y, x)
				case c.want == verify.Proper && math.Abs(d) > scale:
					t.Fatalf("%s: an affine phi must tie, divergence %g at %g, %g", c.src, d, y, x)
				}
			}
		}
	}
}
