package interval

import "math"

// libUlps is how many units in the last place a library result is
// widened: Go's exp, log, expm1 and log1p (ported from FreeBSD's msun)
// are accurate to under one ulp; four leave a wide margin.
const libUlps = 4

func upN(x float64) float64 {
	for range libUlps {
		x = up(x)
	}
	return x
}

func downN(x float64) float64 {
	for range libUlps {
		x = down(x)
	}
	return x
}

// mono applies an increasing library function f to a, widening both
// ends, keeping results that are exact by definition (exact reports
// whether f(x) is exact at x) and clamping into [floor, ceil], the range
// f can take.
func mono(a Interval, f func(float64) float64, exact func(float64) bool, floor, ceil float64) Interval {
	lo, hi := f(a.Lo), f(a.Hi)
	if !exact(a.Lo) {
		lo = downN(lo)
	}
	if !exact(a.Hi) {
		hi = upN(hi)
	}
	return Interval{math.Max(lo, floor), math.Min(hi, ceil)}
}

func isInfOr(v float64) func(float64) bool {
	return func(x float64) bool { return math.IsInf(x, 0) || x == v }
}

// Exp is e^a; exp(-Inf) is 0 in the closure.
func Exp(a Interval) Interval {
	return mono(a, math.Exp, isInfOr(0), 0, math.Inf(1))
}

// Expm1 is e^a - 1, accurate for a near 0.
func Expm1(a Interval) Interval {
	return mono(a, math.Expm1, isInfOr(0), -1, math.Inf(1))
}

// Log is ln a on a ∩ [0, Inf); ok is false when a reaches below 0,
// where ln is undefined. ln 0 is -Inf in the closure.
func Log(a Interval) (Interval, bool) {
	ok := a.Lo >= 0
	if a.Hi < 0 {
		return Entire(), false
	}
	a.Lo = math.Max(a.Lo, 0)
	return mono(a, math.Log, isInfOr(1), math.Inf(-1), math.Inf(1)), ok
}

// Log1p is ln(1 + a) on a ∩ [-1, Inf); ok is false when a reaches below -1.
func Log1p(a Interval) (Interval, bool) {
	ok := a.Lo >= -1
	if a.Hi < -1 {
		return Entire(), false
	}
	a.Lo = math.Max(a.Lo, -1)
	return mono(a, math.Log1p, isInfOr(0), math.Inf(-1), math.Inf(1)), ok
}

// sqrtLo and sqrtHi are √x rounded down and up (IEEE sqrt is correctly
// rounded; FMA tells which side the exact root is on).
func sqrtLo(x float64) float64 {
	s := math.Sqrt(x)
	if math.IsInf(s, 0) || s == 0 || x < tiny {
		if x > 0 && x < tiny {
			return down(s)
		}
		return s
	}
	if math.FMA(-s, s, x) < 0 {
		return down(s)
	}
	return s
}

func sqrtHi(x float64) float64 {
	s := math.Sqrt(x)
	if math.IsInf(s, 0) || s == 0 || x < tiny {
		if x > 0 && x < tiny {
			return up(s)
		}
		return s
	}
	if math.FMA(-s, s, x) > 0 {
		return up(s)
	}
	return s
}

// Sqrt is √a on a ∩ [0, Inf); ok is false when a reaches below 0.
func Sqrt(a Interval) (Interval, bool) {
	ok := a.Lo >= 0
	if a.Hi < 0 {
		return Entire(), false
	}
	return Interval{sqrtLo(math.Max(a.Lo, 0)), sqrtHi(a.Hi)}, ok
}

// XLnX is x ln x on a ∩ [0, Inf), with its limit 0 at 0; ok is false
// when a reaches below 0. The function falls to -1/e at 1/e and rises on
// either side of it.
func XLnX(a Interval) (Interval, bool) {
	ok := a.Lo >= 0
	if a.Hi < 0 {
		return Entire(), false
	}
	a.Lo = math.Max(a.Lo, 0)
	at := func(x float64) Interval {
		if x == 0 || x == 1 {
			return Interval{}
		}
		l, _ := Log(Point(x))
		return Mul(Point(x), l)
	}
	lo, hi := at(a.Lo), at(a.Hi)
	r := Hull(lo, hi)
	if a.Contains(1 / math.E) {
		// -1/e rounded down.
		r.Lo = down(-1 / math.E)
	}
	return r, ok
}

// PowK is a^k for a constant exponent k. For a whole k it is defined on
// every a (a negative k needs a away from 0); otherwise on a ∩ [0, Inf).
// ok is false when a leaves the domain somewhere.
func PowK(a Interval, k float64) (Interval, bool) {
	switch {
	case k == 0:
		return Point(1), true
	case k == 1:
		return a, true
	case k == 2:
		return Sq(a), true
	}
	if k == math.Trunc(k) && math.Abs(k) < 1<<53 {
		return powWhole(a, k)
	}
	ok := a.Lo >= 0
	if a.Hi < 0 {
		return Entire(), false
	}
	a.Lo = math.Max(a.Lo, 0)
	if k < 0 && a.Lo == 0 {
		ok = ok && a.Hi > 0
	}
	return powPos(a, k), ok
}

// powPos is a^k on a ⊂ [0, Inf) as exp(k ln a), monotone in a.
func powPos(a Interval, k float64) Interval {
	at := func(x float64) Interval {
		switch {
		case x == 0 && k > 0:
			return Interval{}
		case x == 0:
			return Point(math.Inf(1))
		case x == 1:
			return Point(1)
		case math.IsInf(x, 1) && k > 0:
			return Point(math.Inf(1))
		case math.IsInf(x, 1):
			return Interval{}
		}
		l, _ := Log(Point(x))
		return Exp(Mul(Point(k), l))
	}
	return Hull(at(a.Lo), at(a.Hi))
}

// powWhole is a^k for a whole k: odd powers keep the sign and are
// monotone, even powers depend on |a|.
func powWhole(a Interval, k float64) (Interval, bool) {
	odd := math.Mod(k, 2) != 0
	if k < 0 && a.Contains(0) {
		if a.IsZero() {
			return Entire(), false
		}
		switch {
		case !odd:
			// |a|^k with |a| reaching 0: from the least |a|^k up to +Inf.
			return Interval{powPos(Interval{a.Mag(), a.Mag()}, k).Lo, math.Inf(1)}, true
		case a.Lo == 0:
			return Interval{powPos(Point(a.Hi), k).Lo, math.Inf(1)}, true
		case a.Hi == 0:
			return Interval{math.Inf(-1), Neg(powPos(Point(-a.Lo), k)).Hi}, true
		}
		return Entire(), true
	}
	if a.Lo >= 0 {
		return powPos(a, k), true
	}
	if a.Hi <= 0 {
		m := powPos(Neg(a), k)
		if odd {
			return Neg(m), true
		}
		return m, true
	}
	// a straddles 0 and k > 0.
	pos := powPos(Interval{0, a.Hi}, k)
	neg := powPos(Interval{0, -a.Lo}, k)
	if odd {
		return Interval{-neg.Hi, pos.Hi}, true
	}
	return Interval{0, math.Max(pos.Hi, neg.Hi)}, true
}

// PowB is k^a for a constant base k > 0 (monotone in a); ok is false for
// k <= 0 unless a is a whole point, which callers evaluate as PowK.
func PowB(k float64, a Interval) (Interval, bool) {
	if !(k > 0) {
		if a.IsPoint() && a.Lo == math.Trunc(a.Lo) {
			return PowK(Point(k), a.Lo)
		}
		return Entire(), false
	}
	l, _ := Log(Point(k))
	return Exp(Mul(l, a)), true
}

// Pow is a^b for intervals, as exp(b ln a) on a ∩ [0, Inf); ok is false
// when a reaches below 0 (unless b is a whole point) or when 0^b with b
// <= 0 is possible.
func Pow(a, b Interval) (Interval, bool) {
	if b.IsPoint() {
		return PowK(a, b.Lo)
	}
	ok := a.Lo >= 0 && !(a.Lo == 0 && b.Lo <= 0)
	if a.Hi < 0 {
		return Entire(), false
	}
	a.Lo = math.Max(a.Lo, 0)
	l, _ := Log(a)
	return Exp(Mul(b, l)), ok
}
