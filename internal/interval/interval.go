// Package interval is interval arithmetic with outward rounding (Moore
// 1966, Interval Analysis; Hansen & Walster 2004, Global Optimization
// Using Interval Analysis): every operation returns an interval that
// contains the exact real result for every choice of real operands in
// its operand intervals.
//
// An Interval is a closed set of reals [Lo, Hi]; an infinite endpoint
// means unbounded on that side (the set itself holds only reals), so the
// endpoint product 0 · ±Inf is 0. Rounding is directed by error-free
// transformations where they exist (TwoSum for sums, FMA for products,
// quotients and square roots): an exactly representable result stays
// exact, so structural zeros stay zero. Library functions (exp, log and
// their relatives) are widened outward by a few units in the last place,
// more than their documented accuracy of under one.
//
// A NaN endpoint never appears: an operation that leaves its domain on
// part of the operands (ln of a negative, 0/0) reports it through its
// second result or through Entire, and callers treat that as "undefined
// somewhere on the box".
package interval

import (
	"fmt"
	"math"
)

// Interval is the closed set of reals [Lo, Hi] (Lo <= Hi).
type Interval struct{ Lo, Hi float64 }

// Point is the degenerate interval [x, x].
func Point(x float64) Interval { return Interval{x, x} }

// New returns [lo, hi]; it panics when lo > hi or either is NaN, which
// is a caller's bug.
func New(lo, hi float64) Interval {
	if !(lo <= hi) {
		panic(fmt.Sprintf("interval: [%g, %g] is not an interval", lo, hi))
	}
	return Interval{lo, hi}
}

// Entire is the whole real line.
func Entire() Interval { return Interval{math.Inf(-1), math.Inf(1)} }

// IsZero reports whether a is exactly [0, 0].
func (a Interval) IsZero() bool { return a.Lo == 0 && a.Hi == 0 }

// IsPoint reports whether a holds one number.
func (a Interval) IsPoint() bool { return a.Lo == a.Hi }

// Bounded reports whether both endpoints are finite.
func (a Interval) Bounded() bool { return !math.IsInf(a.Lo, 0) && !math.IsInf(a.Hi, 0) }

// Contains reports whether x lies in a.
func (a Interval) Contains(x float64) bool { return a.Lo <= x && x <= a.Hi }

// Width is Hi - Lo rounded up.
func (a Interval) Width() float64 { return up(a.Hi - a.Lo) }

// Mid is a point of a near its centre (finite when a is bounded).
func (a Interval) Mid() float64 {
	switch {
	case a.IsPoint():
		return a.Lo
	case math.IsInf(a.Lo, -1) && math.IsInf(a.Hi, 1):
		return 0
	case math.IsInf(a.Lo, -1):
		return -math.MaxFloat64
	case math.IsInf(a.Hi, 1):
		return math.MaxFloat64
	}
	m := a.Lo/2 + a.Hi/2
	return math.Max(a.Lo, math.Min(a.Hi, m))
}

// Mag is the largest absolute value in a.
func (a Interval) Mag() float64 { return math.Max(math.Abs(a.Lo), math.Abs(a.Hi)) }

// Hull is the smallest interval holding a and b.
func Hull(a, b Interval) Interval { return Interval{math.Min(a.Lo, b.Lo), math.Max(a.Hi, b.Hi)} }

// Intersect returns a ∩ b and whether it is non-empty.
func Intersect(a, b Interval) (Interval, bool) {
	lo, hi := math.Max(a.Lo, b.Lo), math.Min(a.Hi, b.Hi)
	if lo > hi {
		return Interval{}, false
	}
	return Interval{lo, hi}, true
}

func (a Interval) String() string {
	if a.IsPoint() {
		return fmt.Sprintf("[%g]", a.Lo)
	}
	return fmt.Sprintf("[%g, %g]", a.Lo, a.Hi)
}

func up(x float64) float64   { return math.Nextafter(x, math.Inf(1)) }
func down(x float64) float64 { return math.Nextafter(x, math.Inf(-1)) }

// twoSumErr returns the rounding error of s = a + b (a + b = s + e
// exactly, Knuth's TwoSum); for infinite or overflowing sums it is 0.
func twoSumErr(a, b, s float64) float64 {
	if math.IsInf(s, 0) || math.IsNaN(s) {
		return 0
	}
	bb := s - a
	return (a - (s - bb)) + (b - bb)
}

// addLo and addHi are a + b rounded down and up.
func addLo(a, b float64) float64 {
	s := a + b
	if s != s {
		// -Inf + Inf only arises from unbounded operands: the set is
		// unbounded below.
		return math.Inf(-1)
	}
	if math.IsInf(s, 1) && !math.IsInf(a, 1) && !math.IsInf(b, 1) {
		return math.MaxFloat64
	}
	if twoSumErr(a, b, s) < 0 {
		return down(s)
	}
	return s
}

func addHi(a, b float64) float64 {
	s := a + b
	if s != s {
		return math.Inf(1)
	}
	if math.IsInf(s, -1) && !math.IsInf(a, -1) && !math.IsInf(b, -1) {
		return -math.MaxFloat64
	}
	if twoSumErr(a, b, s) > 0 {
		return up(s)
	}
	return s
}

// Add is a + b.
func Add(a, b Interval) Interval { return Interval{addLo(a.Lo, b.Lo), addHi(a.Hi, b.Hi)} }

// Sub is a - b.
func Sub(a, b Interval) Interval { return Interval{addLo(a.Lo, -b.Hi), addHi(a.Hi, -b.Lo)} }

// Neg is -a.
func Neg(a Interval) Interval { return Interval{-a.Hi, -a.Lo} }

// Scale is k·a for a constant k, exact when k is a power of two.
func Scale(k float64, a Interval) Interval { return Mul(Point(k), a) }

// tiny is below the range where FMA's residual is exact; products there
// are widened by one unit without asking.
const tiny = 0x1p-960

// mulLo and mulHi are x·y rounded down and up, with 0 · ±Inf = 0.
func mulLo(x, y float64) float64 {
	if x == 0 || y == 0 {
		return 0
	}
	p := x * y
	if math.IsInf(p, 0) {
		if math.IsInf(x, 0) || math.IsInf(y, 0) || p < 0 {
			return p
		}
		return math.MaxFloat64
	}
	if math.Abs(p) < tiny {
		return down(p)
	}
	if math.FMA(x, y, -p) < 0 {
		return down(p)
	}
	return p
}

func mulHi(x, y float64) float64 {
	if x == 0 || y == 0 {
		return 0
	}
	p := x * y
	if math.IsInf(p, 0) {
		if math.IsInf(x, 0) || math.IsInf(y, 0) || p > 0 {
			return p
		}
		return -math.MaxFloat64
	}
	if math.Abs(p) < tiny {
		return up(p)
	}
	if math.FMA(x, y, -p) > 0 {
		return up(p)
	}
	return p
}

// Mul is a·b.
func Mul(a, b Interval) Interval {
	if a.IsZero() || b.IsZero() {
		return Interval{}
	}
	lo := math.Min(math.Min(mulLo(a.Lo, b.Lo), mulLo(a.Lo, b.Hi)), math.Min(mulLo(a.Hi, b.Lo), mulLo(a.Hi, b.Hi)))
	hi := math.Max(math.Max(mulHi(a.Lo, b.Lo), mulHi(a.Lo, b.Hi)), math.Max(mulHi(a.Hi, b.Lo), mulHi(a.Hi, b.Hi)))
	return Interval{lo, hi}
}

// Sq is a², tighter than Mul(a, a): it is never negative.
func Sq(a Interval) Interval {
	m := a.Mag()
	lo := 0.0
	if a.Lo > 0 {
		lo = mulLo(a.Lo, a.Lo)
	} else if a.Hi < 0 {
		lo = mulLo(a.Hi, a.Hi)
	}
	return Interval{lo, mulHi(m, m)}
}

// divLo and divHi are x/y rounded down and up, for y != 0 and not both
// infinite.
func divLo(x, y float64) float64 {
	q := x / y
	if math.IsInf(q, 0) || q == 0 || math.IsInf(x, 0) || math.IsInf(y, 0) || math.Abs(q) < tiny {
		if math.IsInf(x, 0) || math.IsInf(y, 0) {
			return q
		}
		return down(q)
	}
	// r = x - q·y exactly; x/y - q = r/y.
	r := math.FMA(-q, y, x)
	if r != 0 && (r < 0) != (y < 0) {
		return down(q)
	}
	return q
}

func divHi(x, y float64) float64 {
	q := x / y
	if math.IsInf(q, 0) || q == 0 || math.IsInf(x, 0) || math.IsInf(y, 0) || math.Abs(q) < tiny {
		if math.IsInf(x, 0) || math.IsInf(y, 0) {
			return q
		}
		return up(q)
	}
	r := math.FMA(-q, y, x)
	if r != 0 && (r > 0) == (y > 0) {
		return up(q)
	}
	return q
}

// Inv is 1/a. A divisor interval holding 0 gives an unbounded result;
// ok is false when a is [0, 0], where 1/a is defined nowhere.
func Inv(a Interval) (Interval, bool) { return Div(Point(1), a) }

// Div is a/b. When b holds 0 in its interior the quotient set is
// unbounded on both sides (Entire); when 0 is an endpoint of b the result
// is unbounded on one side. ok is false when a/b is undefined somewhere
// (0/0, or b = [0, 0]).
func Div(a, b Interval) (Interval, bool) {
	switch {
	case b.IsZero():
		return Entire(), false
	case b.Lo > 0 || b.Hi < 0:
		return divNonzero(a, b), true
	}
	ok := !a.Contains(0)
	if b.Lo < 0 && b.Hi > 0 {
		return Entire(), ok
	}
	// 0 is an endpoint of b: divide by the part away from 0, and let the
	// side toward 0 run to infinity.
	inf := math.Inf(1)
	var r Interval
	if b.Lo == 0 {
		r = divNonzero(a, Interval{math.SmallestNonzeroFloat64, b.Hi})
		switch {
		case a.Lo >= 0:
			r.Hi = inf
		case a.Hi <= 0:
			r.Lo = -inf
		default:
			r = Entire()
		}
	} else {
		r = divNonzero(a, Interval{b.Lo, -math.SmallestNonzeroFloat64})
		switch {
		case a.Lo >= 0:
			r.Lo = -inf
		case a.Hi <= 0:
			r.Hi = inf
		default:
			r = Entire()
		}
	}
	return r, ok
}

func divNonzero(a, b Interval) Interval {
	if a.IsZero() {
		return Interval{}
	}
	xs := [2]float64{a.Lo, a.Hi}
	ys := [2]float64{b.Lo, b.Hi}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		for _, y := range ys {
			if math.IsInf(x, 0) && math.IsInf(y, 0) {
				// ∞/∞ at the corner: the quotient set still runs from
				// the finite corners to 0 and beyond; take both.
				lo, hi = math.Min(lo, 0), math.Max(hi, 0)
				continue
			}
			lo = math.Min(lo, divLo(x, y))
			hi = math.Max(hi, divHi(x, y))
		}
	}
	return Interval{lo, hi}
}

// Abs is |a|.
func Abs(a Interval) Interval {
	switch {
	case a.Lo >= 0:
		return a
	case a.Hi <= 0:
		return Neg(a)
	}
	return Interval{0, a.Mag()}
}

// Min is the set of min(x, y) for x in a, y in b.
func Min(a, b Interval) Interval { return Interval{math.Min(a.Lo, b.Lo), math.Min(a.Hi, b.Hi)} }

// Max is the set of max(x, y) for x in a, y in b.
func Max(a, b Interval) Interval { return Interval{math.Max(a.Lo, b.Lo), math.Max(a.Hi, b.Hi)} }
