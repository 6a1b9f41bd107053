package risk

import "math"

// certainty returns the certainty equivalent of final wealths x_k that
// come with probabilities q_k: the sure wealth with the same expected
// utility. It is u^-1(E u(x)), a strictly increasing function of expected
// utility, so it ranks reports as expected utility does, and it is in
// money, so one tolerance serves every utility. Outcomes with q_k = 0 do
// not count. It is NaN where the utility is not defined (CRRA and a
// negative wealth).
//
// The sums are taken relative to a pivot wealth m that makes every
// exponent non-positive (log-sum-exp), with expm1 and log1p, so that
// neither an extreme coefficient (CARA -1e6: exp(1e6·100) overflows) nor
// a tiny one (1e-9: log of a sum next to 1) loses the answer.
func (u Utility) certainty(x, q []float64) float64 {
	switch {
	case u.Kind == Linear || u.Coef == 0:
		var e, t float64
		for k, qk := range q {
			if qk != 0 {
				e += qk * x[k]
				t += qk
			}
		}
		return e / t
	case u.Kind == CARA:
		return caraCertainty(u.Coef, x, q)
	}
	return crraCertainty(u.Coef, x, q)
}

// pivot is the smallest (low) or largest wealth among the outcomes that
// count; NaN when one of them is NaN.
func pivot(x, q []float64, low bool) float64 {
	m, first := 0.0, true
	for k, qk := range q {
		if qk == 0 {
			continue
		}
		if math.IsNaN(x[k]) {
			return math.NaN()
		}
		if first || (low && x[k] < m) || (!low && x[k] > m) {
			m, first = x[k], false
		}
	}
	return m
}

// caraCertainty is -(1/a) ln E exp(-a x), pivoted at the wealth where
// -a x is largest.
func caraCertainty(a float64, x, q []float64) float64 {
	m := pivot(x, q, a > 0)
	if math.IsNaN(m) || math.IsInf(m, 0) {
		return m
	}
	var s, t float64
	for k, qk := range q {
		if qk != 0 {
			s += qk * math.Expm1(-a*(x[k]-m))
			t += qk
		}
	}
	return m - math.Log1p(s/t)/a
}

// crraCertainty is (E x^(1-R))^(1/(1-R)), exp(E ln x) at R = 1, pivoted
// at the wealth where (1-R) ln x is largest. Below R = 1 utility is defined
// at zero wealth (u(0) = 0); from R = 1 on zero wealth is the worst case
// (certainty equivalent 0).
func crraCertainty(r float64, x, q []float64) float64 {
	s := 1 - r
	m := pivot(x, q, s < 0)
	if math.IsNaN(m) || pivot(x, q, true) < 0 {
		return math.NaN()
	}
	if m == 0 || math.IsInf(m, 1) {
		return m
	}
	var e, t float64
	for k, qk := range q {
		if qk == 0 {
			continue
		}
		d := math.Log1p((x[k] - m) / m) // ln(x_k/m), exact near 1; -Inf at x_k = 0
		if s == 0 {
			if math.IsInf(d, -1) {
				return 0
			}
			e += qk * d
		} else {
			e += qk * math.Expm1(s*d)
		}
		t += qk
	}
	if s == 0 {
		return m * math.Exp(e/t)
	}
	return m * math.Exp(math.Log1p(e/t)/s)
}

// weights writes into dst the belief tilted by marginal utility,
// pi_k ∝ q_k u'(x_k), normalised to sum 1 (pivoted like certainty, so no
// coefficient overflows it). The best interior report of a strictly
// proper rule is a fixed point p = pi(p): there the first-order condition
// sum_k q_k u'(x_k) dL_k/dp = H”(pi - p) vanishes along the simplex.
func (u Utility) weights(dst, x, q []float64) {
	var logw func(k int, m float64) float64
	low := true
	switch {
	case u.Kind == Linear || u.Coef == 0:
		copy(dst, q)
		normalise(dst)
		return
	case u.Kind == CARA:
		a := u.Coef
		low = a > 0
		logw = func(k int, m float64) float64 { return -a * (x[k] - m) }
	default:
		r := u.Coef
		low = r > 0
		logw = func(k int, m float64) float64 { return -r * math.Log(x[k]/m) }
	}
	m := pivot(x, q, low)
	var t float64
	for k, qk := range q {
		dst[k] = 0
		if qk == 0 {
			continue
		}
		if u.Kind == CRRA && m == 0 {
			// u'(0) is infinite (R > 0): all weight on the zero wealths.
			if x[k] == 0 {
				dst[k] = qk
			}
		} else {
			dst[k] = qk * math.Exp(logw(k, m))
		}
		t += dst[k]
	}
	for k := range dst {
		dst[k] /= t
	}
}
