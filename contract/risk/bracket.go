package risk

import (
	"math"

	"scorewright/internal/num"
)

// maximise1 maximises f on [lo, hi] (lo <= t0 <= hi, f0 = f(t0)) by
// bracketing, a numeric kernel:
//
//  1. f on a grid of cells steps; a grid point replaces t0 only when it is
//     better by more than tie (differences below tie are rounding);
//  2. golden section in the bracket around the best point;
//  3. an end of the range wins when it is as good (within tie) and the
//     search moved toward it: the optimum of a risk-seeking forecaster is
//     often a corner, which golden section only approaches;
//  4. when the derivative df is finite and changes sign across the
//     bracket, bisection on its sign to floating-point resolution: where
//     values have gone flat (golden section stops at about the square root
//     of the rounding unit) the first-order condition still pins the
//     maximiser.
//
// res is the resolution in t at which golden section and bisection stop;
// with a derivative golden section stops a thousandth of the way down,
// where bisection is faster. It returns the best point and its value;
// NaN values count as -Inf. df may be nil.
func maximise1(f, df func(float64) float64, lo, hi, t0, f0 float64, cells int, tie, res float64) (float64, float64) {
	val := func(t float64) float64 {
		if v := f(t); !math.IsNaN(v) {
			return v
		}
		return math.Inf(-1)
	}
	if math.IsNaN(f0) {
		f0 = math.Inf(-1)
	}
	at := func(i int) float64 {
		switch {
		case i <= 0:
			return lo
		case i >= cells:
			return hi
		}
		return lo + (hi-lo)*float64(i)/float64(cells)
	}
	bt, bv, bi := t0, f0, -1
	for i := 0; i <= cells; i++ {
		if v := val(at(i)); v > bv+tie {
			bt, bv, bi = at(i), v, i
		}
	}
	if math.IsInf(bv, -1) {
		return bt, bv
	}
	if bi < 0 && hi > lo {
		bi = int(math.Floor((t0 - lo) / (hi - lo) * float64(cells)))
	}
	a, b := at(bi-1), at(bi+2)
	if bi >= 0 && bt == at(bi) {
		b = at(bi + 1)
	}
	// 2. Golden section.
	stop := res
	if df != nil {
		stop = math.Max(res, 1e-9*(b-a))
	}
	g := num.GoldenMax(val, a, b, 300, func(ga, gb float64) bool { return gb-ga > stop })
	c, fc, d, fd := g.C, g.FC, g.D, g.FD
	moved := false
	if fd > fc {
		c, fc = d, fd
	}
	if fc > bv {
		bt, bv, moved = c, fc, true
	}
	// 3. The ends, exactly.
	if moved || bt != t0 {
		for _, e := range [2]float64{lo, hi} {
			if (e == a || e == b) && math.Abs(bt-e) < (b-a)/2 {
				if v := val(e); v >= bv-tie {
					bt, bv = e, v
				}
			}
		}
	}
	// 4. The first-order condition.
	if df == nil || bt == lo || bt == hi {
		return bt, bv
	}
	da, db := df(a), df(b)
	if !(da > 0 && db < 0) {
		return bt, bv
	}
	for it := 0; it < 200 && b-a > res; it++ {
		m := a + (b-a)/2
		if m <= a || m >= b {
			break
		}
		dm := df(m)
		if math.IsNaN(dm) {
			return bt, bv
		}
		if dm > 0 {
			a = m
		} else {
			b = m
		}
	}
	root := a + (b-a)/2
	if v := val(root); v >= bv-tie {
		bt, bv = root, v
	}
	return bt, bv
}
