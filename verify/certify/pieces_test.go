package certify

import (
	"math"
	"strconv"
	"testing"
	"time"

	"scorewright/internal/simplex"
	"scorewright/verify"
)

// closedForm is a generator written out by hand in plain floating point,
// with its gradient, for checking certificates against: independent of
// the formula compiler and of interval arithmetic.
type closedForm struct {
	h    func(p []float64) float64
	grad func(p []float64) []float64
}

// divergence is D(q, r) = H(r) + ∇H(r)·(q - r) - H(q), the extra expected
// effort of reporting r under belief q (Gneiting & Raftery 2007, Sec. 2).
func (c closedForm) divergence(q, r []float64) float64 {
	g := c.grad(r)
	d := c.h(r) - c.h(q)
	for k := range q {
		d += g[k] * (q[k] - r[k])
	}
	return d
}

// lattice lists the points of the simplex with coordinates k/m.
func lattice(t *testing.T, n, m int) [][]float64 {
	g, err := simplex.Full(n, m)
	if err != nil {
		t.Fatal(err)
	}
	out := make([][]float64, g.Len())
	for i := range out {
		out[i] = g.Point(i)
	}
	return out
}

// bruteStrict checks by brute force over a lattice of beliefs and reports
// (interior points, where the closed-form gradient is finite) that no
// report other than the belief does as well: D(q, r) > 0 for r != q.
func bruteStrict(t *testing.T, name string, c closedForm, n, m int) {
	t.Helper()
	var pts [][]float64
	for _, p := range lattice(t, n, m) {
		inside := true
		for _, v := range p {
			inside = inside && v > 0
		}
		if inside {
			pts = append(pts, p)
		}
	}
	for _, q := range pts {
		for _, r := range pts {
			same := true
			for k := range q {
				same = same && q[k] == r[k]
			}
			if d := c.divergence(q, r); !same && !(d > 0) {
				t.Fatalf("%s: belief %v, report %v: divergence %g, not > 0", name, q, r, d)
			}
		}
	}
}

func quadH(p []float64) float64 {
	s := 1.0
	for _, v := range p {
		s -= v * v
	}
	return s
}

func entropyH(p []float64) float64 {
	var s float64
	for _, v := range p {
		if v > 0 {
			s -= v * math.Log(v)
		}
	}
	return s
}

// A convex kink (max, abs, or a continuous if) at p1 = 0.5 or 0.25, where
// boxes used to be cut, must not hide between two boxes: H lies below
// its chord across the kink (derived by hand: the slope in p1 jumps up by
// 0.3), so the rule is improper, and the witness's divergence, computed
// from the closed form with the gradient of the branch at the report,
// is negative.
func TestKinkOnRoundNumberImproper(t *testing.T) {
	for _, c := range []struct {
		src string
		at  float64
	}{
		{"1 - sum(p^2) + 0.3*max(p1 - 0.5, 0)", 0.5},
		{"1 - sum(p^2) + 0.3*abs(p1 - 0.5)", 0.5},
		{"1 - sum(p^2) + 0.3*if(p1 > 0.5, p1 - 0.5, 0)", 0.5},
		{"1 - sum(p^2) + 0.3*max(p1 - 0.25, 0)", 0.25},
	} {
		for n := 2; n <= 4; n++ {
			res := certifyFormula(t, c.src, n, Settings{Deadline: time.Minute})
			if res.Verdict != verify.Improper || res.Witness == nil {
				t.Fatalf("%s n=%d: %s", c.src, n, res.Statement())
			}
			abs := c.src[len(c.src)-len("abs(p1 - 0.5)"):] == "abs(p1 - 0.5)"
			kink := closedForm{
				h: func(p []float64) float64 {
					x := p[0] - c.at
					if abs {
						return quadH(p) + 0.3*math.Abs(x)
					}
					return quadH(p) + 0.3*math.Max(x, 0)
				},
				grad: func(p []float64) []float64 {
					g := make([]float64, len(p))
					for k, v := range p {
						g[k] = -2 * v
					}
					switch {
					case p[0] > c.at:
						g[0] += 0.3
					case abs && p[0] < c.at:
						g[0] -= 0.3
					}
					return g
				},
			}
			w := res.Witness
			if w.Gain > 0 {
				if d := kink.divergence(w.Belief, w.Report); !(d < 0) || math.Abs(-d-w.Gain) > 1e-9+0.5*(-d) {
					t.Errorf("%s n=%d: witness divergence %g by the closed form, gain %g claimed", c.src, n, d, w.Gain)
				}
			}
		}
	}
}

// The min of two strictly concave generators is strictly concave
// (derived by hand: at a point between two others each branch lies
// strictly above its chord, so the min does too), so the rule is strictly
// proper although the min is undecided on the boxes where they cross;
// brute force over reports confirms it. The max of the same two crosses
// upward, a convex kink: improper.
func TestMinOfConcaveCertified(t *testing.T) {
	const src = "min(1 - sum(p^2), -sum(p*ln(p)) - 0.1)"
	both := func(p []float64) (float64, float64) { return quadH(p), entropyH(p) - 0.1 }
	minForm := closedForm{
		h: func(p []float64) float64 { a, b := both(p); return math.Min(a, b) },
		grad: func(p []float64) []float64 {
			a, b := both(p)
			g := make([]float64, len(p))
			for k, v := range p {
				if a <= b {
					g[k] = -2 * v
				} else {
					g[k] = -math.Log(v) - 1
				}
			}
			return g
		},
	}
	for n := 2; n <= 4; n++ {
		res := certifyFormula(t, src, n, Settings{Deadline: 2 * time.Minute})
		if res.Verdict != verify.StrictlyProper {
			t.Fatalf("n=%d: %s", n, res.Statement())
		}
		bruteStrict(t, src, minForm, n, 12)
		res = certifyFormula(t, "max(1 - sum(p^2), -sum(p*ln(p)) - 0.1)", n, Settings{Deadline: 2 * time.Minute})
		if res.Verdict != verify.Improper {
			t.Fatalf("max n=%d: %s", n, res.Statement())
		}
	}
}

// The power rule H = (1 - sum p^g)/(g - 1) is strictly proper for every
// g > 0 (Gneiting & Raftery 2007, Sec. 3), though for g > 2 its curvature
// vanishes at the vertices and for g < 2 it is infinite at the faces; the
// certificate proves it through its one-variable terms, and brute force
// over reports with the closed form confirms it.
func TestPowerRuleStrictEverywhere(t *testing.T) {
	for _, g := range []float64{0.3, 0.5, 1.5, 3, 4, 7} {
		power := closedForm{
			h: func(p []float64) float64 {
				s := 1.0
				for _, v := range p {
					s -= math.Pow(v, g)
				}
				return s / (g - 1)
			},
			grad: func(p []float64) []float64 {
				out := make([]float64, len(p))
				for k, v := range p {
					out[k] = -g * math.Pow(v, g-1) / (g - 1)
				}
				return out
			},
		}
		for n := 2; n <= 4; n++ {
			src := "g = " + ftoa(g) + "\n-sum(p*expm1((g - 1)*ln(p))) / (g - 1)"
			res := certifyFormula(t, src, n, Settings{Deadline: time.Minute})
			if res.Verdict != verify.StrictlyProper {
				t.Fatalf("g=%g n=%d: %s", g, n, res.Statement())
			}
			bruteStrict(t, src, power, n, 10)
		}
	}
}

func ftoa(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// sqrt(p1*p2) (issue 10): for two outcomes H = sqrt(p(1-p)) is strictly
// concave, its curvature unbounded at both ends — a limit at the faces,
// since p1*p2 vanishes only there — so it is proved strictly proper, and
// brute force over reports with the closed form agrees. For three
// outcomes it is homogeneous of degree 1 in (p1, p2), so affine along
// rays from the vertex p3 = 1 (derived by hand): proper but never
// strictly, and the certificate must not say either strictly proper or
// improper.
func TestGeometricMeanGenerator(t *testing.T) {
	gm := closedForm{
		h: func(p []float64) float64 { return math.Sqrt(p[0] * p[1]) },
		grad: func(p []float64) []float64 {
			return []float64{0.5 * math.Sqrt(p[1]/p[0]), 0.5 * math.Sqrt(p[0]/p[1])}
		},
	}
	res := certifyFormula(t, "sqrt(p1*p2)", 2, Settings{Deadline: time.Minute})
	if res.Verdict != verify.StrictlyProper {
		t.Fatalf("n=2: %s", res.Statement())
	}
	bruteStrict(t, "sqrt(p1*p2)", gm, 2, 40)
	res = certifyFormula(t, "sqrt(p1*p2)", 3, Settings{Deadline: 2 * time.Second})
	if res.Verdict == verify.StrictlyProper || res.Verdict == verify.Improper {
		t.Fatalf("n=3: %s", res.Statement())
	}
}
