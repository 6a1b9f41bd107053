package num

import "math"

// Sum is a compensated (Neumaier) running sum: totals over millions of
// payments keep the digits a plain running sum loses. Inf and NaN pass
// through as data. The zero value is an empty sum.
type Sum struct{ s, c float64 }

// Add adds x to the sum.
func (a *Sum) Add(x float64) {
	t := a.s + x
	if t-t != 0 { // t is ±Inf or NaN: for finite t, t - t is exactly 0 (one test, on every payment of a backtest)
		a.s = t
		return
	}
	if math.Abs(a.s) >= math.Abs(x) {
		a.c += (a.s - t) + x
	} else {
		a.c += (x - t) + a.s
	}
	a.s = t
}

// Value is the sum so far.
func (a Sum) Value() float64 {
	if math.IsInf(a.s, 0) || math.IsNaN(a.s) {
		return a.s
	}
	return a.s + a.c
}

// Parts returns the running sum and its compensation, so that a sum can
// be stored and restored exactly with SumOf.
func (a Sum) Parts() (s, c float64) { return a.s, a.c }

// SumOf is the Sum whose Parts are s and c.
func SumOf(s, c float64) Sum { return Sum{s, c} }

// Merge adds the sum b to a, as if b's terms had been added one by one
// (up to the rounding of the two compensations).
func (a *Sum) Merge(b Sum) {
	a.Add(b.s)
	if !math.IsInf(a.s, 0) && !math.IsNaN(a.s) {
		a.c += b.c
	}
}
