package interval

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// randInterval draws an interval with endpoints of mixed sign and size,
// sometimes a point or with a zero endpoint.
func randInterval(r *rand.Rand) Interval {
	x := func() float64 {
		switch r.IntN(6) {
		case 0:
			return 0
		case 1:
			return r.Float64()
		}
		return (r.Float64()*2 - 1) * math.Pow(10, float64(r.IntN(12)-6))
	}
	a, b := x(), x()
	if r.IntN(8) == 0 {
		b = a
	}
	return Interval{math.Min(a, b), math.Max(a, b)}
}

func inside(r *rand.Rand, a Interval) float64 {
	if a.IsPoint() {
		return a.Lo
	}
	switch r.IntN(5) {
	case 0:
		return a.Lo
	case 1:
		return a.Hi
	}
	return a.Lo + r.Float64()*(a.Hi-a.Lo)
}

func exact(x float64) *big.Float { return new(big.Float).SetPrec(2000).SetFloat64(x) }

// containsBig reports whether the exact real v lies in a.
func containsBig(a Interval, v *big.Float) bool {
	lo, hi := exact(a.Lo), exact(a.Hi)
	return lo.Cmp(v) <= 0 && v.Cmp(hi) <= 0
}

// TestArithmeticContainsExact checks the rounding direction of +, -, ×,
// ÷ and √ against exact results computed with math/big at 2000 bits
// (exact for sums and products of doubles; quotients and roots to far
// below one ulp): the enclosure must hold the exact value for points
// drawn from the operand intervals.
func TestArithmeticContainsExact(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for range 20000 {
		a, b := randInterval(r), randInterval(r)
		x, y := inside(r, a), inside(r, b)
		ex, ey := exact(x), exact(y)
		if s := Add(a, b); !containsBig(s, new(big.Float).SetPrec(2000).Add(ex, ey)) {
			t.Fatalf("%v + %v = %v misses %g + %g", a, b, s, x, y)
		}
		if s := Sub(a, b); !containsBig(s, new(big.Float).SetPrec(2000).Sub(ex, ey)) {
			t.Fatalf("%v - %v = %v misses %g - %g", a, b, s, x, y)
		}
		if p := Mul(a, b); !containsBig(p, new(big.Float).SetPrec(2000).Mul(ex, ey)) {
			t.Fatalf("%v * %v = %v misses %g * %g", a, b, p, x, y)
		}
		if s := Sq(a); !containsBig(s, new(big.Float).SetPrec(2000).Mul(ex, ex)) {
			t.Fatalf("sq %v = %v misses %g", a, s, x)
		}
		if y != 0 {
			q, _ := Div(a, b)
			if !containsBig(q, new(big.Float).SetPrec(2000).Quo(ex, ey)) {
				t.Fatalf("%v / %v = %v misses %g / %g", a, b, q, x, y)
			}
		}
		if x >= 0 {
			s, _ := Sqrt(a)
			if !containsBig(s, new(big.Float).SetPrec(2000).Sqrt(ex)) {
				t.Fatalf("sqrt %v = %v misses %g", a, s, x)
			}
		}
	}
}

// TestExactStaysExact: results representable exactly are not widened, so
// the structural zeros and small integers of a Hessian stay exact.
func TestExactStaysExact(t *testing.T) {
	cases := []struct {
		got, want Interval
	}{
		{Add(Point(1), Point(2)), Point(3)},
		{Mul(Point(-2), Point(0.5)), Point(-1)},
		{Mul(Interval{0, 1}, Point(math.Inf(1))), Interval{0, math.Inf(1)}},
		{Mul(Point(0), Entire()), Point(0)},
		{Sq(Interval{-3, 2}), Interval{0, 9}},
		{Abs(Interval{-3, 2}), Interval{0, 3}},
		{Exp(Point(0)), Point(1)},
		{Exp(Point(math.Inf(-1))), Point(0)},
	}
	for i, c := range cases {
		if c.got != c.want {
			t.Errorf("case %d: got %v, want %v", i, c.got, c.want)
		}
	}
	if q, _ := Div(Point(6), Point(3)); q != Point(2) {
		t.Errorf("6/3 = %v", q)
	}
	if s, _ := Sqrt(Point(9)); s != Point(3) {
		t.Errorf("sqrt 9 = %v", s)
	}
	if l, _ := Log(Point(1)); l != Point(0) {
		t.Errorf("ln 1 = %v", l)
	}
}

// TestDivisionByIntervalsHoldingZero: 1/[0, 2] is [1/2, Inf) and
// 1/[-1, 2] is the whole line (derived by hand).
func TestDivisionByIntervalsHoldingZero(t *testing.T) {
	if q, ok := Div(Point(1), Interval{0, 2}); !ok || q.Lo != 0.5 || !math.IsInf(q.Hi, 1) {
		t.Errorf("1/[0,2] = %v %v", q, ok)
	}
	if q, _ := Div(Point(1), Interval{-1, 2}); q != Entire() {
		t.Errorf("1/[-1,2] = %v", q)
	}
	if _, ok := Div(Interval{-1, 1}, Interval{0, 1}); ok {
		t.Error("0/0 is possible in [-1,1]/[0,1] and must be reported")
	}
	if q, ok := Div(Interval{-2, -1}, Interval{0, 4}); !ok || !math.IsInf(q.Lo, -1) || q.Hi != -0.25 {
		t.Errorf("[-2,-1]/[0,4] = %v", q)
	}
}

// TestLibraryFunctionsContain compares exp, ln, expm1, log1p, x ln x and
// powers at random points with Go's math package (accurate to under one
// ulp), the enclosure of the interval holding the point.
func TestLibraryFunctionsContain(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	check := func(name string, got Interval, want float64) {
		t.Helper()
		if math.IsNaN(want) || math.IsInf(want, 0) {
			return
		}
		if !got.Contains(want) {
			t.Fatalf("%s: %v misses %g", name, got, want)
		}
	}
	for range 20000 {
		a := randInterval(r)
		x := inside(r, a)
		check("exp", Exp(a), math.Exp(x))
		check("expm1", Expm1(a), math.Expm1(x))
		if x >= 0 {
			l, _ := Log(a)
			check("ln", l, math.Log(x))
			xl, _ := XLnX(a)
			want := 0.0
			if x > 0 {
				want = x * math.Log(x)
			}
			check("xlnx", xl, want)
			for _, k := range []float64{0.5, 1.5, 2.5, 3, -1, -0.5, 1e-3} {
				p, _ := PowK(a, k)
				check("powk", p, math.Pow(x, k))
			}
		}
		if x >= -1 {
			l, _ := Log1p(a)
			check("log1p", l, math.Log1p(x))
		}
		for _, k := range []float64{3, 4, -2, -3} {
			p, _ := PowK(a, k)
			check("pow whole", p, math.Pow(x, k))
		}
	}
}

// TestXLnXMinimum: x ln x on [0.1, 1] reaches its minimum -1/e at 1/e and
// 0 at 1 (derived by hand).
func TestXLnXMinimum(t *testing.T) {
	r, ok := XLnX(Interval{0.1, 1})
	if !ok || r.Hi != 0 || r.Lo > -1/math.E || r.Lo < -1/math.E-1e-15 {
		t.Errorf("xlnx [0.1, 1] = %v", r)
	}
	if _, ok := XLnX(Interval{-0.1, 1}); ok {
		t.Error("x ln x below 0 must be reported undefined")
	}
}
