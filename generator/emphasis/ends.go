package emphasis

import "math"

// betaTol is how close to -1 a fitted exponent may come and still count
// as integrable. Weights that sit this close to the border (such as
// 1/(c ln²c)) are beyond what two sample points can decide.
const betaTol = 1e-9

// EndFit is the behaviour of an integrand f at one end of (0, 1), fitted
// as a power law f ≈ K s^β in the distance s to the end from the values
// at s and s/4 (both exactly representable, and so is c).
type EndFit struct {
	// S is the distance to the end at which the fit was taken.
	S float64
	// F is the integrand's value there.
	F float64
	// Beta is the fitted exponent β (NaN when no power law fits).
	Beta float64
	// Zero: the integrand vanishes there.
	Zero bool
	// Infinite: the integrand is infinite there.
	Infinite bool
}

func fitEnd(f func(s float64) float64, s float64) EndFit {
	f1, f2 := f(s), f(s/4)
	e := EndFit{S: s, F: f1, Beta: math.NaN()}
	switch {
	case f1 == 0 && f2 == 0:
		e.Zero, e.Beta = true, 0
	case math.IsInf(f1, 0) || math.IsInf(f2, 0):
		e.Infinite = true
	case f1 > 0 && f2 > 0:
		e.Beta = -math.Log(f2/f1) / math.Log(4)
	}
	return e
}

// Diverges reports whether the integral of f up to the end is infinite.
func (e EndFit) Diverges() bool {
	return e.Infinite || !e.Zero && e.Beta+1 <= betaTol
}

// integral returns ∫ f over distances [a, b] from the end, 0 <= a <= b <= S,
// from the power law. Where no power law fits (f negative or NaN there,
// which Diagnostics reports) it falls back to f(S)·(b-a).
func (e EndFit) integral(a, b float64) float64 {
	switch {
	case a == b || e.Zero:
		return 0
	case e.Infinite:
		return math.Inf(1)
	case math.IsNaN(e.Beta):
		return e.F * (b - a)
	}
	r := e.Beta + 1
	if math.Abs(r) <= betaTol {
		if a == 0 {
			return math.Inf(1)
		}
		return e.F * e.S * math.Log(b/a)
	}
	if r < 0 && a == 0 {
		return math.Inf(1)
	}
	return e.F * e.S / r * (math.Pow(b/e.S, r) - math.Pow(a/e.S, r))
}
